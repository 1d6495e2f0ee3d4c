import * as rruleModule from 'rrule';
import type { Options } from 'rrule';

// rrule ships CommonJS to Node (named exports only under `default`) and ES modules to bundlers;
// `default` is read dynamically so the bundler does not warn about an export its build lacks.
const { RRule } = ((Reflect.get(rruleModule, 'default') as typeof rruleModule | undefined) ?? rruleModule) as typeof rruleModule;
import { TZDate } from '@date-fns/tz';
import { format } from 'date-fns';

/** Longest series we expand, whatever the rule says (about two years of a weekly class). */
export const MAX_OCCURRENCES = 110;

export class RecurrenceError extends Error {}

/** Parses the RRULE part (no DTSTART) of RFC 5545 §3.3.10, refusing what a class series cannot use. */
export function parseRule(rule: string): Partial<Options> {
  const text = rule.trim().replace(/^RRULE:/i, '');
  if (!/^FREQ=/i.test(text) && !/;FREQ=/i.test(text)) throw new RecurrenceError('The rule needs a FREQ, e.g. FREQ=WEEKLY;BYDAY=TU;COUNT=10');
  // rrule's own parser is lenient (BYDAY=XX becomes null); check the grammar we accept first.
  const day = '(?:[+-]?\\d{1,2})?(?:MO|TU|WE|TH|FR|SA|SU)';
  const grammar: Record<string, RegExp> = {
    FREQ: /^(YEARLY|MONTHLY|WEEKLY|DAILY|HOURLY|MINUTELY|SECONDLY)$/,
    INTERVAL: /^[1-9]\d{0,2}$/,
    COUNT: /^[1-9]\d{0,3}$/,
    UNTIL: /^\d{8}(T\d{6}Z?)?$/,
    BYDAY: new RegExp(`^${day}(,${day})*$`),
    BYMONTHDAY: /^-?\d{1,2}(,-?\d{1,2})*$/,
    BYMONTH: /^\d{1,2}(,\d{1,2})*$/,
    BYSETPOS: /^-?\d{1,3}(,-?\d{1,3})*$/,
    WKST: /^(MO|TU|WE|TH|FR|SA|SU)$/,
  };
  const seen = new Set<string>();
  for (const part of text.toUpperCase().split(';')) {
    const [key, value, extra] = part.split('=');
    if (extra !== undefined || !value || !grammar[key] || !grammar[key].test(value) || seen.has(key)) {
      throw new RecurrenceError(`The repeat rule has a part we cannot use: “${part}”. Use e.g. FREQ=WEEKLY;BYDAY=TU,TH;COUNT=10`);
    }
    seen.add(key);
  }
  if (seen.has('COUNT') && seen.has('UNTIL')) throw new RecurrenceError('Give COUNT or UNTIL, not both.');
  let options: Partial<Options>;
  try {
    options = RRule.parseString(text);
  } catch {
    throw new RecurrenceError('The repeat rule could not be read. Use RFC 5545 form, e.g. FREQ=WEEKLY;BYDAY=TU,TH;UNTIL=20270331T235959Z');
  }
  if (options.freq === undefined || options.freq === null) throw new RecurrenceError('The rule needs a FREQ.');
  if (options.freq > RRule.DAILY) throw new RecurrenceError('Classes repeat daily, weekly, monthly or yearly, not hourly or faster.');
  if (options.dtstart) throw new RecurrenceError('Give the first class’s start separately, not as DTSTART in the rule.');
  return options;
}

/**
 * Expands a series in the studio's zone: each occurrence keeps the first class's wall-clock time
 * (18:00 stays 18:00 across a clock change), as RFC 5545 does for a DTSTART with a TZID.
 * rrule works in UTC, so the wall clock is carried as "UTC-shaped local time" and converted back.
 */
export function expandSeries(rule: string, firstStart: Date, timeZone: string, opts: { skipDays?: string[]; max?: number } = {}): Date[] {
  const options = parseRule(rule);
  const local = new TZDate(firstStart.getTime(), timeZone);
  const floating = new Date(Date.UTC(local.getFullYear(), local.getMonth(), local.getDate(), local.getHours(), local.getMinutes(), local.getSeconds()));
  const max = opts.max ?? MAX_OCCURRENCES;
  const until = options.until ? toFloating(options.until, timeZone) : null;
  const rrule = new RRule({ ...options, dtstart: floating, until, tzid: null });
  const skip = new Set(opts.skipDays ?? []);
  const out: Date[] = [];
  rrule.all((d, i) => {
    if (i >= max) return false;
    const instant = new TZDate(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate(), d.getUTCHours(), d.getUTCMinutes(), d.getUTCSeconds(), timeZone);
    if (!skip.has(format(instant, 'yyyy-MM-dd'))) out.push(new Date(instant.getTime()));
    return true;
  });
  return out;
}

/** An UNTIL given in UTC, as wall-clock time in the zone (the form the floating expansion uses). */
function toFloating(until: Date, timeZone: string): Date {
  const l = new TZDate(until.getTime(), timeZone);
  return new Date(Date.UTC(l.getFullYear(), l.getMonth(), l.getDate(), l.getHours(), l.getMinutes(), l.getSeconds()));
}

export function isOpenEnded(rule: string): boolean {
  const o = parseRule(rule);
  return !o.count && !o.until;
}
