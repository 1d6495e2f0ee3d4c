import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '../../lib/api-client';
import {
  documentSchema,
  gearEventSchema,
  gearSchema,
  loadCheckSchema,
  pointSchema,
  roomSchema,
  type CreateGear,
  type CreatePoint,
  type CreateRoom,
  type GearEventBody,
  type GearListQuery,
  type LoadPathBody,
  type UpdateGear,
  type UpdatePoint,
} from '../../../shared/schemas/rig';
import { classTypeSchema, type ClassType } from '../../../shared/schemas/class-types';

export type { ClassType };

// Shapes the rig pages read that shared/ has no schema for (yet).
export const roomDetailSchema = z.object({ id: z.number(), name: z.string(), points: z.array(pointSchema) });
export const savedPathSchema = z.object({ id: z.number(), voided: z.boolean(), changed: z.boolean().optional() });
/** What the pages need from a create's answer; the rest of the record comes back on the next read. */
const createdSchema = z.object({ id: z.number() });
export const gearDetailSchema = gearSchema.extend({ events: z.array(gearEventSchema) });
export type GearDetail = z.infer<typeof gearDetailSchema>;
/** A class type's id, or a profile typed by hand (body mass left out means the policy's). */
export type LoadProfileQuery = { classTypeId: number } | { performers: number; dynamicFactor: number; bodyMassKg?: number };
export type DocumentOwner = { type: 'points' | 'gear'; id: number };

function searchOf(params: Record<string, string | number | undefined>): string {
  const s = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) if (v !== undefined && v !== '') s.set(k, String(v));
  const text = s.toString();
  return text ? `?${text}` : '';
}

export const rigQueries = {
  all: ['rig'] as const,
  rooms: () => queryOptions({ queryKey: [...rigQueries.all, 'rooms'], queryFn: () => api('/rooms', { schema: z.array(roomSchema) }) }),
  room: (id: number) => queryOptions({ queryKey: [...rigQueries.all, 'rooms', id], queryFn: () => api(`/rooms/${id}`, { schema: roomDetailSchema }) }),
  points: (roomId?: number) =>
    queryOptions({ queryKey: [...rigQueries.all, 'points', { roomId }], queryFn: () => api(`/points${searchOf({ roomId })}`, { schema: z.array(pointSchema) }) }),
  point: (id: number) => queryOptions({ queryKey: [...rigQueries.all, 'point', id], queryFn: () => api(`/points/${id}`, { schema: pointSchema }) }),
  loadCheck: (id: number, profile: LoadProfileQuery) =>
    queryOptions({
      queryKey: [...rigQueries.all, 'point', id, 'load-check', profile],
      queryFn: () => api(`/points/${id}/load-check${searchOf(profile)}`, { schema: loadCheckSchema }),
    }),
  documents: (owner: DocumentOwner) =>
    queryOptions({
      queryKey: [...rigQueries.all, owner.type === 'points' ? 'point' : 'gear-item', owner.id, 'documents'],
      queryFn: () => api(`/${owner.type}/${owner.id}/documents`, { schema: z.array(documentSchema) }),
    }),
  gearList: (filters: GearListQuery = {}) =>
    queryOptions({ queryKey: [...rigQueries.all, 'gear', filters], queryFn: () => api(`/gear${searchOf(filters)}`, { schema: z.array(gearSchema) }) }),
  gearItem: (id: number) => queryOptions({ queryKey: [...rigQueries.all, 'gear-item', id], queryFn: () => api(`/gear/${id}`, { schema: gearDetailSchema }) }),
  classTypes: () =>
    queryOptions({ queryKey: [...rigQueries.all, 'class-types'], queryFn: () => api('/class-types', { schema: z.array(classTypeSchema) }), staleTime: 60_000 }),
};

/**
 * Rig mutations. A change to gear or a path moves the status of points, so each one refreshes the
 * whole register rather than guessing which lists it touched.
 */
export function useRigMutations() {
  const qc = useQueryClient();
  const invalidate = () => qc.invalidateQueries({ queryKey: rigQueries.all });
  return {
    createRoom: useMutation({ mutationFn: (body: CreateRoom) => api('/rooms', { method: 'POST', body, schema: createdSchema.extend({ name: z.string() }) }), onSuccess: invalidate }),
    createPoint: useMutation({ mutationFn: (body: CreatePoint) => api('/points', { method: 'POST', body, schema: createdSchema.extend({ label: z.string() }) }), onSuccess: invalidate }),
    updatePoint: useMutation({
      mutationFn: ({ id, ...body }: UpdatePoint & { id: number }) => api(`/points/${id}`, { method: 'PATCH', body, schema: createdSchema }),
      onSuccess: invalidate,
    }),
    saveLoadPath: useMutation({
      mutationFn: ({ id, body }: { id: number; body: LoadPathBody }) => api(`/points/${id}/load-path`, { method: 'PUT', body, schema: savedPathSchema }),
      onSuccess: invalidate,
    }),
    createGear: useMutation({ mutationFn: (body: CreateGear) => api('/gear', { method: 'POST', body, schema: createdSchema.extend({ serial: z.string() }) }), onSuccess: invalidate }),
    updateGear: useMutation({
      mutationFn: ({ id, ...body }: UpdateGear & { id: number }) => api(`/gear/${id}`, { method: 'PATCH', body, schema: createdSchema }),
      onSuccess: invalidate,
    }),
    retire: useMutation({
      mutationFn: ({ id, reason }: { id: number; reason: string }) => api(`/gear/${id}/retire`, { method: 'POST', body: { reason } }),
      onSuccess: invalidate,
    }),
    quarantine: useMutation({
      mutationFn: ({ id, reason }: { id: number; reason: string }) => api(`/gear/${id}/quarantine`, { method: 'POST', body: { reason } }),
      onSuccess: invalidate,
    }),
    recordEvent: useMutation({
      mutationFn: ({ id, ...body }: GearEventBody & { id: number }) => api(`/gear/${id}/events`, { method: 'POST', body }),
      onSuccess: invalidate,
    }),
    mountApparatus: useMountApparatus(),
    upload: useMutation({
      mutationFn: ({ owner, file, kind }: { owner: DocumentOwner; file: File; kind: string }) => {
        const form = new FormData();
        form.set('kind', kind);
        form.set('file', file);
        return api(`/${owner.type}/${owner.id}/documents`, { method: 'POST', body: form });
      },
      onSuccess: invalidate,
    }),
  };
}

/**
 * PRODUCT.md §4.7: mount an apparatus on a point (riggers, and instructors doing a changeover on
 * Today). It moves what every class on the point hangs, so the schedule and Today refresh too.
 */
export function useMountApparatus() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ pointId, gearId }: { pointId: number; gearId: number }) => api(`/points/${pointId}/apparatus`, { method: 'POST', body: { gearId }, schema: z.object({ id: z.number(), changed: z.boolean(), movedFrom: z.string().nullable() }) }),
    onSuccess: () => Promise.all([['rig'], ['today'], ['sessions'], ['schedule']].map((queryKey) => qc.invalidateQueries({ queryKey }))),
  });
}
