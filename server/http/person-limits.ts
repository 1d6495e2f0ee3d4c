import type { RequestHandler } from 'express';
import { HttpError } from './errors';

/** How many of something one person may send in a window. */
export interface PersonLimit {
  max: number;
  windowMs: number;
}

/**
 * Per-person limits on work anyone signed in can ask for in bulk (PRODUCT.md §6: 429). Chosen so a
 * real studio never meets them — a bad evening is a handful of fault reports — while a script
 * sending thousands cannot starve bookings of the one write connection. Kept in process memory:
 * a second server process keeps its own count, which still bounds each process.
 */
export const DEFAULT_PERSON_LIMITS = {
  /** POST /api/faults, with or without photos. */
  faultReports: { max: 30, windowMs: 10 * 60_000 },
  /** Every request that carries files (fault photos, point and gear documents). */
  uploads: { max: 40, windowMs: 10 * 60_000 },
} satisfies Record<string, PersonLimit>;
export type PersonLimits = typeof DEFAULT_PERSON_LIMITS;

/**
 * Counts a signed-in person's requests to a route in a sliding window (the times of their last
 * `max` requests); runs after the role check, before any upload is read. Memory is bounded by the
 * people signed in: at most `max` times each, dropped once they fall out of the window.
 */
export function perPersonLimit(limit: PersonLimit, what: string, now: () => number = Date.now): RequestHandler {
  const minutes = Math.round(limit.windowMs / 60_000);
  const seen = new Map<number, number[]>();
  return (req, res, next) => {
    const id = req.user?.id;
    if (id === undefined) return next();
    const t = now();
    const recent = (seen.get(id) ?? []).filter((at) => at > t - limit.windowMs);
    if (recent.length >= limit.max) {
      seen.set(id, recent);
      res.setHeader('Retry-After', String(Math.max(1, Math.ceil((recent[0] + limit.windowMs - t) / 1000))));
      return next(
        new HttpError(429, 'rate_limited', `You have sent ${limit.max} ${what} in the last ${minutes} minutes, the most one person may. Wait a few minutes and try again; for anything urgent, tell a rigger in person.`, {
          limit: limit.max,
          windowMinutes: minutes,
        }),
      );
    }
    recent.push(t);
    seen.set(id, recent);
    // Forget people with nothing left in the window, so the map does not grow with everyone ever seen.
    if (seen.size > 1000) for (const [k, v] of seen) if (!v.some((at) => at > t - limit.windowMs)) seen.delete(k);
    next();
  };
}

/** One counter per limit for the whole app, shared by every route it guards (uploads are counted across routes). */
export function personLimiters(limits: PersonLimits) {
  return { faultReports: perPersonLimit(limits.faultReports, 'fault reports'), uploads: perPersonLimit(limits.uploads, 'uploads') };
}
export type PersonLimiters = ReturnType<typeof personLimiters>;
