import { describe, expect, it } from 'vitest';
import {
  bookingReasons,
  instructorReasons,
  sessionRisk,
  type BookingSession,
  type PointSnapshot,
} from '../../../shared/clearance';
import { checkLoadPath } from '../../../shared/rigging';
import { defaultPolicy, type Policy } from '../../../shared/schemas/policy';
import { clearedAt, gear, healthyPoint as point, link } from './fixtures';

// Europe/London; textile 30 d, hardware 90 d, structure 365 d, warning 7 d, factor 5 [studio choice].
const policy: Policy = defaultPolicy;

const now = new Date('2025-06-10T08:00:00Z');

// One performer on fabric: W = 1 × 90 kg × g × 5.6 = 4.94 kN [studio choice on published figures].
function session(over: Partial<BookingSession> = {}): BookingSession {
  return {
    startsAt: new Date('2025-06-20T17:00:00Z'),
    endsAt: new Date('2025-06-20T18:30:00Z'),
    apparatus: 'fabric',
    performersPerPoint: 1,
    profile: { performers: 1, bodyMassKg: 90, dynamicFactor: 5.6 },
    ...over,
  };
}

function check(p: PointSnapshot, s: BookingSession = session(), pointBookedElsewhere = false, at: Date = now) {
  return bookingReasons({ point: p, policy, now: at, session: s, pointBookedElsewhere });
}
const codesOf = (list: Array<{ code: string }>) => list.map((r) => r.code);

describe('bookingReasons', () => {
  it('lets a cleared, allowed, strong enough, free point take the session with no warnings', () => {
    expect(check(point())).toEqual({ reasons: [], warnings: [] });
  });

  describe('blocked now', () => {
    it('refuses a point with an open fault, naming it', () => {
      const p = point();
      p.openFaults = [{ id: 1, pointId: null, gearId: p.links[3].gear.id, severity: 'low', description: 'bearing grinds' }];
      expect(check(p).reasons).toEqual([{ code: 'fault_open', message: 'Open fault on swivel SW-0031: bearing grinds' }]);
    });

    it('refuses a lapsed point even for a session after a rigger could have renewed it', () => {
      const lapsedNow = new Date('2025-07-03T08:00:00Z');
      const later = session({ startsAt: new Date('2025-07-20T17:00:00Z'), endsAt: new Date('2025-07-20T18:00:00Z') });
      expect(codesOf(check(point(), later, false, lapsedNow).reasons)).toEqual(['inspection_lapsed']);
    });

    it('refuses a point whose clearance was voided', () => {
      const p = point({ lastClearance: { at: clearedAt, voidedAt: new Date('2025-06-05T10:00:00Z') } });
      expect(codesOf(check(p).reasons)).toEqual(['awaiting_clearance']);
    });

    it('refuses a point out of service, with no load path, or breaking a rigging rule', () => {
      expect(codesOf(check(point({ inService: false })).reasons)).toEqual(['out_of_service']);
      expect(codesOf(check(point({ links: [] })).reasons)).toEqual(['no_load_path']);
      const p = point();
      p.links[4] = link(p.links[4].gear, { threeWay: true });
      expect(codesOf(check(p).reasons)).toContain('rule_violation');
    });
  });

  describe('blocked during the session for a reason known now', () => {
    it('refuses a point whose sling reaches its service life during the session', () => {
      const p = point();
      // Ends at midnight BST starting 20 June: 23:00Z on the 19th.
      Object.assign(p.links[1].gear, { manufacturedOn: '2015-06-20', serviceLifeYears: 10 });
      const evening = session({ startsAt: new Date('2025-06-19T22:00:00Z'), endsAt: new Date('2025-06-19T23:30:00Z') });
      const result = check(p, evening);
      expect(result.reasons).toEqual([
        {
          code: 'gear_unfit',
          message: `Round sling ${p.links[1].gear.serial} reaches the end of its service life on 20 Jun 2025`,
        },
      ]);
      const before = session({ startsAt: new Date('2025-06-19T20:00:00Z'), endsAt: new Date('2025-06-19T22:30:00Z') });
      expect(check(p, before).reasons).toEqual([]);
    });

    it('refuses a point whose gear is past its service life by the start, once, not twice', () => {
      const p = point();
      Object.assign(p.links[1].gear, { manufacturedOn: '2015-06-01', serviceLifeYears: 10 });
      expect(codesOf(check(p).reasons)).toEqual(['gear_unfit']);
    });
  });

  describe('inspection_due warning', () => {
    it('books a session past the clearance with the warning, giving the date in the studio zone', () => {
      const later = session({ startsAt: new Date('2025-07-05T17:00:00Z'), endsAt: new Date('2025-07-05T18:00:00Z') });
      expect(check(point(), later)).toEqual({
        reasons: [],
        warnings: [{ code: 'inspection_due', message: 'Point B-2: needs inspection, cleared only until 2 Jul 2025, 10:00' }],
      });
    });

    it('warns when the clearance runs out part-way through the session', () => {
      const over = session({ startsAt: new Date('2025-07-02T08:30:00Z'), endsAt: new Date('2025-07-02T09:30:00Z') });
      expect(codesOf(check(point(), over).warnings)).toEqual(['inspection_due']);
    });

    it("warns when the apparatus's own inspection runs out before the session ends", () => {
      const p = point();
      p.links[5].gear.inspectedUntil = new Date('2025-06-15T10:00:00Z');
      expect(check(p)).toEqual({
        reasons: [],
        warnings: [{ code: 'inspection_due', message: 'Fabric FB-12: needs inspection, inspected only until 15 Jun 2025, 11:00' }],
      });
    });

    it('does not warn when the session ends exactly as the clearance runs out', () => {
      const edge = session({ startsAt: new Date('2025-07-02T08:00:00Z'), endsAt: new Date('2025-07-02T09:00:00Z') });
      expect(check(point(), edge).warnings).toEqual([]);
    });
  });

  it('refuses an apparatus kind the point does not allow', () => {
    expect(check(point(), session({ apparatus: 'hoop', profile: { performers: 1, bodyMassKg: 90, dynamicFactor: 4.8 } }))
      .reasons).toEqual([{ code: 'apparatus_not_allowed', message: 'Point B-2 does not allow hoop (allowed: fabric, hammock)' }]);
  });

  it('refuses more performers on a point than it takes', () => {
    const p = point({ maxPerformers: 1, structuralRatingKn: 50 });
    for (const l of p.links) l.gear.majorKn = 80;
    const duo = session({ performersPerPoint: 2, profile: { performers: 2, bodyMassKg: 90, dynamicFactor: 5.6 } });
    expect(check(p, duo).reasons).toEqual([
      { code: 'too_many_performers', message: 'The class puts 2 performers on point B-2, which takes at most 1' },
    ]);
  });

  it('refuses a path the load check fails for the class, listing what fails', () => {
    // Duo on fabric: W = 9.89 kN, 5 × W = 49.4 kN is more than 40 kN gear [studio choice factor 5].
    const p = point({ maxPerformers: 2 });
    const duo = session({ performersPerPoint: 2, profile: { performers: 2, bodyMassKg: 90, dynamicFactor: 5.6 } });
    const result = check(p, duo);
    expect(codesOf(result.reasons)).toEqual(['load_check_failed']);
    const expected = checkLoadPath({ links: p.links, structuralRatingKn: 12, profile: duo.profile, requiredFactor: 5 });
    expect(expected.violations.map((v) => v.code)).toEqual(['factor_below_required']);
    expect(result.reasons[0].message).toBe(`Load check fails for 2 performers on point B-2: ${expected.violations[0].message}`);
    expect(result.reasons[0].message).toMatch(/at least 5 times/);
  });

  it('refuses a point already booked in an overlapping session', () => {
    expect(check(point(), session(), true).reasons).toEqual([
      { code: 'point_double_booked', message: 'Point B-2 is already booked for an overlapping session' },
    ]);
  });

  it('lists every reason that applies, not just the first', () => {
    const p = point({ inService: false, maxPerformers: 1, apparatus: ['hoop'] });
    p.openFaults = [{ id: 4, pointId: 7, gearId: null, severity: 'medium', description: 'crack at the clamp' }];
    const trio = session({ performersPerPoint: 3, profile: { performers: 3, bodyMassKg: 90, dynamicFactor: 5.6 } });
    const result = check(p, trio, true);
    expect(new Set(codesOf(result.reasons))).toEqual(
      new Set(['out_of_service', 'fault_open', 'apparatus_not_allowed', 'too_many_performers', 'load_check_failed', 'point_double_booked']),
    );
    expect(result.reasons.find((r) => r.code === 'load_check_failed')?.message).toMatch(/structur/i);
  });
});

describe('instructorReasons', () => {
  it('names an instructor teaching an overlapping session, and nothing otherwise', () => {
    expect(instructorReasons(true)).toEqual([
      { code: 'instructor_double_booked', message: 'The instructor teaches an overlapping session' },
    ]);
    expect(instructorReasons(false)).toEqual([]);
  });
});

describe('sessionRisk', () => {
  const risk = (points: PointSnapshot[], startsAt: Date, endsAt: Date, at: Date = now, cancelled = false) =>
    sessionRisk({ points, policy, now: at, startsAt, endsAt, cancelled, cls: session() });
  // Ten days after `now`: outside the 7-day window.
  const farStart = new Date('2025-06-20T17:00:00Z');
  const farEnd = new Date('2025-06-20T18:30:00Z');
  // Three days after `now`: inside the window.
  const nearStart = new Date('2025-06-13T17:00:00Z');
  const nearEnd = new Date('2025-06-13T18:30:00Z');

  it('is not at risk when every point stays cleared', () => {
    expect(risk([point()], farStart, farEnd)).toEqual({ atRisk: false, reasons: [] });
  });

  it('is at risk at once for an open fault, naming the point once', () => {
    const p = point();
    p.openFaults = [{ id: 1, pointId: null, gearId: p.links[3].gear.id, severity: 'low', description: 'bearing grinds' }];
    expect(risk([point({ id: 8, label: 'B-1' }), p], farStart, farEnd)).toEqual({
      atRisk: true,
      reasons: [{ pointId: 7, code: 'fault_open', message: 'Point B-2: Open fault on swivel SW-0031: bearing grinds' }],
    });
  });

  it('is at risk at once for a voided clearance, a quarantine, a rule, no load path or out of service', () => {
    const quarantined = point();
    quarantined.links[2].gear.status = 'quarantined';
    const rule = point();
    rule.links[4] = link(rule.links[4].gear, { threeWay: true });
    const cases: Array<[PointSnapshot, string]> = [
      [point({ lastClearance: { at: clearedAt, voidedAt: clearedAt } }), 'awaiting_clearance'],
      [quarantined, 'gear_unfit'],
      [rule, 'rule_violation'],
      [point({ links: [] }), 'no_load_path'],
      [point({ inService: false }), 'out_of_service'],
    ];
    for (const [p, code] of cases) {
      const result = risk([p], farStart, farEnd);
      expect(result.atRisk).toBe(true);
      expect(codesOf(result.reasons)).toContain(code);
    }
  });

  it('does not name the point twice when the message already does', () => {
    const result = risk([point({ inService: false })], farStart, farEnd);
    expect(result.reasons[0].message).toBe('Point B-2 is marked out of service');
  });

  it('is at risk when gear will reach its service life before the session ends', () => {
    const p = point();
    Object.assign(p.links[1].gear, { manufacturedOn: '2015-06-15', serviceLifeYears: 10 });
    expect(codesOf(risk([p], farStart, farEnd).reasons)).toEqual(['gear_unfit']);
  });

  describe('an inspection running out counts only inside the warning window', () => {
    const lapsedNow = new Date('2025-07-03T08:00:00Z');

    it('is not at risk for a lapsed clearance while the session is beyond the window', () => {
      const start = new Date('2025-07-20T17:00:00Z');
      expect(risk([point()], start, new Date('2025-07-20T18:00:00Z'), lapsedNow)).toEqual({ atRisk: false, reasons: [] });
    });

    it('is at risk for a lapsed clearance once the session starts within the window', () => {
      const start = new Date('2025-07-08T17:00:00Z');
      const result = risk([point()], start, new Date('2025-07-08T18:00:00Z'), lapsedNow);
      expect(result.atRisk).toBe(true);
      expect(codesOf(result.reasons)).toEqual(['inspection_due']);
    });

    it('is at risk when the clearance runs out before a session inside the window ends', () => {
      const at = new Date('2025-06-28T08:00:00Z');
      const result = risk([point()], new Date('2025-07-03T17:00:00Z'), new Date('2025-07-03T18:00:00Z'), at);
      expect(result).toEqual({
        atRisk: true,
        reasons: [{ pointId: 7, code: 'inspection_due', message: 'Point B-2: needs inspection, cleared only until 2 Jul 2025, 10:00' }],
      });
    });

    it("treats the apparatus's own inspection the same way", () => {
      const p = point();
      p.links[5].gear.inspectedUntil = new Date('2025-06-09T10:00:00Z');
      expect(risk([p], farStart, farEnd).atRisk).toBe(false);
      const result = risk([p], nearStart, nearEnd);
      expect(result.atRisk).toBe(true);
      expect(codesOf(result.reasons)).toEqual(['inspection_due']);
    });

    it('treats a point never cleared as an inspection not yet done', () => {
      const p = point({ lastClearance: null });
      expect(risk([p], farStart, farEnd).atRisk).toBe(false);
      expect(codesOf(risk([p], nearStart, nearEnd).reasons)).toEqual(['inspection_lapsed']);
    });
  });

  it('is never at risk once cancelled, started or over', () => {
    const faulty = point({ openFaults: [{ id: 1, pointId: 7, gearId: null, severity: 'high', description: 'x' }] });
    expect(risk([faulty], farStart, farEnd, now, true)).toEqual({ atRisk: false, reasons: [] });
    expect(risk([faulty], farStart, farEnd, new Date('2025-06-20T17:30:00Z'))).toEqual({ atRisk: false, reasons: [] });
    expect(risk([faulty], farStart, farEnd, new Date('2025-06-21T00:00:00Z'))).toEqual({ atRisk: false, reasons: [] });
    expect(risk([faulty], farStart, farEnd).atRisk).toBe(true);
  });
});
