import { infiniteQueryOptions, queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '../../lib/api-client';
import {
  studentDetailSchema,
  studentPageSchema,
  studentSchema,
  waiverAcceptanceSchema,
  waiverVersionSchema,
  type CreateStudent,
  type CreateWaiverVersion,
  type PaperWaiver,
  type UpdateStudent,
} from '../../../shared/schemas/students';
import { bookingResultSchema, sessionBookingListSchema, sessionPlacesSchema, type CheckIn, type CreateBooking } from '../../../shared/schemas/places';

/** `GET /api/waivers`: the current text for everyone; the owner also gets every version, newest first. */
export const waiversSchema = z.object({ current: waiverVersionSchema.nullable(), versions: z.array(waiverVersionSchema) });
/** A class's places as `GET /api/sessions/:id` gives them; each point also says whether it can take the class now. */
export const classPlacesSchema = sessionPlacesSchema.extend({
  pointStudents: z.array(sessionPlacesSchema.shape.pointStudents.element.extend({ usable: z.boolean().default(true) })),
});
export type ClassPlaces = z.infer<typeof classPlacesSchema>;

export type { Student, StudentDetail, StudentBooking, WaiverVersion, WaiverStatus } from '../../../shared/schemas/students';
export type { SessionBooking, BookingResult } from '../../../shared/schemas/places';

function searchOf(params: Record<string, string | number | undefined>): string {
  const s = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) if (v !== undefined && v !== '') s.set(k, String(v));
  const text = s.toString();
  return text ? `?${text}` : '';
}

export const studentsQueries = {
  all: ['students'] as const,
  /** The desk's list, a page at a time, name order; `q` matches a name, an e-mail or a phone. */
  list: (q: string) =>
    infiniteQueryOptions({
      queryKey: [...studentsQueries.all, 'list', q],
      queryFn: ({ pageParam, signal }) => api(`/students${searchOf({ q, cursor: pageParam })}`, { schema: studentPageSchema, signal }),
      initialPageParam: undefined as string | undefined,
      getNextPageParam: (last) => last.nextCursor ?? undefined,
    }),
  /** A few matches for a picker (book a student, merge into). */
  search: (q: string) =>
    queryOptions({
      queryKey: [...studentsQueries.all, 'search', q],
      queryFn: ({ signal }) => api(`/students${searchOf({ q, limit: 8 })}`, { schema: studentPageSchema, signal }),
      staleTime: 10_000,
    }),
  /** A student with their waiver, bookings ahead and past, and attendance. */
  detail: (id: number) => queryOptions({ queryKey: [...studentsQueries.all, 'detail', id], queryFn: () => api(`/students/${id}`, { schema: studentDetailSchema }) }),
  /** Every place of a class: booked first, then the waitlist in order, then the rest. */
  sessionBookings: (sessionId: number) =>
    queryOptions({ queryKey: [...studentsQueries.all, 'session', sessionId, 'bookings'], queryFn: () => api(`/sessions/${sessionId}/bookings`, { schema: sessionBookingListSchema }) }),
  /** A class's places: left, booked, waitlisted, each point's students, those without a fit place. */
  sessionPlaces: (sessionId: number) =>
    queryOptions({ queryKey: [...studentsQueries.all, 'session', sessionId, 'places'], queryFn: () => api(`/sessions/${sessionId}`, { schema: classPlacesSchema }) }),
  /** The current waiver text, and for the owner every version, newest first. */
  waivers: () => queryOptions({ queryKey: [...studentsQueries.all, 'waivers'], queryFn: () => api('/waivers', { schema: waiversSchema }) }),
};

// A place changes the class's figures (places left) on the schedule and the Today board too.
const touched = [studentsQueries.all, ['schedule'], ['today']] as const;
function useInvalidatePlaces() {
  const qc = useQueryClient();
  return () => Promise.all(touched.map((queryKey) => qc.invalidateQueries({ queryKey: [...queryKey] })));
}

export function useStudentMutations() {
  const qc = useQueryClient();
  const invalidate = () => qc.invalidateQueries({ queryKey: studentsQueries.all });
  const invalidatePlaces = useInvalidatePlaces();
  return {
    create: useMutation({ mutationFn: (body: CreateStudent) => api('/students', { method: 'POST', body, schema: studentSchema }), onSuccess: () => void invalidate() }),
    update: useMutation({
      mutationFn: ({ id, ...body }: UpdateStudent & { id: number }) => api(`/students/${id}`, { method: 'PATCH', body, schema: studentSchema }),
      onSuccess: () => void invalidate(),
    }),
    /** The duplicate `id` goes into `intoId`; its bookings and waivers move with it. */
    merge: useMutation({
      mutationFn: ({ id, intoId }: { id: number; intoId: number }) => api(`/students/${id}/merge`, { method: 'POST', body: { intoId } }),
      onSuccess: () => void invalidatePlaces(),
    }),
    recordWaiver: useMutation({
      mutationFn: ({ id, ...body }: PaperWaiver & { id: number }) => api(`/students/${id}/waiver`, { method: 'POST', body, schema: waiverAcceptanceSchema }),
      onSuccess: () => void invalidatePlaces(),
    }),
    publishWaiver: useMutation({ mutationFn: (body: CreateWaiverVersion) => api('/waivers', { method: 'POST', body, schema: waiverVersionSchema }), onSuccess: () => void invalidate() }),
  };
}

export function usePlaceMutations() {
  const invalidate = useInvalidatePlaces();
  return {
    book: useMutation({
      mutationFn: ({ sessionId, ...body }: CreateBooking & { sessionId: number }) => api(`/sessions/${sessionId}/bookings`, { method: 'POST', body, schema: bookingResultSchema }),
      onSettled: () => void invalidate(),
    }),
    cancel: useMutation({ mutationFn: (id: number) => api(`/bookings/${id}/cancel`, { method: 'POST', body: {} }), onSettled: () => void invalidate() }),
    checkIn: useMutation({ mutationFn: ({ id, outcome }: CheckIn & { id: number }) => api(`/bookings/${id}/check-in`, { method: 'POST', body: { outcome } }), onSettled: () => void invalidate() }),
    move: useMutation({ mutationFn: ({ id, pointId }: { id: number; pointId: number }) => api(`/bookings/${id}/move`, { method: 'POST', body: { pointId } }), onSettled: () => void invalidate() }),
  };
}
