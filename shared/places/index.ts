/**
 * Places (PRODUCT.md §11), as pure rules for the server and the client: how many students a class
 * takes, which free place a student gets, the waitlist's order, whether a waiver holds and whether
 * a student may still cancel their own place.
 */

/**
 * A class's capacity: the lesser of the class type's capacity and the places on its points that can
 * take the class (each such point gives `performersPerPoint` places). A cancelled class takes no one.
 */
export function sessionCapacity(a: { classCapacity: number; performersPerPoint: number; usablePoints: number; cancelled?: boolean }): number {
  if (a.cancelled) return 0;
  return Math.max(0, Math.min(a.classCapacity, a.performersPerPoint * a.usablePoints));
}

/** A point of a class as placing sees it: whether it can take the class now and how many students it holds. */
export interface PointPlaces {
  pointId: number;
  label: string;
  usable: boolean;
  /** Students booked on it (booked or attended places). */
  taken: number;
}

/** Why a named point cannot take one more student, or null when it can. */
export function pointRefusal(p: PointPlaces | undefined, performersPerPoint: number): { code: string; message: string } | null {
  if (!p) return { code: 'point_not_in_session', message: 'That point is not one of this class’s points.' };
  if (!p.usable) return { code: 'point_unavailable', message: `Point ${p.label} cannot take this class now.` };
  if (p.taken >= performersPerPoint) return { code: 'point_full', message: `Point ${p.label} already has ${p.taken} of ${performersPerPoint} ${performersPerPoint === 1 ? 'place' : 'places'} taken.` };
  return null;
}

/**
 * The point a new student goes on: among usable points with a free place, the one with the fewest
 * students (performers spread over the rig), then in the class's point order. Null when none is free
 * or the class is at capacity.
 */
export function choosePoint(points: PointPlaces[], performersPerPoint: number, capacity: number): number | null {
  const booked = points.reduce((n, p) => n + p.taken, 0);
  if (booked >= capacity) return null;
  let best: PointPlaces | null = null;
  for (const p of points) {
    if (!p.usable || p.taken >= performersPerPoint) continue;
    if (!best || p.taken < best.taken) best = p;
  }
  return best?.pointId ?? null;
}

/** The waitlist in order: first waitlisted first; the id breaks a tie of the same instant. */
export function waitlistOrder<T extends { waitlistedAt: string | null; id: number }>(rows: T[]): T[] {
  return [...rows].sort((a, b) => (a.waitlistedAt ?? '').localeCompare(b.waitlistedAt ?? '') || a.id - b.id);
}

/**
 * When a waiver accepted at `acceptedAt` stops holding: the same day and time `months` calendar
 * months later (UTC), or the month's last day where that day does not exist (31 January + 1 month
 * → 28/29 February).
 */
export function waiverValidUntil(acceptedAt: Date, months: number): Date {
  const y = acceptedAt.getUTCFullYear();
  const m = acceptedAt.getUTCMonth() + months;
  const lastDay = new Date(Date.UTC(y, m + 1, 0)).getUTCDate();
  const d = new Date(acceptedAt.getTime());
  d.setUTCDate(1);
  d.setUTCFullYear(y, m, Math.min(acceptedAt.getUTCDate(), lastDay));
  return d;
}

export type WaiverState = 'valid' | 'expired' | 'missing';

/**
 * A student's waiver at `at` from their latest acceptance: `valid` while `at` is before its end,
 * `expired` after, `missing` with none. A newer waiver text does not void one signed before it: the
 * studio decides that by how long waivers hold.
 */
export function waiverStateAt(latest: { validUntil: string } | null, at: Date): WaiverState {
  if (!latest) return 'missing';
  return at.getTime() < new Date(latest.validUntil).getTime() ? 'valid' : 'expired';
}

/** The message check-in refuses with while a waiver does not hold. */
export function waiverRefusal(state: WaiverState, name: string): string {
  return state === 'expired'
    ? `${name}’s waiver has expired. Record a new signed waiver before checking them in.`
    : `${name} has not signed the waiver. Record a signed waiver before checking them in.`;
}

/** The warning a booking carries when the student's waiver does not hold at the class. */
export const waiverMissingWarning = (name: string) => ({ code: 'waiver_missing', message: `${name} has no valid waiver for this class: they must sign one before they can be checked in.` });

/**
 * Whether a student may still cancel their own place at `now`: up to `cutoffHours` before the
 * class starts (the desk may cancel any time).
 */
export function studentMayCancel(startsAt: Date, now: Date, cutoffHours: number): boolean {
  return now.getTime() <= startsAt.getTime() - cutoffHours * 3_600_000;
}
