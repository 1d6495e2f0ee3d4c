import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api-client';
import {
  feedStateSchema,
  myBookingListSchema,
  myBookingResultSchema,
  myProfileSchema,
  myWaiverSchema,
  newFeedSchema,
  publicStudioSchema,
  publicTimetableSchema,
  type SignWaiver,
} from '../../../shared/schemas/my';

/** The student's side and the public timetable (PRODUCT.md §11). */
export const studentPortalQueries = {
  all: ['student-portal'] as const,
  timetable: (from: string, to: string) =>
    queryOptions({
      queryKey: [...studentPortalQueries.all, 'timetable', from, to],
      queryFn: () => api(`/public/timetable?${new URLSearchParams({ from, to })}`, { schema: publicTimetableSchema }),
      staleTime: 30_000,
    }),
  studio: () => queryOptions({ queryKey: [...studentPortalQueries.all, 'studio'], queryFn: () => api('/public/studio', { schema: publicStudioSchema }), staleTime: 5 * 60_000 }),
  bookings: () => queryOptions({ queryKey: [...studentPortalQueries.all, 'bookings'], queryFn: () => api('/my/bookings', { schema: myBookingListSchema }) }),
  profile: () => queryOptions({ queryKey: [...studentPortalQueries.all, 'profile'], queryFn: () => api('/my/profile', { schema: myProfileSchema }) }),
  waiver: () => queryOptions({ queryKey: [...studentPortalQueries.all, 'waiver'], queryFn: () => api('/my/waiver', { schema: myWaiverSchema }) }),
  feed: () => queryOptions({ queryKey: [...studentPortalQueries.all, 'feed'], queryFn: () => api('/my/feed', { schema: feedStateSchema }) }),
};

export function useBookMyself() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (sessionId: number) => api('/my/bookings', { method: 'POST', body: { sessionId }, schema: myBookingResultSchema }),
    onSettled: () => qc.invalidateQueries({ queryKey: studentPortalQueries.all }),
  });
}

export function useCancelMyBooking() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: number) => api(`/my/bookings/${id}/cancel`, { method: 'POST', body: {} }),
    onSettled: () => qc.invalidateQueries({ queryKey: studentPortalQueries.all }),
  });
}

export function useSignWaiver() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: SignWaiver) => api('/my/waiver', { method: 'POST', body }),
    onSettled: () => qc.invalidateQueries({ queryKey: studentPortalQueries.all }),
  });
}

export function useRenewFeed() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api('/my/feed', { method: 'POST', body: {}, schema: newFeedSchema }),
    onSettled: () => qc.invalidateQueries({ queryKey: studentPortalQueries.feed().queryKey }),
  });
}

export function useRevokeFeed() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api('/my/feed', { method: 'DELETE' }),
    onSettled: () => qc.invalidateQueries({ queryKey: studentPortalQueries.feed().queryKey }),
  });
}

async function csrfToken(): Promise<string> {
  const res = await fetch('/auth/csrf', { credentials: 'same-origin' });
  return ((await res.json()) as { csrfToken: string }).csrfToken;
}

/**
 * Auth.js's e-mail flow: asks for a sign-in link. The answer is the same whether or not the address
 * is a student's (only a student gets the e-mail); a 429 means too many links were asked for.
 */
export async function askForSignInLink(email: string, next: string): Promise<void> {
  const form = new URLSearchParams({ email, csrfToken: await csrfToken(), callbackUrl: window.location.origin + next });
  const res = await fetch('/auth/signin/nodemailer', {
    method: 'POST',
    credentials: 'same-origin',
    headers: { 'Content-Type': 'application/x-www-form-urlencoded', 'X-Auth-Return-Redirect': '1' },
    body: form,
  });
  if (res.status === 429 || res.status === 400) {
    const body = (await res.json().catch(() => null)) as { error?: { message?: string } } | null;
    throw new Error(body?.error?.message ?? 'Check the e-mail address and try again.');
  }
  const body = (await res.json().catch(() => ({}))) as { url?: string };
  if (!res.ok || !body.url || new URL(body.url, window.location.origin).searchParams.has('error')) throw new Error('The link could not be sent just now. Try again in a minute.');
}
