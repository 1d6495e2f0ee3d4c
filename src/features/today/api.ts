import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '../../lib/api-client';
import { studioQueries } from '../settings/api';
import { reasonSchema } from '../../../shared/schemas/rig';
import { changeoverSchema } from '../../../shared/schemas/sessions';
import type { PreuseBody } from '../../../shared/schemas/safety';

// GET /api/today has no schema in shared/ yet; this is the part of it the board reads.
const statusWord = z.enum(['cleared', 'expiring', 'blocked']);
export const todayPointSchema = z.object({
  pointId: z.number(),
  label: z.string(),
  roomName: z.string(),
  status: statusWord,
  clearedUntil: z.string().nullable(),
  reasons: z.array(reasonSchema),
  /** Gear whose own inspection would unblock the point (a quarantined item, the apparatus's own inspection). */
  gearToInspect: z.array(z.object({ gearId: z.number(), kind: z.string(), serial: z.string(), inspection: z.enum(['after_incident', 'periodic']), standing: z.string() })).default([]),
  preuseDue: z.boolean(),
  lastPreuseAt: z.string().nullable(),
});
export type TodayPoint = z.infer<typeof todayPointSchema>;

export const todaySessionSchema = z.object({
  id: z.number(),
  className: z.string(),
  apparatus: z.string(),
  roomName: z.string(),
  instructorName: z.string(),
  startsAt: z.string(),
  endsAt: z.string(),
  cancelled: z.boolean(),
  cancelReason: z.string().nullable(),
  atRisk: z.boolean(),
  riskReasons: z.array(reasonSchema.extend({ pointId: z.number() })),
  points: z.array(todayPointSchema),
  /** Apparatus to mount before the class (PRODUCT.md §4.7). */
  changeovers: z.array(changeoverSchema).default([]),
});
export type TodaySession = z.infer<typeof todaySessionSchema>;

export const todaySchema = z.object({
  studioDay: z.string(),
  timeZone: z.string(),
  sessions: z.array(todaySessionSchema),
  points: z.array(todayPointSchema),
});
export type Today = z.infer<typeof todaySchema>;

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
