import { infiniteQueryOptions, queryOptions, useMutation } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '../../lib/api-client';
import { gearSchema, pointSchema } from '../../../shared/schemas/rig';
import { faultSchema, type CreateFault, type FaultFilters, type ResolveFault } from '../../../shared/schemas/safety';
import { pageSchema } from '../../../shared/schemas/page';
import type { GearKind } from '../../../shared/schemas/vocabulary';
import { useInvalidateSafety } from '../today/api';

function searchOf(params: Record<string, string | number | undefined>): string {
  const s = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) if (v !== undefined && v !== '') s.set(k, String(v));
  const text = s.toString();
  return text ? `?${text}` : '';
}

export const faultQueries = {
  all: ['faults'] as const,
  /** Open first, newest first, a page at a time (`fetchNextPage` for more). */
  list: (filters: FaultFilters = {}) =>
    infiniteQueryOptions({
      queryKey: [...faultQueries.all, 'list', filters],
      queryFn: ({ pageParam }) => api(`/faults${searchOf({ ...filters, cursor: pageParam })}`, { schema: pageSchema(faultSchema) }),
      initialPageParam: undefined as string | undefined,
      getNextPageParam: (last) => last.nextCursor ?? undefined,
    }),
  detail: (id: number) => queryOptions({ queryKey: [...faultQueries.all, 'detail', id], queryFn: () => api(`/faults/${id}`, { schema: faultSchema }) }),
  // What a fault is about, and the stock a replacement comes from; kept under this feature's keys.
  point: (id: number) => queryOptions({ queryKey: [...faultQueries.all, 'point', id], queryFn: () => api(`/points/${id}`, { schema: pointSchema }) }),
  points: () => queryOptions({ queryKey: [...faultQueries.all, 'points'], queryFn: () => api('/points', { schema: z.array(pointSchema) }), staleTime: 60_000 }),
  gear: (id: number) => queryOptions({ queryKey: [...faultQueries.all, 'gear', id], queryFn: () => api(`/gear/${id}`, { schema: gearSchema }) }),
  stock: (kind: GearKind) =>
    queryOptions({ queryKey: [...faultQueries.all, 'stock', kind], queryFn: () => api(`/gear${searchOf({ mounted: 'no', status: 'in_service', kind })}`, { schema: z.array(gearSchema) }) }),
};

export interface FaultReport extends Pick<CreateFault, 'severity' | 'description'> {
  pointId?: number;
  gearId?: number;
  photos: File[];
}

/** Multipart when there are photos (the phone's camera), plain JSON otherwise. */
function reportBody(r: FaultReport): FormData | CreateFault {
  if (!r.photos.length) return { pointId: r.pointId, gearId: r.gearId, severity: r.severity, description: r.description };
  const form = new FormData();
  if (r.pointId !== undefined) form.set('pointId', String(r.pointId));
  if (r.gearId !== undefined) form.set('gearId', String(r.gearId));
  form.set('severity', r.severity);
  form.set('description', r.description);
  for (const p of r.photos) form.append('photos', p, p.name);
  return form;
}

export function useReportFault() {
  const invalidate = useInvalidateSafety();
  return useMutation({
    mutationFn: (r: FaultReport) => api('/faults', { method: 'POST', body: reportBody(r), schema: faultSchema }),
    onSuccess: () => void invalidate(),
  });
}

export function useResolveFault() {
  const invalidate = useInvalidateSafety();
  return useMutation({
    mutationFn: ({ id, ...body }: ResolveFault & { id: number }) => api(`/faults/${id}/resolve`, { method: 'POST', body, schema: faultSchema }),
    onSuccess: () => void invalidate(),
  });
}
