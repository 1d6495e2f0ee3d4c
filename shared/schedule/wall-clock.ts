import { TZDate } from '@date-fns/tz';

/**
 * Wall-clock time in a zone, carried as "UTC-shaped local time": the instant whose UTC fields are
 * the local fields. Differences between two such values are wall-clock differences (a move from
 * Tuesday 18:00 to Wednesday 18:00 is 24 h of wall clock whatever the clocks do in between).
 */
export function floatingOf(instant: Date, timeZone: string): number {
  const l = new TZDate(instant.getTime(), timeZone);
  return Date.UTC(l.getFullYear(), l.getMonth(), l.getDate(), l.getHours(), l.getMinutes(), l.getSeconds(), l.getMilliseconds());
}

/** Minutes the zone is ahead of UTC at an instant. */
function offsetMs(ms: number, timeZone: string): number {
  return -new TZDate(ms, timeZone).getTimezoneOffset() * 60_000;
}

/**
 * The instant of a wall-clock time in a zone, as RFC 5545 §3.3.5 reads a local time with a TZID:
 * a time the clocks pass twice (the night they go back) is the first of the two; a time they skip
 * (the night they go forward) is read with the offset before the gap, so 01:30 becomes 02:30 summer time.
 */
export function instantOfFloating(floating: number, timeZone: string): Date {
  const before = offsetMs(floating - 86_400_000, timeZone);
  const after = offsetMs(floating + 86_400_000, timeZone);
  const candidates = [...new Set([before, after])].map((o) => floating - o).filter((c) => c + offsetMs(c, timeZone) === floating);
  if (candidates.length) return new Date(Math.min(...candidates));
  return new Date(floating - before);
}

/** `instant` moved by `deltaMs` of wall-clock time in the zone (18:00 stays 18:00 across a clock change). */
export function shiftWallClock(instant: Date, deltaMs: number, timeZone: string): Date {
  return instantOfFloating(floatingOf(instant, timeZone) + deltaMs, timeZone);
}

/** The wall-clock difference between two instants in the zone. */
export function wallClockDelta(from: Date, to: Date, timeZone: string): number {
  return floatingOf(to, timeZone) - floatingOf(from, timeZone);
}
