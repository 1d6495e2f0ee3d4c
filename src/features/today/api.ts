import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '../../lib/api-client';
import { studioQueries } from '../settings/api';
import { reasonSchema } from '../../../shared/schemas/rig';
import { todaySchema } from '../../../shared/schemas/today';
import { pointStatuses } from '../../../shared/schemas/vocabulary';
import type { PreuseBody } from '../../../shared/schemas/safety';

export type { Today, TodayPoint, TodaySession, TodayStudent } from '../../../shared/schemas/today';
const statusWord = z.enum(pointStatuses);

export const preuseListSchema = z.object({ items: z.array(z.object({ key: z.string(), label: z.string(), notApplicable: z.boolean().optional() })) });
export const preuseResultSchema = z.object({
  inspectionId: z.number(),
  passed: z.boolean(),
  faultIds: z.array(z.number()),
  status: z.object({ status: statusWord, clearedUntil: z.string().nullable(), reasons: z.array(reasonSchema) }),
});
export type PreuseResult = z.infer<typeof preuseResultSchema>;

export const todayQueries = {
  all: ['today'] as const,
  // The board is left open on a phone in the studio: refresh it every minute.
  board: () => queryOptions({ queryKey: [...todayQueries.all, 'board'], queryFn: () => api('/today', { schema: todaySchema }), refetchInterval: 60_000 }),
  preuseList: (pointId: number) =>
    queryOptions({ queryKey: [...todayQueries.all, 'preuse-list', pointId], queryFn: () => api(`/points/${pointId}/preuse`, { schema: preuseListSchema }), staleTime: 5 * 60_000 }),
};

/**
 * Query keys a safety change touches outside this feature: a pre-use fail, a fault or a clearance
 * moves a point's status everywhere it is shown.
 */
export const safetyKeys = [['today'], ['faults'], ['inspections'], ['rig'], ['sessions'], ['schedule']] as const;
/** Use as `onSuccess: () => void invalidate()`: not awaited, so a caller's own onSuccess still runs when the refetch unmounts it. */
export function useInvalidateSafety() {
  const qc = useQueryClient();
  return () => Promise.all(safetyKeys.map((queryKey) => qc.invalidateQueries({ queryKey: [...queryKey] })));
}

/** The studio's time zone, which every time on the safety pages is shown in. */
export function useStudioTimeZone() {
  return useQuery({ ...studioQueries.detail(), select: (s) => s.policy.timeZone });
}

export function usePreuseCheck(pointId: number) {
  const invalidate = useInvalidateSafety();
  return useMutation({
    mutationFn: (body: PreuseBody) => api(`/points/${pointId}/preuse`, { method: 'POST', body, schema: preuseResultSchema }),
    onSuccess: () => void invalidate(),
  });
}
