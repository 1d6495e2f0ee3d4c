import { describe, expect, it } from 'vitest';
import { expandSeries, parseRule, RecurrenceError } from '../../../shared/schedule/recurrence';

// Worked examples of RFC 5545 §3.8.5.3 [published: RFC 5545], DTSTART;TZID=America/New_York.
// New York left daylight time on 26 Oct 1997, so 9:00 EDT (13:00Z) becomes 9:00 EST (14:00Z).
const NY = 'America/New_York';
const start = new Date('1997-09-02T13:00:00Z'); // 2 Sep 1997 09:00 EDT
const local = (ds: Date[]) => ds.map((d) => new Intl.DateTimeFormat('en-US', { timeZone: NY, month: 'short', day: 'numeric', hour: 'numeric', minute: '2-digit', hour12: false, timeZoneName: 'short' }).format(d));

describe('expandSeries against RFC 5545 §3.8.5.3 [published: RFC 5545]', () => {
  it('daily for 10 occurrences: September 2–11, 9:00 EDT', () => {
    const got = expandSeries('FREQ=DAILY;COUNT=10', start, NY);
    expect(got.map((d) => d.toISOString())).toEqual(Array.from({ length: 10 }, (_, i) => new Date(Date.UTC(1997, 8, 2 + i, 13)).toISOString()));
  });

  it('weekly until December 24, 1997: keeps 9:00 local across the change to EST', () => {
    const got = expandSeries('FREQ=WEEKLY;UNTIL=19971224T000000Z', start, NY);
    const days = ['Sep 2', 'Sep 9', 'Sep 16', 'Sep 23', 'Sep 30', 'Oct 7', 'Oct 14', 'Oct 21', 'Oct 28', 'Nov 4', 'Nov 11', 'Nov 18', 'Nov 25', 'Dec 2', 'Dec 9', 'Dec 16', 'Dec 23'];
    expect(got).toHaveLength(17);
    expect(local(got).map((s) => s.split(',')[0])).toEqual(days);
    expect(got[7].toISOString()).toBe('1997-10-21T13:00:00.000Z'); // 9:00 EDT
    expect(got[8].toISOString()).toBe('1997-10-28T14:00:00.000Z'); // 9:00 EST
    expect(local(got).every((s) => s.includes('09:00'))).toBe(true);
  });

  it('weekly on Tuesday and Thursday for five weeks (10 occurrences)', () => {
    const got = expandSeries('FREQ=WEEKLY;COUNT=10;WKST=SU;BYDAY=TU,TH', start, NY);
    expect(local(got).map((s) => s.split(',')[0])).toEqual(['Sep 2', 'Sep 4', 'Sep 9', 'Sep 11', 'Sep 16', 'Sep 18', 'Sep 23', 'Sep 25', 'Sep 30', 'Oct 2']);
  });

  it('every other week on Monday, Wednesday and Friday until December 24, 1997, starting on Monday, September 1', () => {
    const got = expandSeries('FREQ=WEEKLY;INTERVAL=2;UNTIL=19971224T000000Z;WKST=SU;BYDAY=MO,WE,FR', new Date('1997-09-01T13:00:00Z'), NY);
    expect(local(got).map((s) => s.split(',')[0])).toEqual([
      'Sep 1', 'Sep 3', 'Sep 5', 'Sep 15', 'Sep 17', 'Sep 19', 'Sep 29', 'Oct 1', 'Oct 3', 'Oct 13', 'Oct 15', 'Oct 17', 'Oct 27', 'Oct 29', 'Oct 31',
      'Nov 10', 'Nov 12', 'Nov 14', 'Nov 24', 'Nov 26', 'Nov 28', 'Dec 8', 'Dec 10', 'Dec 12', 'Dec 22',
    ]);
  });

  it('monthly on the first Friday for 10 occurrences, from September 5', () => {
    const got = expandSeries('FREQ=MONTHLY;COUNT=10;BYDAY=1FR', new Date('1997-09-05T13:00:00Z'), NY);
    expect(local(got).map((s) => s.split(',')[0])).toEqual(['Sep 5', 'Oct 3', 'Nov 7', 'Dec 5', 'Jan 2', 'Feb 6', 'Mar 6', 'Apr 3', 'May 1', 'Jun 5']);
  });
});

describe('expandSeries in the studio’s zone', () => {
  it('keeps an 18:30 London class at 18:30 across the end of British Summer Time', () => {
    // 21 Oct 2026 18:30 BST = 17:30Z; clocks go back on 25 Oct 2026.
    const got = expandSeries('FREQ=WEEKLY;COUNT=3', new Date('2026-10-21T17:30:00Z'), 'Europe/London');
    expect(got.map((d) => d.toISOString())).toEqual(['2026-10-21T17:30:00.000Z', '2026-10-28T18:30:00.000Z', '2026-11-04T18:30:00.000Z']);
  });

  it('skips the dates asked for', () => {
    const got = expandSeries('FREQ=WEEKLY;COUNT=3', new Date('2026-12-01T18:00:00Z'), 'Europe/London', { skipDays: ['2026-12-08'] });
    expect(got.map((d) => d.toISOString().slice(0, 10))).toEqual(['2026-12-01', '2026-12-15']);
  });

  it('caps an open-ended rule', () => {
    expect(expandSeries('FREQ=DAILY', new Date('2026-12-01T18:00:00Z'), 'UTC', { max: 5 })).toHaveLength(5);
  });

  it('refuses rules a class series cannot use, with a clear message', () => {
    expect(() => parseRule('BYDAY=MO')).toThrow(RecurrenceError);
    expect(() => parseRule('FREQ=MINUTELY')).toThrow(/not hourly/);
    expect(() => parseRule('FREQ=WEEKLY;BYDAY=XX')).toThrow(RecurrenceError);
  });
});

describe('expandSeries bounds every rule', () => {
  it('refuses a rule that never gives a class (30 February) at once, with a clear message', () => {
    const t = performance.now();
    expect(() => expandSeries('FREQ=DAILY;BYMONTH=2;BYMONTHDAY=30;COUNT=5', new Date('2026-12-01T18:00:00Z'), 'Europe/London')).toThrow(/no class in the 2 years/);
    expect(() => expandSeries('FREQ=DAILY;INTERVAL=7;BYDAY=MO;COUNT=5', new Date('2026-12-01T18:00:00Z'), 'Europe/London')).toThrow(RecurrenceError); // a Tuesday, every 7th day: never a Monday
    expect(performance.now() - t).toBeLessThan(500);
  });

  it('stops an open-ended or far-reaching rule two years after the first class', () => {
    const got = expandSeries('FREQ=MONTHLY;BYMONTHDAY=1', new Date('2026-12-01T18:00:00Z'), 'Europe/London');
    expect(got).toHaveLength(25); // 1 Dec 2026 … 1 Dec 2028
    expect(got.at(-1)!.toISOString()).toBe('2028-12-01T18:00:00.000Z');
    expect(expandSeries('FREQ=YEARLY;UNTIL=20400101T000000Z', new Date('2026-12-01T18:00:00Z'), 'UTC')).toHaveLength(3);
  });

  it('still finds rare but real days within the horizon (29 February 2028)', () => {
    const got = expandSeries('FREQ=YEARLY;BYMONTH=2;BYMONTHDAY=29;COUNT=1', new Date('2026-12-01T18:00:00Z'), 'UTC');
    expect(got.map((d) => d.toISOString())).toEqual(['2028-02-29T18:00:00.000Z']);
  });
});

describe('expandSeries across a clock change [published: RFC 5545 §3.3.5]', () => {
  it('books a daily 01:30 class on the night the clocks go back at the first 01:30', () => {
    // London leaves BST at 02:00 BST on 25 Oct 2026: 01:30 happens at 00:30Z (BST) and again at 01:30Z (GMT).
    const got = expandSeries('FREQ=DAILY;COUNT=3', new Date('2026-10-24T00:30:00Z'), 'Europe/London');
    expect(got.map((d) => d.toISOString())).toEqual(['2026-10-24T00:30:00.000Z', '2026-10-25T00:30:00.000Z', '2026-10-26T01:30:00.000Z']);
  });

  it('reads a 01:30 the clocks skip with the offset before the gap (02:30 summer time)', () => {
    // London enters BST at 01:00 GMT on 29 Mar 2026; 01:30 does not exist that night.
    const got = expandSeries('FREQ=DAILY;COUNT=3', new Date('2026-03-28T01:30:00Z'), 'Europe/London');
    expect(got.map((d) => d.toISOString())).toEqual(['2026-03-28T01:30:00.000Z', '2026-03-29T01:30:00.000Z', '2026-03-30T00:30:00.000Z']);
  });
});
