import type { Policy } from '../schemas/policy';
import { addStudioDays, statusInstants } from './status';
import type { PointSnapshot } from './types';

/*
 * How long an answer worked out at `now` stays true while the data stays the same.
 *
 * With the records unchanged, a status moves only when the clock passes certain instants: a
 * clearance or an apparatus inspection running out, gear reaching its service life, a class
 * starting or ending, the studio day turning. Those are exact instants and are collected as they
 * are. Two comparisons are not exact instants: "is X inside the warning window", X ≤ now plus the
 * warning days in studio calendar days (expiring vs cleared, and whether a due inspection makes a
 * class at risk). Zone offsets make the crossing hard to name, so it is bounded instead: the
 * window's end is never more than WINDOW_SLACK_MS away from now + days × 24 h. Far from the
 * crossing the answer cannot change before the bound; near it, the answer is re-asked whenever the
 * cached result is used (`stillValid`), which costs one zone conversion.
 */

const DAY_MS = 86_400_000;
/** Larger than any shift of a zone's offset over a warning window (DST moves an hour). */
export const WINDOW_SLACK_MS = 26 * 3_600_000;

export interface Validity {
  /** Computed at (ms). A clock set back before it invalidates the answer. */
  from: number;
  /** Exclusive end (ms): at or after it the answer must be worked out again. */
  until: number;
  /** Warning-window questions whose answer must not have changed. */
  windows: Array<{ instant: number; open: boolean }>;
}

/** Whether `instant` lies inside the warning window that starts at `now` (`≤`, as the status rules ask). */
export function insideWarningWindow(instant: number, now: Date, policy: Policy): boolean {
  return instant <= addStudioDays(now, policy.warningDays, policy.timeZone).getTime();
}

export interface ValidityTracker {
  /** The instant the answer is worked out at. */
  readonly now: Date;
  /** The answer may change when the clock reaches `t`. */
  instant(t: Date | number | null | undefined): void;
  /** The answer depends on whether `t` is inside the warning window starting now. */
  window(t: Date | number | null | undefined): void;
  /** Every instant at which the point's status rules can change their answer, and its window test. */
  snapshot(s: PointSnapshot): void;
  /**
   * A booked class: it starts and ends, its points' statuses are read at its start (or now, once
   * under way), and whether it is at risk depends on its start being inside the warning window.
   */
  session(s: { startsAt: Date; endsAt: Date; points: PointSnapshot[] }): void;
  /** Never longer than `ms` from now. */
  atMost(ms: number): void;
  result(): Validity;
}

const ms = (t: Date | number) => (typeof t === 'number' ? t : t.getTime());

export function validityTracker(policy: Policy, now: Date): ValidityTracker {
  const at = now.getTime();
  let until = Number.POSITIVE_INFINITY;
  const windows = new Map<number, boolean>();
  const tracker: ValidityTracker = {
    now,
    instant(t) {
      if (t == null) return;
      const v = ms(t);
      if (v > at && v < until) until = v;
    },
    window(t) {
      if (t == null) return;
      const v = ms(t);
      const nominal = at + policy.warningDays * DAY_MS;
      if (v > nominal + WINDOW_SLACK_MS) tracker.instant(v - policy.warningDays * DAY_MS - WINDOW_SLACK_MS);
      else if (v > nominal - WINDOW_SLACK_MS && !windows.has(v)) windows.set(v, insideWarningWindow(v, now, policy));
      // Otherwise it is inside the window and stays inside as time goes on.
    },
    snapshot(s) {
      const { until, instants } = statusInstants(s, policy);
      for (const t of instants) tracker.instant(t);
      tracker.window(until);
    },
    session({ startsAt, endsAt, points }) {
      tracker.instant(startsAt);
      tracker.instant(endsAt);
      tracker.window(startsAt);
      for (const p of points) tracker.snapshot(p);
    },
    atMost(limit) {
      tracker.instant(at + limit);
    },
    result: () => ({ from: at, until, windows: [...windows].map(([instant, open]) => ({ instant, open })) }),
  };
  return tracker;
}

/** Whether an answer with validity `v` still holds at `now`, the data being unchanged. */
export function stillValid(v: Validity, now: Date, policy: Policy): boolean {
  const t = now.getTime();
  if (t < v.from || t >= v.until) return false;
  return v.windows.every((w) => insideWarningWindow(w.instant, now, policy) === w.open);
}
