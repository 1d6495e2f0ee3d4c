import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { api, ApiError } from '../../lib/api-client';
import { classRecordPageSchema, pointVerdictSchema, sessionSchema, type AvailabilityQuery, type CreateSession, type UpdateSession, type CancelSession, type SwapPointsInput } from '../../../shared/schemas/sessions';
import { classTypeSchema, type CreateClassType, type UpdateClassType } from '../../../shared/schemas/class-types';
import { reasonSchema, roomSchema } from '../../../shared/schemas/rig';

export type { Session } from '../../../shared/schemas/sessions';

// Answers shared/ has no schema for: the extras of a create, alternatives, availability, a 409's details.
const createdSchema = sessionSchema.extend({
  sessionIds: z.array(z.number()),
  warnings: z.array(reasonSchema.extend({ pointId: z.number().optional(), startsAt: z.string().optional() })),
  skipped: z.array(z.object({ startsAt: z.string() }).loose()).default([]),
});
export type CreatedSessions = z.infer<typeof createdSchema>;

export const alternativeSchema = z.object({ pointId: z.number(), label: z.string(), roomId: z.number(), roomName: z.string(), sameRoom: z.boolean(), warnings: z.array(reasonSchema) });
export type Alternative = z.infer<typeof alternativeSchema>;

export const availabilitySchema = z.object({ points: z.array(pointVerdictSchema), reasons: z.array(reasonSchema) });
export type Availability = z.infer<typeof availabilitySchema>;

const pointReasons = z.object({ pointId: z.number(), reasons: z.array(reasonSchema) });
export const conflictSchema = z.object({
  points: z.array(pointReasons).default([]),
  reasons: z.array(reasonSchema).default([]),
  /** A series booked, or changed "this and the following": every class that cannot be, with its reasons. */
  occurrences: z.array(z.object({ sessionId: z.number().optional(), startsAt: z.string(), endsAt: z.string().optional(), points: z.array(pointReasons), reasons: z.array(reasonSchema) })).optional(),
  bookable: z.number().optional(),
  total: z.number().optional(),
  startsAt: z.string().optional(),
});
export type Conflict = z.infer<typeof conflictSchema>;
export type ConflictOccurrence = NonNullable<Conflict['occurrences']>[number];

/** The details of a 409 `points_unavailable`, or null for any other error. */
export function conflictOf(err: unknown): Conflict | null {
  if (!(err instanceof ApiError) || err.status !== 409 || err.code !== 'points_unavailable') return null;
  const parsed = conflictSchema.safeParse(err.details);
  return parsed.success ? parsed.data : { points: [], reasons: [] };
}

export interface SessionRange {
  from: string;
  to: string;
  roomId?: number;
  instructorId?: number;
}

function searchOf(params: Record<string, string | number | undefined>): string {
  const s = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) if (v !== undefined && v !== '') s.set(k, String(v));
  const text = s.toString();
  return text ? `?${text}` : '';
}

export const scheduleQueries = {
  all: ['schedule'] as const,
  /** A point's classes as each stood at its start, newest first (a page of 25). */
  pointRecords: (pointId: number) =>
    queryOptions({ queryKey: [...scheduleQueries.all, 'point-records', pointId], queryFn: () => api(`/points/${pointId}/records?limit=25`, { schema: classRecordPageSchema }) }),
  sessions: () => [...scheduleQueries.all, 'sessions'] as const,
  range: (r: SessionRange) =>
    queryOptions({
      queryKey: [...scheduleQueries.sessions(), 'range', r],
      queryFn: ({ signal }) => api(`/sessions${searchOf({ ...r })}`, { schema: z.array(sessionSchema), signal }),
    }),
  detail: (id: number) => queryOptions({ queryKey: [...scheduleQueries.sessions(), 'detail', id], queryFn: () => api(`/sessions/${id}`, { schema: sessionSchema }) }),
  alternatives: (id: number) =>
    queryOptions({ queryKey: [...scheduleQueries.sessions(), 'detail', id, 'alternatives'], queryFn: () => api(`/sessions/${id}/alternatives`, { schema: z.array(alternativeSchema) }) }),
  availability: (q: AvailabilityQuery) =>
    queryOptions({
      queryKey: [...scheduleQueries.all, 'availability', q],
      queryFn: ({ signal }) => api(`/sessions/availability${searchOf({ ...q })}`, { schema: availabilitySchema, signal }),
      staleTime: 0,
    }),
  classTypes: () => queryOptions({ queryKey: [...scheduleQueries.all, 'class-types'], queryFn: () => api('/class-types', { schema: z.array(classTypeSchema) }), staleTime: 60_000 }),
  rooms: () => queryOptions({ queryKey: [...scheduleQueries.all, 'rooms'], queryFn: () => api('/rooms', { schema: z.array(roomSchema) }), staleTime: 60_000 }),
};

/** Every write re-reads the schedule (ranges, details, availability); the server re-checks each one. */
export function useScheduleMutations() {
  const qc = useQueryClient();
  const invalidate = () => qc.invalidateQueries({ queryKey: scheduleQueries.all });
  return {
    book: useMutation({ mutationFn: (body: CreateSession) => api('/sessions', { method: 'POST', body, schema: createdSchema }), onSettled: invalidate }),
    update: useMutation({
      mutationFn: ({ id, ...body }: UpdateSession & { id: number }) => api(`/sessions/${id}`, { method: 'PATCH', body, schema: sessionSchema }),
      onSettled: invalidate,
    }),
    swapPoints: useMutation({
      // With `roomId` the class moves to that room on those points.
      mutationFn: ({ id, ...body }: SwapPointsInput & { id: number }) => api(`/sessions/${id}/points`, { method: 'PUT', body, schema: sessionSchema }),
      onSettled: invalidate,
    }),
    cancel: useMutation({
      mutationFn: ({ id, ...body }: CancelSession & { id: number }) => api(`/sessions/${id}/cancel`, { method: 'POST', body, schema: sessionSchema }),
      onSettled: invalidate,
    }),
    createClassType: useMutation({
      mutationFn: (body: CreateClassType) => api('/class-types', { method: 'POST', body, schema: classTypeSchema }),
      onSuccess: (created) => {
        // Into the list at once, so a form can select it before the list is re-read.
        qc.setQueryData(scheduleQueries.classTypes().queryKey, (old) => (old ? [...old.filter((c) => c.id !== created.id), created] : [created]));
        return qc.invalidateQueries({ queryKey: scheduleQueries.classTypes().queryKey });
      },
    }),
    /** Rename, retire or bring back a class type. */
    updateClassType: useMutation({
      mutationFn: ({ id, ...body }: UpdateClassType & { id: number }) => api(`/class-types/${id}`, { method: 'PATCH', body, schema: classTypeSchema }),
      // Class names show on the calendar too.
      onSettled: invalidate,
    }),
  };
}
