import { queryOptions, useQuery } from '@tanstack/react-query';
import { api, ApiError } from '../../lib/api-client';
import { meSchema, type Me } from '../../../shared/schemas/staff';

export const authQueries = {
  all: ['auth'] as const,
  me: () =>
    queryOptions({
      queryKey: [...authQueries.all, 'me'],
      queryFn: async (): Promise<Me | null> => {
        try {
          return await api('/me', { schema: meSchema });
        } catch (err) {
          if (err instanceof ApiError && err.status === 401) return null;
          throw err;
        }
      },
      staleTime: 60_000,
    }),
};

export function useMe() {
  return useQuery(authQueries.me());
}

async function csrfToken(): Promise<string> {
  const res = await fetch('/auth/csrf', { credentials: 'same-origin' });
  const body = (await res.json()) as { csrfToken: string };
  return body.csrfToken;
}

/** Auth.js's credentials flow; it answers with the URL it would redirect to, which names an error on failure. */
export async function signIn(email: string, password: string): Promise<void> {
  const form = new URLSearchParams({ email, password, csrfToken: await csrfToken(), callbackUrl: window.location.origin + '/' });
  const res = await fetch('/auth/callback/credentials', {
    method: 'POST',
    credentials: 'same-origin',
    headers: { 'Content-Type': 'application/x-www-form-urlencoded', 'X-Auth-Return-Redirect': '1' },
    body: form,
  });
  if (res.status === 429) throw new ApiError(429, 'rate_limited', 'Too many failed sign-ins. Wait 15 minutes and try again.');
  const body = (await res.json().catch(() => ({}))) as { url?: string };
  if (!res.ok || !body.url || new URL(body.url, window.location.origin).searchParams.has('error')) {
    throw new ApiError(401, 'sign_in_failed', 'That e-mail and password do not match an active account.');
  }
}

export async function signOut(): Promise<void> {
  const form = new URLSearchParams({ csrfToken: await csrfToken(), callbackUrl: window.location.origin + '/sign-in' });
  await fetch('/auth/signout', {
    method: 'POST',
    credentials: 'same-origin',
    headers: { 'Content-Type': 'application/x-www-form-urlencoded', 'X-Auth-Return-Redirect': '1' },
    body: form,
  });
}
