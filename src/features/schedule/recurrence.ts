import { expandSeries, MAX_OCCURRENCES, RecurrenceError } from '../../../shared/schedule/recurrence';
import { instantFromWall } from './zone';

/** The server's cap on one series. */
export const MAX_CLASSES = MAX_OCCURRENCES;

export const weekdays = [
  { code: 'MO', short: 'Mo', long: 'Monday' },
  { code: 'TU', short: 'Tu', long: 'Tuesday' },
  { code: 'WE', short: 'We', long: 'Wednesday' },
  { code: 'TH', short: 'Th', long: 'Thursday' },
  { code: 'FR', short: 'Fr', long: 'Friday' },
  { code: 'SA', short: 'Sa', long: 'Saturday' },
  { code: 'SU', short: 'Su', long: 'Sunday' },
] as const;
export type WeekdayCode = (typeof weekdays)[number]['code'];

export interface RepeatChoice {
  kind: 'none' | 'weekly';
  days: WeekdayCode[];
  ends: 'until' | 'count';
  /** Studio day 'YYYY-MM-DD' of the last possible class. */
  until: string;
  count: number;
}

const stamp = (d: Date) => d.toISOString().replace(/[-:]/g, '').replace(/\.\d{3}/, '');

/**
 * The RFC 5545 RRULE for a weekly repeat, e.g. FREQ=WEEKLY;BYDAY=TU,TH;COUNT=10.
 * UNTIL is the end of the chosen day in the studio's zone, written in UTC as the RFC asks, so
 * an evening class on that day is still included whatever the zone's offset.
 */
export function buildRrule(r: RepeatChoice, timeZone: string): string | undefined {
  if (r.kind === 'none' || r.days.length === 0) return undefined;
  const order = weekdays.map((w) => w.code);
  const days = [...r.days].sort((a, b) => order.indexOf(a) - order.indexOf(b)).join(',');
  // No rule for a count the form refuses anyway: the preview then says so in words, not "COUNT=0".
  if (r.ends === 'count') return Number.isInteger(r.count) && r.count >= 1 ? `FREQ=WEEKLY;BYDAY=${days};COUNT=${r.count}` : undefined;
  const endOfDay = instantFromWall(r.until, '23:59', timeZone);
  if (!endOfDay) return undefined;
  return `FREQ=WEEKLY;BYDAY=${days};UNTIL=${stamp(new Date(endOfDay.getTime() + 59_000))}`;
}

/** The classes a rule gives from a first start, for the dialog's preview; the server expands the same way when booking. */
export function previewSeries(rule: string, firstStart: Date, timeZone: string, skipDays: string[]): { starts: Date[]; error?: string } {
  try {
    return { starts: expandSeries(rule, firstStart, timeZone, { skipDays, max: MAX_OCCURRENCES }) };
  } catch (err) {
    return { starts: [], error: err instanceof RecurrenceError ? err.message : 'The repeat could not be read. Check the days and the end.' };
  }
}
