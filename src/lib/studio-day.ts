import { TZDate } from '@date-fns/tz';

/** Midnight at the start of a 'YYYY-MM-DD' day in the studio's zone, as an instant; `after` moves to the next midnight. */
export function studioMidnight(day: string, timeZone: string, after = false): string | undefined {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(day);
  if (!m) return undefined;
  return new Date(new TZDate(Number(m[1]), Number(m[2]) - 1, Number(m[3]) + (after ? 1 : 0), timeZone).getTime()).toISOString();
}
