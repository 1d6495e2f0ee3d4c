import { infiniteQueryOptions, queryOptions, useMutation } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '../../lib/api-client';
import { studioMidnight } from '../../lib/studio-day';
import { gearSchema, pointSchema } from '../../../shared/schemas/rig';
import {
  checklistSchema,
  clearanceResultSchema,
  inspectionSchema,
  type ClearanceBody,
  type GearInspectionBody,
  type InspectionLogQuery,
} from '../../../shared/schemas/safety';
import { pageSchema } from '../../../shared/schemas/page';
import { useInvalidateSafety } from '../today/api';

export type InspectionKind = NonNullable<InspectionLogQuery['kind']>;

/** The log's filters as a person types them: calendar days in the studio's zone, not instants. */
export interface LogFilters {
  from?: string;
  to?: string;
  kind?: InspectionKind;
  pointId?: number;
  gearId?: number;
}

/** The query string the log and its exports share: `to` includes the whole of its day. */
export function logSearch(f: LogFilters, timeZone: string, cursor?: string): string {
  const q: Omit<InspectionLogQuery, 'cursor'> & { cursor?: string } = {
    cursor,
    from: f.from ? studioMidnight(f.from, timeZone) : undefined,
    to: f.to ? studioMidnight(f.to, timeZone, true) : undefined,
    kind: f.kind,
    pointId: f.pointId,
    gearId: f.gearId,
  };
  const s = new URLSearchParams();
  for (const [k, v] of Object.entries(q)) if (v !== undefined && v !== '') s.set(k, String(v));
  const text = s.toString();
  return text ? `?${text}` : '';
}

export const inspectionQueries = {
  all: ['inspections'] as const,
  /** The log newest first, a page at a time (`fetchNextPage` for older ones). */
  log: (f: LogFilters, timeZone: string) =>
    infiniteQueryOptions({
      queryKey: [...inspectionQueries.all, 'log', logSearch(f, timeZone)],
      queryFn: ({ pageParam }) => api(`/inspections${logSearch(f, timeZone, pageParam)}`, { schema: pageSchema(inspectionSchema) }),
      initialPageParam: undefined as string | undefined,
      getNextPageParam: (last) => last.nextCursor ?? undefined,
    }),
  checklist: (pointId: number) => queryOptions({ queryKey: [...inspectionQueries.all, 'checklist', pointId], queryFn: () => api(`/points/${pointId}/checklist`, { schema: checklistSchema }) }),
  points: () => queryOptions({ queryKey: [...inspectionQueries.all, 'points'], queryFn: () => api('/points', { schema: z.array(pointSchema) }) }),
  /** Gear a rigger should look at on its own: quarantined, or its own inspection due within `days`. */
  gearDue: (days: number) =>
    queryOptions({
      queryKey: [...inspectionQueries.all, 'gear-due', days],
      queryFn: async () => {
        const [quarantined, due] = await Promise.all([
          api('/gear?status=quarantined', { schema: z.array(gearSchema) }),
          api(`/gear?status=in_service&inspectionDueDays=${days}`, { schema: z.array(gearSchema) }),
        ]);
        const seen = new Set<number>();
        return [...quarantined, ...due].filter((g) => !seen.has(g.id) && seen.add(g.id));
      },
    }),
};

export const exportCsvHref = (f: LogFilters, timeZone: string) => `/api/inspections/export.csv${logSearch(f, timeZone)}`;
/** Each booked point of the classes held in the same range and point, as recorded at each class's start. */
export const classesHeldCsvHref = (f: LogFilters, timeZone: string) => `/api/sessions/records/export.csv${logSearch(f, timeZone)}`;
/** The complete printable log (a page of its own, streamed by the server). */
export const printableHref = (f: LogFilters, timeZone: string) => `/api/inspections/export.html${logSearch(f, timeZone)}`;

export function useClearance(pointId: number) {
  const invalidate = useInvalidateSafety();
  return useMutation({
    mutationFn: (body: ClearanceBody) => api(`/points/${pointId}/clearances`, { method: 'POST', body, schema: clearanceResultSchema }),
    onSuccess: () => void invalidate(),
  });
}

export function useGearInspection(gearId: number) {
  const invalidate = useInvalidateSafety();
  return useMutation({
    mutationFn: (body: GearInspectionBody) => api(`/gear/${gearId}/inspections`, { method: 'POST', body, schema: z.object({ id: z.number() }) }),
    onSuccess: () => void invalidate(),
  });
}
