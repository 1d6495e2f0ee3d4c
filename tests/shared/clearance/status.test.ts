import { describe, expect, it } from 'vitest';
import {
  clearedUntil,
  pointStatusAt,
  pointStatusOver,
  serviceLifeEnd,
  type PointSnapshot,
} from '../../../shared/clearance';
import { defaultPolicy, type Policy } from '../../../shared/schemas/policy';
import { clearedAt, gear, healthyPoint, link } from './fixtures';

// Studio in Europe/London; intervals textile 30 d, hardware 90 d, structure 365 d, warning 7 d
// [studio choice] (CHECK-VALUES.md).
const policy: Policy = defaultPolicy;


function codes(snapshot: PointSnapshot, t: Date, p: Policy = policy): string[] {
  return pointStatusAt(snapshot, p, t).reasons.map((r) => r.code);
}

const midJune = new Date('2025-06-10T12:00:00Z');

describe('clearedUntil', () => {
  it('adds the shortest interval among the structure and the fixed links: 30 days for a textile sling', () => {
    expect(clearedUntil(healthyPoint(), policy)?.toISOString()).toBe('2025-07-02T09:00:00.000Z');
  });

  it('uses the hardware interval when the fixed rigging holds no textile', () => {
    const point = healthyPoint();
    point.links = [point.links[0], point.links[2], point.links[5]];
    expect(clearedUntil(point, policy)?.toISOString()).toBe('2025-08-31T09:00:00.000Z');
  });

  it('uses the structure interval when it is the shortest', () => {
    const longGear: Policy = { ...policy, intervalDays: { textile: 400, hardware: 500, structure: 365 } };
    const point = healthyPoint();
    point.links[5].gear.inspectedUntil = new Date('2027-01-01T00:00:00Z');
    expect(clearedUntil(point, longGear)?.toISOString()).toBe('2026-06-02T09:00:00.000Z');
  });

  it('ignores the apparatus kind when picking the interval: a textile apparatus does not shorten a hardware path', () => {
    const point = healthyPoint();
    point.links = [point.links[0], point.links[2], point.links[5]];
    point.links[2].gear.inspectedUntil = new Date('2026-01-01T00:00:00Z');
    expect(clearedUntil(point, policy)?.toISOString()).toBe('2025-08-31T09:00:00.000Z');
  });

  it("is never later than the mounted apparatus's own inspection", () => {
    const point = healthyPoint();
    point.links[5].gear.inspectedUntil = new Date('2025-06-20T15:00:00Z');
    expect(clearedUntil(point, policy)?.toISOString()).toBe('2025-06-20T15:00:00.000Z');
  });

  it('is null when the mounted apparatus has never passed an inspection', () => {
    const point = healthyPoint();
    point.links[5].gear.inspectedUntil = null;
    expect(clearedUntil(point, policy)).toBeNull();
  });

  it('is null while the clearance is voided or when there has never been one', () => {
    expect(clearedUntil(healthyPoint({ lastClearance: { at: clearedAt, voidedAt: midJune } }), policy)).toBeNull();
    expect(clearedUntil(healthyPoint({ lastClearance: null }), policy)).toBeNull();
  });

  it('counts studio calendar days across the October clock change, keeping 10:00 local time', () => {
    // 1 Oct 10:00 BST (09:00Z) + 30 days = 31 Oct 10:00 GMT (10:00Z), not 24-hour days (09:00Z).
    const point = healthyPoint({ lastClearance: { at: new Date('2025-10-01T09:00:00Z'), voidedAt: null } });
    point.links[5].gear.inspectedUntil = new Date('2026-06-01T00:00:00Z');
    expect(clearedUntil(point, policy)?.toISOString()).toBe('2025-10-31T10:00:00.000Z');
  });

  it('counts studio calendar days across the March clock change, keeping 10:00 local time', () => {
    // 20 Mar 10:00 GMT + 30 days = 19 Apr 10:00 BST (09:00Z).
    const point = healthyPoint({ lastClearance: { at: new Date('2025-03-20T10:00:00Z'), voidedAt: null } });
    expect(clearedUntil(point, policy)?.toISOString()).toBe('2025-04-19T09:00:00.000Z');
  });
});

describe('a clearance kept with the end worked out when it was signed (§4.9)', () => {
  const signed = new Date('2025-07-02T09:00:00Z');
  const withTextile = (days: number): Policy => ({ ...policy, intervalDays: { ...policy.intervalDays, textile: days } });

  it('keeps the signed end when the owner lengthens the textile interval afterwards', () => {
    const point = healthyPoint({ lastClearance: { at: clearedAt, voidedAt: null, until: signed } });
    expect(clearedUntil(point, withTextile(90))?.toISOString()).toBe('2025-07-02T09:00:00.000Z');
    expect(pointStatusAt(point, withTextile(90), new Date('2025-07-03T09:00:00Z')).status).toBe('blocked');
  });

  it('applies a shorter interval at once', () => {
    const point = healthyPoint({ lastClearance: { at: clearedAt, voidedAt: null, until: signed } });
    expect(clearedUntil(point, withTextile(7))?.toISOString()).toBe('2025-06-09T09:00:00.000Z');
    expect(codes(point, midJune, withTextile(7))).toEqual(['inspection_lapsed']);
  });

  it('lets a clearance kept before ends were stored follow the policy alone', () => {
    expect(clearedUntil(healthyPoint(), withTextile(60))?.toISOString()).toBe('2025-08-01T09:00:00.000Z');
  });
});

describe('serviceLifeEnd', () => {
  it('counts the service life from the manufacture date, at midnight in the studio zone', () => {
    const g = gear('round_sling', { manufacturedOn: '2020-06-01', inServiceOn: '2021-01-15', serviceLifeYears: 10 });
    expect(serviceLifeEnd(g, 'Europe/London')?.toISOString()).toBe('2030-05-31T23:00:00.000Z');
  });

  it('falls back to the in-service date when the manufacture date is unknown', () => {
    const g = gear('round_sling', { inServiceOn: '2021-01-15', serviceLifeYears: 5 });
    expect(serviceLifeEnd(g, 'Europe/London')?.toISOString()).toBe('2026-01-15T00:00:00.000Z');
  });

  it('knows no limit when the life or both dates are missing', () => {
    expect(serviceLifeEnd(gear('round_sling', { manufacturedOn: '2020-06-01' }), 'UTC')).toBeNull();
    expect(serviceLifeEnd(gear('round_sling', { serviceLifeYears: 10 }), 'UTC')).toBeNull();
  });

  it('ends a life that started on 29 February on 28 February', () => {
    const g = gear('carabiner', { manufacturedOn: '2020-02-29', serviceLifeYears: 10 });
    expect(serviceLifeEnd(g, 'UTC')?.toISOString()).toBe('2030-02-28T00:00:00.000Z');
  });

  it('ignores a date that is not a real calendar day', () => {
    expect(serviceLifeEnd(gear('carabiner', { manufacturedOn: '2020-02-31', serviceLifeYears: 10 }), 'UTC')).toBeNull();
  });
});

describe('pointStatusAt', () => {
  it('reports a healthy, recently cleared point as cleared, with no reasons', () => {
    expect(pointStatusAt(healthyPoint(), policy, midJune)).toEqual({
      status: 'cleared',
      clearedUntil: new Date('2025-07-02T09:00:00Z'),
      reasons: [],
    });
  });

  describe('expiring window', () => {
    const until = new Date('2025-07-02T09:00:00Z');

    it('turns expiring when clearedUntil falls within the warning window after t', () => {
      expect(pointStatusAt(healthyPoint(), policy, new Date('2025-06-25T09:00:00Z')).status).toBe('expiring');
      expect(pointStatusAt(healthyPoint(), policy, new Date(until.getTime() - 1)).status).toBe('expiring');
    });

    it('stays cleared just before the window opens', () => {
      expect(pointStatusAt(healthyPoint(), policy, new Date('2025-06-25T08:59:59.999Z')).status).toBe('cleared');
    });

    it('never reports expiring with a warning window of zero days', () => {
      const noWarning = { ...policy, warningDays: 0 };
      expect(pointStatusAt(healthyPoint(), noWarning, new Date(until.getTime() - 1)).status).toBe('cleared');
    });

    it('is expiring because of the apparatus inspection running out soon', () => {
      const point = healthyPoint();
      point.links[5].gear.inspectedUntil = new Date('2025-06-12T12:00:00Z');
      expect(pointStatusAt(point, policy, midJune).status).toBe('expiring');
    });
  });

  describe('inspection_lapsed', () => {
    it('blocks at the very instant clearedUntil is reached, naming the date in the studio zone', () => {
      const status = pointStatusAt(healthyPoint(), policy, new Date('2025-07-02T09:00:00Z'));
      expect(status.status).toBe('blocked');
      expect(status.clearedUntil?.toISOString()).toBe('2025-07-02T09:00:00.000Z');
      expect(status.reasons).toEqual([
        { code: 'inspection_lapsed', message: 'Clearance of point B-2 lapsed on 2 Jul 2025, 10:00' },
      ]);
    });

    it('names 10:00 GMT for a clearance that runs out after the October clock change', () => {
      const point = healthyPoint({ lastClearance: { at: new Date('2025-10-01T09:00:00Z'), voidedAt: null } });
      point.links[5].gear.inspectedUntil = new Date('2026-06-01T00:00:00Z');
      expect(pointStatusAt(point, policy, new Date('2025-10-31T09:30:00Z')).status).toBe('expiring');
      const lapsed = pointStatusAt(point, policy, new Date('2025-10-31T10:00:00Z'));
      expect(lapsed.reasons.map((r) => r.message)).toEqual(['Clearance of point B-2 lapsed on 31 Oct 2025, 10:00']);
    });

    it('blocks a point that has never been cleared', () => {
      const status = pointStatusAt(healthyPoint({ lastClearance: null }), policy, midJune);
      expect(status).toMatchObject({ status: 'blocked', clearedUntil: null });
      expect(status.reasons).toEqual([{ code: 'inspection_lapsed', message: 'Point B-2 has never been cleared by a rigger' }]);
    });

    it('clears again once a rigger records a new clearance', () => {
      const renewed = healthyPoint({ lastClearance: { at: new Date('2025-07-03T08:00:00Z'), voidedAt: null } });
      expect(pointStatusAt(renewed, policy, new Date('2025-07-03T09:00:00Z')).status).toBe('cleared');
    });

    it("lapses with the apparatus's own inspection, and says so", () => {
      const point = healthyPoint();
      point.links[5].gear.inspectedUntil = new Date('2025-06-09T09:00:00Z');
      const status = pointStatusAt(point, policy, midJune);
      expect(status.status).toBe('blocked');
      expect(status.reasons).toEqual([
        {
          code: 'inspection_lapsed',
          message: 'Clearance of point B-2 ran out on 9 Jun 2025, 10:00 with the inspection of fabric FB-12',
        },
        { code: 'gear_unfit', message: 'Fabric FB-12 is past its own inspection, which ran out on 9 Jun 2025, 10:00' },
      ]);
    });
  });

  describe('awaiting_clearance', () => {
    it('reports a voided clearance as awaiting clearance, not as lapsed, even long after the interval', () => {
      const point = healthyPoint({ lastClearance: { at: clearedAt, voidedAt: new Date('2025-06-05T13:00:00Z') } });
      point.links[5].gear.inspectedUntil = new Date('2027-01-01T00:00:00Z');
      for (const t of [midJune, new Date('2026-01-01T00:00:00Z')]) {
        const status = pointStatusAt(point, policy, t);
        expect(status).toMatchObject({ status: 'blocked', clearedUntil: null });
        expect(status.reasons).toEqual([
          {
            code: 'awaiting_clearance',
            message: "Point B-2 awaits a rigger's clearance: its clearance was voided on 5 Jun 2025, 14:00",
          },
        ]);
      }
    });
  });

  describe('no_load_path', () => {
    it('blocks a point with no links at all', () => {
      expect(codes(healthyPoint({ links: [] }), midJune)).toEqual(['no_load_path']);
    });

    it('blocks a point that holds only an apparatus, with no fixed rigging above it', () => {
      const point = healthyPoint();
      point.links = [point.links[5]];
      expect(codes(point, midJune)).toContain('no_load_path');
    });
  });

  describe('fault_open', () => {
    it('blocks for an open fault on gear in the path, naming the gear and the fault', () => {
      const point = healthyPoint();
      point.openFaults = [
        { id: 1, pointId: null, gearId: point.links[3].gear.id, severity: 'low', description: 'bearing grinds' },
      ];
      const status = pointStatusAt(point, policy, midJune);
      expect(status.status).toBe('blocked');
      expect(status.reasons).toEqual([{ code: 'fault_open', message: 'Open fault on swivel SW-0031: bearing grinds' }]);
    });

    it('blocks for an open fault on the point itself, whatever its severity', () => {
      const point = healthyPoint({
        openFaults: [{ id: 2, pointId: 7, gearId: null, severity: 'low', description: 'paint flaking at the clamp' }],
      });
      expect(pointStatusAt(point, policy, midJune).reasons).toEqual([
        { code: 'fault_open', message: 'Open fault on point B-2: paint flaking at the clamp' },
      ]);
    });

    it('lists every open fault', () => {
      const point = healthyPoint();
      point.openFaults = [
        { id: 1, pointId: null, gearId: point.links[3].gear.id, severity: 'high', description: 'bearing grinds' },
        { id: 2, pointId: 7, gearId: null, severity: 'medium', description: 'crack in the beam' },
      ];
      expect(codes(point, midJune)).toEqual(['fault_open', 'fault_open']);
    });
  });

  describe('gear_unfit', () => {
    it('blocks while a path item is quarantined and clears when it is back in service', () => {
      const point = healthyPoint();
      point.links[2].gear.status = 'quarantined';
      expect(pointStatusAt(point, policy, midJune).reasons).toEqual([
        { code: 'gear_unfit', message: `Carabiner ${point.links[2].gear.serial} is quarantined` },
      ]);
      point.links[2].gear.status = 'in_service';
      expect(pointStatusAt(point, policy, midJune).status).toBe('cleared');
    });

    it('blocks for a retired item in the path', () => {
      const point = healthyPoint();
      point.links[1].gear.status = 'retired';
      expect(pointStatusAt(point, policy, midJune).reasons).toEqual([
        { code: 'gear_unfit', message: `Round sling ${point.links[1].gear.serial} is retired` },
      ]);
    });

    it('blocks from the first instant of the day the service life ends, in the studio zone', () => {
      const point = healthyPoint();
      Object.assign(point.links[1].gear, { manufacturedOn: '2015-06-12', serviceLifeYears: 10 });
      // Midnight BST on 12 June 2025 is 23:00Z on the 11th.
      expect(pointStatusAt(point, policy, new Date('2025-06-11T22:59:59.999Z')).status).toBe('cleared');
      const status = pointStatusAt(point, policy, new Date('2025-06-11T23:00:00Z'));
      expect(status.status).toBe('blocked');
      expect(status.reasons).toEqual([
        {
          code: 'gear_unfit',
          message: `Round sling ${point.links[1].gear.serial} is past its service life (it ended on 12 Jun 2025)`,
        },
      ]);
    });

    it('blocks for a mounted apparatus that has never passed an inspection', () => {
      const point = healthyPoint();
      point.links[5].gear.inspectedUntil = null;
      const status = pointStatusAt(point, policy, midJune);
      expect(status).toMatchObject({ status: 'blocked', clearedUntil: null });
      expect(status.reasons).toEqual([{ code: 'gear_unfit', message: 'Fabric FB-12 has never passed an inspection' }]);
    });

    it("does not hold a fixed link to its own inspection date: the point's clearance covers it", () => {
      const point = healthyPoint();
      point.links[2].gear.inspectedUntil = new Date('2025-01-01T00:00:00Z');
      expect(pointStatusAt(point, policy, midJune).status).toBe('cleared');
    });
  });

  describe('rule_violation', () => {
    it('blocks for a three-way load on a connector not rated multi-directional, with the rule message', () => {
      const point = healthyPoint();
      point.links[4] = link(point.links[4].gear, { threeWay: true });
      const status = pointStatusAt(point, policy, midJune);
      expect(status.status).toBe('blocked');
      expect(status.reasons).toHaveLength(1);
      expect(status.reasons[0].code).toBe('rule_violation');
      expect(status.reasons[0].message).toMatch(/three-way/);
      expect(status.reasons[0].message).toContain(point.links[4].gear.serial);
    });

    it('clears with a delta screw link rated multi-directional in that place', () => {
      const point = healthyPoint();
      point.links[4] = link(gear('screw_link_delta', { multiDirectional: true }), { threeWay: true });
      expect(pointStatusAt(point, policy, midJune).status).toBe('cleared');
    });

    it('blocks for wide material past the halfway point of a carabiner basket', () => {
      const point = healthyPoint();
      point.links[2] = link(point.links[2].gear, { basketOverHalf: true });
      expect(codes(point, midJune)).toEqual(['rule_violation']);
    });

    it('does not block for a warning such as a cross-loaded link', () => {
      const point = healthyPoint();
      point.links[2] = link(point.links[2].gear, { mode: 'minor' });
      expect(pointStatusAt(point, policy, midJune).status).toBe('cleared');
    });
  });

  describe('out_of_service', () => {
    it('blocks a point marked out of service and clears when it is back', () => {
      expect(pointStatusAt(healthyPoint({ inService: false }), policy, midJune).reasons).toEqual([
        { code: 'out_of_service', message: 'Point B-2 is marked out of service' },
      ]);
      expect(pointStatusAt(healthyPoint({ inService: true }), policy, midJune).status).toBe('cleared');
    });
  });

  it('lists every reason that holds at once, and never reads as cleared', () => {
    const point = healthyPoint({ inService: false, lastClearance: { at: clearedAt, voidedAt: clearedAt } });
    point.links[1].gear.status = 'retired';
    point.links[4] = link(point.links[4].gear, { threeWay: true });
    point.openFaults = [{ id: 3, pointId: 7, gearId: null, severity: 'low', description: 'loose bolt' }];
    const status = pointStatusAt(point, policy, midJune);
    expect(status.status).toBe('blocked');
    expect(new Set(status.reasons.map((r) => r.code))).toEqual(
      new Set(['out_of_service', 'fault_open', 'awaiting_clearance', 'gear_unfit', 'rule_violation']),
    );
    const bare = healthyPoint({ links: [], lastClearance: null });
    expect(new Set(codes(bare, midJune))).toEqual(new Set(['no_load_path', 'inspection_lapsed']));
  });
});

describe('pointStatusOver', () => {
  const start = new Date('2025-06-20T17:00:00Z');
  const end = new Date('2025-06-20T18:30:00Z');

  it('is cleared with nothing to report when the point stays cleared throughout', () => {
    expect(pointStatusOver(healthyPoint(), policy, start, end)).toEqual({
      status: 'cleared',
      clearedUntil: new Date('2025-07-02T09:00:00Z'),
      blockedReasons: [],
      dueBeforeEnd: [],
    });
    // Ends 25 Jun 11:00, and the clearance runs out within 7 days of that.
    const late = pointStatusOver(healthyPoint(), policy, new Date('2025-06-25T09:00:00Z'), new Date('2025-06-25T10:00:00Z'));
    expect(late.status).toBe('expiring');
  });

  it('reports gear reaching its service life during the period as a blocked reason', () => {
    const point = healthyPoint();
    // Ends at midnight BST starting 20 June 2025: 23:00Z on the 19th, before the start.
    Object.assign(point.links[1].gear, { inServiceOn: '2020-06-20', serviceLifeYears: 5 });
    const holding = pointStatusOver(point, policy, start, end);
    expect(holding.blockedReasons.map((r) => r.code)).toEqual(['gear_unfit']);
    // The same limit falling inside a session that starts the evening before.
    const evening = pointStatusOver(point, policy, new Date('2025-06-19T22:00:00Z'), new Date('2025-06-19T23:30:00Z'));
    expect(evening.status).toBe('blocked');
    expect(evening.blockedReasons).toEqual([
      {
        code: 'gear_unfit',
        message: `Round sling ${point.links[1].gear.serial} reaches the end of its service life on 20 Jun 2025`,
      },
    ]);
    // A session that ends before midnight is untouched.
    const early = pointStatusOver(point, policy, new Date('2025-06-19T20:00:00Z'), new Date('2025-06-19T22:59:00Z'));
    expect(early.blockedReasons).toEqual([]);
  });

  it('reports the clearance running out during the period as due, not as blocked', () => {
    const over = pointStatusOver(healthyPoint(), policy, new Date('2025-07-02T08:00:00Z'), new Date('2025-07-02T10:00:00Z'));
    expect(over.status).toBe('blocked');
    expect(over.blockedReasons).toEqual([]);
    expect(over.dueBeforeEnd).toEqual([{ code: 'inspection_due', message: 'Point B-2: needs inspection, cleared only until 2 Jul 2025, 10:00' }]);
  });

  it('reports a clearance already run out at the start as due, not as blocked', () => {
    const over = pointStatusOver(healthyPoint(), policy, new Date('2025-07-05T08:00:00Z'), new Date('2025-07-05T10:00:00Z'));
    expect(over.blockedReasons).toEqual([]);
    expect(over.dueBeforeEnd.map((r) => r.code)).toEqual(['inspection_due']);
  });

  it("reports the apparatus's inspection running out during the period as due", () => {
    const point = healthyPoint();
    point.links[5].gear.inspectedUntil = new Date('2025-06-20T18:00:00Z');
    const over = pointStatusOver(point, policy, start, end);
    expect(over.blockedReasons).toEqual([]);
    expect(over.dueBeforeEnd).toEqual([{ code: 'inspection_due', message: 'Fabric FB-12: needs inspection, inspected only until 20 Jun 2025, 19:00' }]);
  });

  it('keeps standing reasons at the start as blocked reasons', () => {
    const point = healthyPoint({
      inService: false,
      openFaults: [{ id: 1, pointId: 7, gearId: null, severity: 'low', description: 'loose bolt' }],
    });
    const over = pointStatusOver(point, policy, start, end);
    expect(over.status).toBe('blocked');
    expect(over.blockedReasons.map((r) => r.code)).toEqual(['out_of_service', 'fault_open']);
  });
});
