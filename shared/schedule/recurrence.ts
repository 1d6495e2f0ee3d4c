import * as rruleModule from 'rrule';
import type { Options } from 'rrule';

// rrule ships CommonJS to Node (named exports only under `default`) and ES modules to bundlers;
// `default` is read dynamically so the bundler does not warn about an export its build lacks.
const { RRule } = ((Reflect.get(rruleModule, 'default') as typeof rruleModule | undefined) ?? rruleModule) as typeof rruleModule;
import { TZDate } from '@date-fns/tz';
import { format } from 'date-fns';
import { floatingOf, instantOfFloating } from './wall-clock';

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

/** No series reaches further than this after its first class, whatever its COUNT or UNTIL. */
export const HORIZON_YEARS = 2;

/** Thrown from inside rrule's loop once it has walked more periods than the horizon holds. */
class PastHorizon extends Error {}

/**
 * Expands a series in the studio's zone: each occurrence keeps the first class's wall-clock time
 * (18:00 stays 18:00 across a clock change), as RFC 5545 does for a DTSTART with a TZID; a time the
 * clocks pass twice is the first of the two (see `instantOfFloating`).
 * rrule works in UTC, so the wall clock is carried as "UTC-shaped local time" and converted back.
 *
 * Bounded two ways, so no rule can hold the server: occurrences end at the horizon (HORIZON_YEARS
 * after the first start), and the number of periods rrule may walk is capped. The cap matters for a
 * rule that never matches (`BYMONTH=2;BYMONTHDAY=30`): rrule's UNTIL and its callbacks only act on
 * matching days, so such a rule would otherwise be walked day by day to the year 9999 (seconds of
 * blocked event loop). rrule reads `interval` about twice per period; the cap allows four times
 * the periods the horizon holds, plus slack, so it only ever stops a walk already past the horizon.
 */
export function expandSeries(rule: string, firstStart: Date, timeZone: string, opts: { skipDays?: string[]; max?: number } = {}): Date[] {
  const options = parseRule(rule);
  const floating = new Date(floatingOf(firstStart, timeZone));
  const horizon = new Date(Date.UTC(floating.getUTCFullYear() + HORIZON_YEARS, floating.getUTCMonth(), floating.getUTCDate(), floating.getUTCHours(), floating.getUTCMinutes(), floating.getUTCSeconds()));
  const max = opts.max ?? MAX_OCCURRENCES;
  const ruleUntil = options.until ? new Date(floatingOf(options.until, timeZone)) : null;
  const until = ruleUntil && ruleUntil < horizon ? ruleUntil : horizon;
  const rrule = new RRule({ ...options, dtstart: floating, until, tzid: null }, true);
  const periodDays = [365, 28, 7, 1][rrule.options.freq] ?? 1;
  const budget = 4 * (Math.ceil((HORIZON_YEARS * 366) / (periodDays * Math.max(1, rrule.options.interval))) + 2) + 64;
  let reads = 0;
  (rrule as unknown as { options: object }).options = new Proxy(rrule.options, {
    get(target, key, receiver) {
      if (key === 'interval' && ++reads > budget) throw new PastHorizon();
      return Reflect.get(target, key, receiver);
    },
  });
  const skip = new Set(opts.skipDays ?? []);
  const out: Date[] = [];
  let found = 0;
  try {
    rrule.all((d, i) => {
      if (i >= max) return false;
      found += 1;
      const instant = instantOfFloating(d.getTime(), timeZone);
      if (!skip.has(format(new TZDate(instant.getTime(), timeZone), 'yyyy-MM-dd'))) out.push(instant);
      return true;
    });
  } catch (err) {
    if (!(err instanceof PastHorizon)) throw err;
  }
  if (!found) {
    throw new RecurrenceError(`The repeat rule gives no class in the ${HORIZON_YEARS} years after the first one: check that such a day exists (there is no 30 February).`);
  }
  return out;
}

export function isOpenEnded(rule: string): boolean {
  const o = parseRule(rule);
  return !o.count && !o.until;
}
