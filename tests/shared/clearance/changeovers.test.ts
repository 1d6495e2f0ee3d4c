import { describe, expect, it } from 'vitest';
import {
  apparatusUnfitReasons,
  byStrength,
  changeoverOf,
  classFitReasons,
  freezeSnapshot,
  hangFor,
  sessionRisk,
  type ClassOnPoint,
  type PointSnapshot,
} from '../../../shared/clearance';
import { defaultPolicy, type Policy } from '../../../shared/schemas/policy';
import { gear, healthyPoint, link } from './fixtures';

// Europe/London, factor 5, 90 kg, fabric 5.6, hoop 4.8 [studio choice on published figures].
const policy: Policy = defaultPolicy;
const now = new Date('2025-06-10T08:00:00Z');
const startsAt = new Date('2025-06-20T17:00:00Z'); // 18:00 in London (BST)
const endsAt = new Date('2025-06-20T18:00:00Z');

const silks: ClassOnPoint = { apparatus: 'fabric', performersPerPoint: 1, profile: { performers: 1, bodyMassKg: 90, dynamicFactor: 5.6 } };
const hoopClass: ClassOnPoint = { apparatus: 'hoop', performersPerPoint: 1, profile: { performers: 1, bodyMassKg: 90, dynamicFactor: 4.8 } };
const codes = (list: Array<{ code: string }>) => list.map((r) => r.code);
const risk = (points: PointSnapshot[], cls: ClassOnPoint = silks, p: Policy = policy, withoutApparatus: number[] = []) =>
  sessionRisk({ points, policy: p, now, startsAt, endsAt, cls, withoutApparatus });

/** The healthy point with its fabric swapped for one rated `majorKn`. */
function withFabric(majorKn: number): PointSnapshot {
  const p = healthyPoint();
  const links = [...p.links];
  links[links.length - 1] = link(gear('fabric', { material: 'nylon', gate: 'none', minorKn: null, gateOpenKn: null, serial: 'FB-WEAK', majorKn, inspectedUntil: new Date('2025-12-01T10:00:00Z') }));
  return { ...p, links };
}

describe('§4.6: a booked class re-checked on the point as it now hangs', () => {
  it('is not at risk on the healthy point: 12 kN structure and 40 kN links carry one silks performer', () => {
    expect(risk([healthyPoint()])).toEqual({ atRisk: false, reasons: [] });
  });

  it('turns at risk with load_check_failed when a 10 kN fabric is mounted (factor 2.0 against 5) [hand calculation]', () => {
    // W = 90 kg × 9.80665 × 5.6 = 4.94 kN; 10 ÷ 4.94 = 2.02.
    const r = risk([withFabric(10)]);
    expect(r.atRisk).toBe(true);
    expect(codes(r.reasons)).toEqual(['load_check_failed']);
    expect(r.reasons[0].message).toContain('B-2');
  });

  it('turns at risk when the required factor is raised above the factor the class achieves', () => {
    // 40 kN weakest link ÷ 4.94 kN = 8.1 achieved: fine at 5, not at 9.
    expect(risk([healthyPoint()]).atRisk).toBe(false);
    const r = risk([healthyPoint()], silks, { ...policy, requiredFactor: 9 });
    expect(codes(r.reasons)).toEqual(['load_check_failed']);
  });

  it('turns at risk when a heavier body mass puts the design load over the structure', () => {
    // 12 kN structure: 220 kg × g × 5.6 = 12.08 kN is over it [hand calculation].
    const heavier: ClassOnPoint = { ...silks, profile: { ...silks.profile, bodyMassKg: 220 } };
    expect(codes(risk([healthyPoint()], heavier).reasons)).toEqual(['load_check_failed']);
  });

  it('turns at risk with apparatus_not_allowed and too_many_performers when the point changes under the class', () => {
    const point = healthyPoint({ apparatus: ['hoop'] });
    const duo: ClassOnPoint = { ...silks, performersPerPoint: 2 };
    expect(codes(risk([point], duo).reasons)).toEqual(expect.arrayContaining(['apparatus_not_allowed', 'too_many_performers']));
  });

  it('does not re-ask double booking or an inspection running out far ahead', () => {
    // Cleared until 2 Jul; the class is on 20 Jun, outside the window from 10 Jun: nothing to say.
    expect(codes(classFitReasons(healthyPoint(), policy, silks))).toEqual([]);
  });

  it('names a point without an apparatus of the class kind as no_apparatus_available', () => {
    const r = risk([healthyPoint()], silks, policy, [7]);
    expect(codes(r.reasons)).toEqual(['no_apparatus_available']);
  });
});

describe('§4.7: the point as it hangs for a class', () => {
  const hoop = () => ({ gear: gear('hoop', { serial: 'HP-0102', majorKn: 24, gate: 'none', minorKn: null, gateOpenKn: null, inspectedUntil: new Date('2025-12-01T10:00:00Z') }), openFaults: [] });

  it('hangs the mounted apparatus when its kind is the class kind, and needs no changeover', () => {
    const p = healthyPoint();
    const h = hangFor(p, 'fabric', hoop());
    expect(h.snapshot).toBe(p);
    expect(h.changeover).toBe(false);
    expect(h.apparatus?.serial).toBe('FB-12');
  });

  it('hangs the recorded item in place of a mounted one of another kind, as a changeover', () => {
    const h = hangFor(healthyPoint(), 'hoop', hoop());
    expect(h.changeover).toBe(true);
    expect(h.snapshot.links.map((l) => l.gear.kind)).toEqual(['beam_clamp', 'round_sling', 'carabiner', 'swivel', 'carabiner', 'hoop']);
    expect(h.mounted?.serial).toBe('FB-12');
    const c = changeoverOf({ id: 7, label: 'LS-3' }, h, new Date('2025-06-20T17:30:00Z'), 'Europe/London', false);
    expect(c?.message).toBe('Mount hoop HP-0102 on LS-3 before 18:30');
    expect(changeoverOf({ id: 7, label: 'LS-3' }, h, new Date('2025-06-20T17:30:00Z'), 'Europe/London', true)?.message).toBe('Mount hoop HP-0102 on LS-3 before 18:30 on Fri 20 Jun');
  });

  it('runs the load check on the fixed links plus the recorded item', () => {
    const weakHoop = { gear: gear('hoop', { serial: 'HP-W', majorKn: 8, gate: 'none', minorKn: null, gateOpenKn: null, inspectedUntil: new Date('2025-12-01T10:00:00Z') }), openFaults: [] };
    const p = healthyPoint({ apparatus: ['fabric', 'hoop'] });
    expect(codes(risk([hangFor(p, 'hoop', weakHoop).snapshot], hoopClass).reasons)).toEqual(['load_check_failed']);
    expect(risk([hangFor(p, 'hoop', hoop()).snapshot], hoopClass).atRisk).toBe(false);
  });

  it('carries the faults of the item that will hang, not of the one coming down', () => {
    const p = healthyPoint({ apparatus: ['fabric', 'hoop'] });
    const fabricId = p.links[p.links.length - 1].gear.id;
    const faulted = { ...p, openFaults: [{ id: 1, pointId: null, gearId: fabricId, severity: 'low' as const, description: 'Frayed' }] };
    const item = hoop();
    const withHoopFault = { ...item, openFaults: [{ id: 2, pointId: null, gearId: item.gear.id, severity: 'high' as const, description: 'Cracked tab' }] };
    expect(hangFor(faulted, 'hoop', item).snapshot.openFaults).toEqual([]);
    expect(hangFor(faulted, 'hoop', withHoopFault).snapshot.openFaults.map((f) => f.description)).toEqual(['Cracked tab']);
  });

  it('keeps one answer per sealed point and item, and seals it', () => {
    const p = freezeSnapshot(healthyPoint());
    const item = hoop();
    const h = hangFor(p, 'hoop', item);
    expect(hangFor(p, 'hoop', item)).toBe(h);
    expect(Object.isFrozen(h.snapshot)).toBe(true);
  });

  it('hangs only the fixed links when no item of the class kind is known', () => {
    const h = hangFor(healthyPoint(), 'hoop', null);
    expect(h.apparatus).toBeNull();
    expect(h.snapshot.links.some((l) => l.gear.kind === 'fabric')).toBe(false);
  });
});

describe('a fit apparatus', () => {
  const until = new Date('2025-06-20T18:00:00Z');
  it('is in service, inspected past the end, within its service life and free of open faults', () => {
    const ok = gear('hoop', { inspectedUntil: new Date('2025-07-01T00:00:00Z') });
    expect(apparatusUnfitReasons(ok, [], policy, now, until)).toEqual([]);
    expect(codes(apparatusUnfitReasons({ ...ok, status: 'quarantined' }, [], policy, now, until))).toEqual(['gear_unfit']);
    expect(codes(apparatusUnfitReasons({ ...ok, inspectedUntil: null }, [], policy, now, until))).toEqual(['gear_unfit']);
    expect(apparatusUnfitReasons({ ...ok, inspectedUntil: new Date('2025-06-15T00:00:00Z') }, [], policy, now, until)[0].message).toMatch(/inspected only until/);
    expect(codes(apparatusUnfitReasons({ ...ok, manufacturedOn: '2015-06-01', serviceLifeYears: 10 }, [], policy, now, until))).toEqual(['gear_unfit']);
    expect(codes(apparatusUnfitReasons(ok, [{ id: 1, pointId: null, gearId: ok.id, severity: 'low', description: 'Scuffed' }], policy, now, until))).toEqual(['fault_open']);
  });

  it('is chosen strongest first, then by serial', () => {
    const items = [{ majorKn: 22, serial: 'HP-3' }, { majorKn: 26, serial: 'HP-2' }, { majorKn: 26, serial: 'HP-10' }];
    expect(items.sort(byStrength).map((i) => i.serial)).toEqual(['HP-2', 'HP-10', 'HP-3']);
  });
});
