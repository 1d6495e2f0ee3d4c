import { useQuery } from '@tanstack/react-query';
import { scheduleQueries } from './api';

export const useRooms = () => useQuery(scheduleQueries.rooms());
export const useClassTypes = () => useQuery({ ...scheduleQueries.classTypes(), select: (list) => list.filter((c) => c.active) });
