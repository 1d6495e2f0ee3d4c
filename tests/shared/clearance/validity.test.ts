import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  freezeSnapshot,
  pointStatusAt,
  pointStatusOver,
  sessionRisk,
  stillValid,
  validityTracker,
  type PointSnapshot,
} from '../../../shared/clearance';
import { defaultPolicy, type Policy } from '../../../shared/schemas/policy';
import { statusInstants } from '../../../shared/clearance/status';
import { gear, healthyPoint, link } from './fixtures';

/*
 * The derived cache keeps an answer while `stillValid` says so. These properties check that claim
 * against the status rules themselves: whatever the snapshot, the policy and the instant, every
 * answer the calendar, Today and the rig list give is the same at any later instant the validity
 * still covers. Zones with a one-hour and a half-hour clock change, and instants drawn around
 * their changes, exercise the warning-window bound.
 */

const HOUR = 3_600_000;
const DAY = 24 * HOUR;
const zones = ['Europe/London', 'America/New_York', 'Australia/Lord_Howe', 'UTC'] as const;
// Clock changes in 2026: London 29 Mar / 25 Oct, New York 8 Mar / 1 Nov, Lord Howe 5 Apr / 4 Oct.
const changes = ['2026-03-29T01:00:00Z', '2026-10-25T01:00:00Z', '2026-03-08T07:00:00Z', '2026-11-01T06:00:00Z', '2026-04-04T15:00:00Z', '2026-10-03T15:30:00Z'].map((s) => Date.parse(s));
const base = Date.parse('2026-01-01T00:00:00Z');

/** An instant in 2026, often near a clock change or a whole number of days from one. */
const instantArb = fc.oneof(
  fc.integer({ min: base, max: base + 365 * DAY }),
  fc.tuple(fc.constantFrom(...changes), fc.integer({ min: -10, max: 10 }), fc.integer({ min: -3 * HOUR, max: 3 * HOUR })).map(([c, days, off]) => c + days * DAY + off),
);

const policyArb: fc.Arbitrary<Policy> = fc.record({ zone: fc.constantFrom(...zones), warningDays: fc.integer({ min: 0, max: 10 }) }).map(({ zone, warningDays }) => ({ ...defaultPolicy, timeZone: zone, warningDays }));

const snapshotArb: fc.Arbitrary<PointSnapshot> = fc
  .record({
    clearedAt: fc.option(instantArb, { nil: null }),
    voided: fc.integer({ min: 0, max: 4 }).map((n) => n === 0),
    apparatusUntil: fc.option(instantArb, { nil: null }),
    withApparatus: fc.boolean(),
    life: fc.option(fc.record({ month: fc.integer({ min: 1, max: 12 }), day: fc.integer({ min: 1, max: 28 }), years: fc.constantFrom(1, 2, 5, 10) }), { nil: null }),
    fault: fc.integer({ min: 0, max: 9 }),
    inService: fc.integer({ min: 0, max: 19 }).map((n) => n > 0),
  })
  .map((r) => {
    const p = healthyPoint({
      inService: r.inService,
      lastClearance: r.clearedAt === null ? null : { at: new Date(r.clearedAt), voidedAt: r.voided ? new Date(r.clearedAt + DAY) : null },
      openFaults: r.fault === 0 ? [{ id: 1, pointId: 7, gearId: null, severity: 'high', description: 'Frayed sling' }] : [],
    });
    const links = p.links.slice(0, r.withApparatus ? p.links.length : p.links.length - 1);
    if (r.withApparatus) {
      links[links.length - 1] = link(gear('fabric', { material: 'nylon', gate: 'none', minorKn: null, gateOpenKn: null, serial: 'FB-9', inspectedUntil: r.apparatusUntil === null ? null : new Date(r.apparatusUntil) }));
    }
    if (r.life) {
      // Made so that its service life ends on a day of 2026.
      const made = `${2026 - r.life.years}-${String(r.life.month).padStart(2, '0')}-${String(r.life.day).padStart(2, '0')}`;
      links[2] = link(gear('carabiner', { manufacturedOn: made, serviceLifeYears: r.life.years }));
    }
    return { ...p, links };
  });

/** Everything the three read endpoints derive from one point and one class at `now`. */
function answers(point: PointSnapshot, policy: Policy, now: Date, session: { startsAt: Date; endsAt: Date }) {
  const at = session.startsAt > now ? session.startsAt : now;
  return {
    now: pointStatusAt(point, policy, now),
    atSession: pointStatusAt(point, policy, at),
    over: pointStatusOver(point, policy, at, session.endsAt),
    live: session.endsAt > now,
    risk: sessionRisk({ points: [point], policy, now, ...session, cls: { apparatus: 'fabric', performersPerPoint: 1, profile: { performers: 1, bodyMassKg: policy.bodyMassKg, dynamicFactor: 5.6 } } }),
  };
}

describe('validity of a derived answer', () => {
  it('every answer stays the same at any instant the validity still covers', () => {
    let covered = 0;
    let longLived = 0;
    fc.assert(
      fc.property(
        snapshotArb,
        policyArb,
        instantArb,
        fc.integer({ min: -2 * DAY, max: 20 * DAY }),
        fc.integer({ min: HOUR / 2, max: 3 * HOUR }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        (point, policy, nowMs, startIn, length, where) => {
          const now = new Date(nowMs);
          const session = { startsAt: new Date(nowMs + startIn), endsAt: new Date(nowMs + startIn + length) };
          const track = validityTracker(policy, now);
          track.snapshot(point);
          track.session({ ...session, points: [point] });
          const v = track.result();
          const before = answers(point, policy, now, session);
          const end = Math.min(v.until, nowMs + 400 * DAY);
          for (const t of [nowMs + (end - nowMs) * where, end - 1]) {
            const later = new Date(Math.floor(t));
            if (later.getTime() < nowMs || !stillValid(v, later, policy)) continue;
            covered++;
            if (later.getTime() - nowMs > HOUR) longLived++;
            expect(answers(point, policy, later, session)).toEqual(before);
          }
        },
      ),
      { numRuns: 3000 },
    );
    // The property means something only if the validity often covers a real stretch of time.
    expect(covered).toBeGreaterThan(2000);
    expect(longLived).toBeGreaterThan(500);
  });

  it('ends exactly when a clearance runs out, so a lapsed point is never served as cleared', () => {
    const policy = defaultPolicy;
    const point = healthyPoint();
    const until = pointStatusAt(point, policy, new Date('2025-06-10T00:00:00Z')).clearedUntil!;
    // Three days before: inside the seven-day warning window, expiring, and staying so until it lapses.
    const track = validityTracker(policy, new Date(until.getTime() - 3 * DAY));
    track.snapshot(point);
    const v = track.result();
    expect(stillValid(v, new Date(until.getTime() - 1), policy)).toBe(true);
    expect(stillValid(v, until, policy)).toBe(false);
    expect(pointStatusAt(point, policy, until).status).toBe('blocked');
  });

  it('re-asks the warning window near its edge and refuses a clock set back', () => {
    const policy = defaultPolicy;
    const point = healthyPoint();
    const until = pointStatusAt(point, policy, new Date('2025-06-10T00:00:00Z')).clearedUntil!;
    // Just over seven days before the clearance ends: cleared now, expiring a little later.
    const now = new Date(until.getTime() - 7 * DAY - HOUR);
    const track = validityTracker(policy, now);
    track.snapshot(point);
    const v = track.result();
    expect(pointStatusAt(point, policy, now).status).toBe('cleared');
    expect(v.windows.length).toBeGreaterThan(0);
    const later = new Date(now.getTime() + 2 * HOUR);
    expect(pointStatusAt(point, policy, later).status).toBe('expiring');
    expect(stillValid(v, later, policy)).toBe(false);
    expect(stillValid(v, new Date(now.getTime() - 1), policy)).toBe(false);
  });
});

describe('sealed snapshots', () => {
  it('cannot be changed once the rules may remember them', () => {
    const point = freezeSnapshot(healthyPoint());
    expect(pointStatusAt(point, defaultPolicy, new Date('2025-06-10T00:00:00Z')).status).toBe('cleared');
    expect(() => {
      (point.links[2].gear as { status: string }).status = 'quarantined';
    }).toThrow(TypeError);
    expect(() => (point.openFaults as unknown[]).push({})).toThrow(TypeError);
  });

  it('a sealed snapshot answers exactly as an unsealed one at every instant (reasons kept per stretch between its status instants)', () => {
    fc.assert(
      fc.property(snapshotArb, policyArb, fc.array(instantArb, { minLength: 1, maxLength: 12 }), (snap, policy, instants) => {
        const sealed = freezeSnapshot(structuredClone(snap));
        // Asked in one order, then the other: what one instant kept must not leak into another.
        for (const t of [...instants, ...instants.reverse()]) {
          const at = new Date(t);
          const end = new Date(t + 2 * HOUR);
          expect(pointStatusAt(sealed, policy, at)).toEqual(pointStatusAt(snap, policy, at));
          expect(pointStatusOver(sealed, policy, at, end)).toEqual(pointStatusOver(snap, policy, at, end));
        }
      }),
      { numRuns: 500 },
    );
  });

  it('over any stretch, a sealed snapshot answers as an unsealed one, with ends on, just before and just after its status instants', () => {
    fc.assert(
      fc.property(snapshotArb, policyArb, fc.array(fc.tuple(instantArb, fc.integer({ min: 1, max: 60 * DAY }), fc.integer({ min: 0, max: 20 }), fc.constantFrom(-1, 0, 1)), { minLength: 1, maxLength: 12 }), (snap, policy, asks) => {
        const sealed = freezeSnapshot(structuredClone(snap));
        const edges = statusInstants(snap, policy).instants;
        // Asked in one order, then the other: what one class's end kept must not leak into another's.
        for (const [t, length, edge, nudge] of [...asks, ...[...asks].reverse()]) {
          const start = new Date(t);
          // Half the ends on a status instant (or a millisecond either side), where the strict comparisons turn.
          const onEdge = edges.length > 0 && edge % 2 === 0 ? edges[edge % edges.length] + nudge : null;
          const end = new Date(onEdge !== null && onEdge > t ? onEdge : t + length);
          expect(pointStatusOver(sealed, policy, start, end)).toEqual(pointStatusOver(snap, policy, start, end));
        }
      }),
      { numRuns: 1000 },
    );
  });

  it('an unsealed snapshot is worked out afresh after a change', () => {
    const point = healthyPoint();
    const t = new Date('2025-06-10T00:00:00Z');
    expect(pointStatusAt(point, defaultPolicy, t).status).toBe('cleared');
    point.links[2].gear.status = 'quarantined';
    expect(pointStatusAt(point, defaultPolicy, t).status).toBe('blocked');
  });
});
