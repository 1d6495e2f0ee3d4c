import { TZDate } from '@date-fns/tz';

/*
 * The calendar shows the studio's wall clock whatever the browser's zone. FullCalendar runs in
 * 'UTC' and is fed "floating" times: a Date whose UTC fields are the studio's wall-clock fields
 * (18:00 in the studio is 18:00Z to the calendar). These helpers convert between real instants
 * and that floating form; DST is handled by @date-fns/tz with the studio's IANA zone.
 */

/** A real instant → the floating Date the calendar draws it at. */
export function toFloating(instant: Date | string, timeZone: string): Date {
  const l = new TZDate(new Date(instant).getTime(), timeZone);
  return new Date(Date.UTC(l.getFullYear(), l.getMonth(), l.getDate(), l.getHours(), l.getMinutes(), l.getSeconds()));
}

/** A floating Date from the calendar → the real instant in the studio's zone. */
export function fromFloating(floating: Date, timeZone: string): Date {
  const d = floating;
  return new Date(new TZDate(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate(), d.getUTCHours(), d.getUTCMinutes(), d.getUTCSeconds(), timeZone).getTime());
}

const pad = (n: number) => String(n).padStart(2, '0');

/** The studio's calendar day and clock time of an instant: { date: 'YYYY-MM-DD', time: 'HH:mm' }. */
export function wallParts(instant: Date | string, timeZone: string): { date: string; time: string } {
  const f = toFloating(instant, timeZone);
  return { date: floatingDay(f), time: `${pad(f.getUTCHours())}:${pad(f.getUTCMinutes())}` };
}

/** 'YYYY-MM-DD' of a floating Date. */
export function floatingDay(f: Date): string {
  return `${f.getUTCFullYear()}-${pad(f.getUTCMonth() + 1)}-${pad(f.getUTCDate())}`;
}

/** A studio day and clock time ('2026-12-03', '18:00') → the instant, or null if either is malformed. */
export function instantFromWall(date: string, time: string, timeZone: string): Date | null {
  const d = /^(\d{4})-(\d{2})-(\d{2})$/.exec(date);
  const t = /^(\d{2}):(\d{2})$/.exec(time);
  if (!d || !t) return null;
  const floating = new Date(Date.UTC(Number(d[1]), Number(d[2]) - 1, Number(d[3]), Number(t[1]), Number(t[2])));
  return Number.isNaN(floating.getTime()) ? null : fromFloating(floating, timeZone);
}

/** The ISO string (no offset) the calendar reads as floating wall time. */
export function floatingIso(instant: Date | string, timeZone: string): string {
  return toFloating(instant, timeZone).toISOString().slice(0, 19);
}

/** The studio's wall clock now, as the calendar's "now". */
export const floatingNow = (timeZone: string) => toFloating(new Date(), timeZone);

/** Minutes since midnight of a 'HH:mm' string. */
export function minutesOf(time: string): number | null {
  const t = /^(\d{2}):(\d{2})$/.exec(time);
  return t ? Number(t[1]) * 60 + Number(t[2]) : null;
}

/** 'HH:mm' plus some minutes, wrapping at midnight. */
export function addMinutes(time: string, minutes: number): string {
  const m = minutesOf(time);
  if (m === null) return time;
  const total = (((m + minutes) % 1440) + 1440) % 1440;
  return `${pad(Math.floor(total / 60))}:${pad(total % 60)}`;
}

/** The weekday (0 = Monday … 6 = Sunday) of a 'YYYY-MM-DD' studio day. */
export function weekdayIndex(date: string): number | null {
  const d = /^(\d{4})-(\d{2})-(\d{2})$/.exec(date);
  if (!d) return null;
  return (new Date(Date.UTC(Number(d[1]), Number(d[2]) - 1, Number(d[3]))).getUTCDay() + 6) % 7;
}
