import { useQuery } from '@tanstack/react-query';
import { staffQueries } from '../staff/api';
import { scheduleQueries } from './api';

/** Active instructors to pick from. Only the desk may list staff, so others get none (and no 403). */
export function useInstructors(canList: boolean) {
  return useQuery({
    ...staffQueries.list(),
    enabled: canList,
    select: (users) => users.filter((u) => u.role === 'instructor' && u.active).sort((a, b) => a.name.localeCompare(b.name)),
  });
}

export const useRooms = () => useQuery(scheduleQueries.rooms());
export const useClassTypes = () => useQuery({ ...scheduleQueries.classTypes(), select: (list) => list.filter((c) => c.active) });
