import { TZDate } from '@date-fns/tz';
import { addDays } from 'date-fns';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  gearRatingChangeVoids,
  pathConfigOf,
  pointStatusAt,
  policyClearanceEnd,
  voidsClearance,
  type ClearanceRecord,
  type GearSnapshot,
  type LinkSnapshot,
  type PointSnapshot,
} from '../../../shared/clearance';
import { defaultPolicy, type Policy } from '../../../shared/schemas/policy';
import type { ApparatusKind, GearKind } from '../../../shared/schemas/vocabulary';

/*
 * Random histories of one rigging point — clearances, policy changes, faults, retirements, incidents, load-path
 * edits, apparatus swaps, inspections, time passing — are applied to a small world. After each
 * step the module's status is compared with a reference model written here from PRODUCT.md §4.1,
 * on its own terms: it shares the world, not the module's logic. Voiding is tracked twice: the
 * module's side decides with `voidsClearance`/`gearRatingChangeVoids`, the model's side from what
 * the action was.
 */

// Europe/London, textile 30 d, hardware 90 d, structure 365 d, warning 7 d [studio choice] to begin
// with; the owner may change the intervals at any step (§4.9).
const ZONE = defaultPolicy.timeZone;
const POINT_ID = 1;

// ---------------------------------------------------------------------------------------------
// Actions

interface NewGear {
  kind: GearKind;
  multiDirectional: boolean;
  majorKn: number;
  life: { year: number; month: number; day: number; years: number } | null;
}

type Action =
  | { type: 'advance'; hours: number }
  | { type: 'clearance'; pass: boolean }
  | { type: 'fault'; onPoint: boolean; pick: number }
  | { type: 'resolve'; pick: number }
  | { type: 'retire'; pick: number }
  | { type: 'incident'; pick: number }
  | { type: 'afterIncidentPass'; pick: number }
  | { type: 'inspectApparatus' }
  | { type: 'addLink'; at: number; gear: NewGear; threeWay: boolean; basketOverHalf: boolean }
  | { type: 'removeLink'; pick: number }
  | { type: 'swapLink'; pick: number; gear: NewGear }
  | { type: 'reorder'; pick: number }
  | { type: 'flipMode'; pick: number }
  | { type: 'flipThreeWay'; pick: number }
  | { type: 'flipBasket'; pick: number }
  | { type: 'rerate'; pick: number; deltaKn: number; onApparatus: boolean }
  | { type: 'mountApparatus'; kind: ApparatusKind; inspectedForDays: number | null; life: NewGear['life'] }
  | { type: 'unmountApparatus' }
  | { type: 'resave' }
  | { type: 'restructure'; deltaKn: number }
  | { type: 'toggleService' }
  | { type: 'repolicy'; textile: number; hardware: number; structure: number };

const fixedKindArb = fc.constantFrom<GearKind>(
  'beam_clamp',
  'round_sling',
  'span_set',
  'wire_rope_sling',
  'carabiner',
  'screw_link_delta',
  'quick_link',
  'swivel',
);
const apparatusKindArb = fc.constantFrom<ApparatusKind>('fabric', 'hoop', 'trapeze', 'hammock', 'straps', 'rope');
const rarely = fc.integer({ min: 0, max: 9 }).map((n) => n === 0);
const lifeArb = fc.option(
  fc.record({
    year: fc.integer({ min: 2014, max: 2025 }),
    month: fc.integer({ min: 1, max: 12 }),
    day: fc.integer({ min: 1, max: 28 }),
    years: fc.integer({ min: 1, max: 12 }),
  }),
  { nil: null, freq: 2 },
);
const newGearArb: fc.Arbitrary<NewGear> = fc.record({
  kind: fixedKindArb,
  multiDirectional: fc.boolean(),
  majorKn: fc.integer({ min: 20, max: 60 }),
  life: lifeArb,
});
const pick = fc.nat({ max: 1000 });
const nonZero = fc.integer({ min: -8, max: 8 }).filter((n) => n !== 0);

const actionArb: fc.Arbitrary<Action> = fc.oneof(
  { weight: 6, arbitrary: fc.record({ type: fc.constant('advance' as const), hours: fc.oneof(fc.integer({ min: 1, max: 48 }), fc.integer({ min: 24, max: 24 * 60 })) }) },
  { weight: 6, arbitrary: fc.record({ type: fc.constant('clearance' as const), pass: fc.integer({ min: 0, max: 4 }).map((n) => n > 0) }) },
  { weight: 2, arbitrary: fc.record({ type: fc.constant('fault' as const), onPoint: fc.boolean(), pick }) },
  { weight: 3, arbitrary: fc.record({ type: fc.constant('resolve' as const), pick }) },
  { weight: 1, arbitrary: fc.record({ type: fc.constant('retire' as const), pick }) },
  { weight: 2, arbitrary: fc.record({ type: fc.constant('incident' as const), pick }) },
  { weight: 2, arbitrary: fc.record({ type: fc.constant('afterIncidentPass' as const), pick }) },
  { weight: 3, arbitrary: fc.record({ type: fc.constant('inspectApparatus' as const) }) },
  {
    weight: 1,
    arbitrary: fc.record({
      type: fc.constant('addLink' as const),
      at: pick,
      gear: newGearArb,
      threeWay: rarely,
      basketOverHalf: rarely,
    }),
  },
  { weight: 1, arbitrary: fc.record({ type: fc.constant('removeLink' as const), pick }) },
  { weight: 1, arbitrary: fc.record({ type: fc.constant('swapLink' as const), pick, gear: newGearArb }) },
  { weight: 1, arbitrary: fc.record({ type: fc.constant('reorder' as const), pick }) },
  { weight: 1, arbitrary: fc.record({ type: fc.constant('flipMode' as const), pick }) },
  { weight: 1, arbitrary: fc.record({ type: fc.constant('flipThreeWay' as const), pick }) },
  { weight: 1, arbitrary: fc.record({ type: fc.constant('flipBasket' as const), pick }) },
  { weight: 1, arbitrary: fc.record({ type: fc.constant('rerate' as const), pick, deltaKn: nonZero, onApparatus: fc.boolean() }) },
  {
    weight: 2,
    arbitrary: fc.record({
      type: fc.constant('mountApparatus' as const),
      kind: apparatusKindArb,
      inspectedForDays: fc.option(fc.integer({ min: 1, max: 120 }), { nil: null, freq: 4 }),
      life: lifeArb,
    }),
  },
  { weight: 1, arbitrary: fc.record({ type: fc.constant('unmountApparatus' as const) }) },
  { weight: 2, arbitrary: fc.record({ type: fc.constant('resave' as const) }) },
  { weight: 1, arbitrary: fc.record({ type: fc.constant('restructure' as const), deltaKn: nonZero }) },
  { weight: 1, arbitrary: fc.record({ type: fc.constant('toggleService' as const) }) },
  {
    weight: 2,
    arbitrary: fc.record({
      type: fc.constant('repolicy' as const),
      textile: fc.constantFrom(7, 14, 30, 60, 365),
      hardware: fc.constantFrom(14, 30, 90, 180, 3650),
      structure: fc.constantFrom(30, 90, 365, 3650),
    }),
  },
);

// ---------------------------------------------------------------------------------------------
// The world both sides look at

interface WorldLink {
  gearId: number;
  mode: 'major' | 'minor';
  threeWay: boolean;
  basketOverHalf: boolean;
}

interface World {
  now: Date;
  policy: Policy;
  nextId: number;
  gear: Map<number, GearSnapshot>;
  fixed: WorldLink[];
  apparatusId: number | null;
  structuralRatingKn: number;
  inService: boolean;
  faults: Array<{ id: number; pointId: number | null; gearId: number | null; open: boolean }>;
  /** Voided by the module's own voiding functions. */
  moduleClearance: ClearanceRecord | null;
  /** Voided by the reference model's reading of what each action was. */
  modelClearance: ClearanceRecord | null;
}

const isoDay = (l: { year: number; month: number; day: number }) =>
  `${l.year}-${String(l.month).padStart(2, '0')}-${String(l.day).padStart(2, '0')}`;

function makeGear(world: World, kind: GearKind, multiDirectional: boolean, majorKn: number, life: NewGear['life']): GearSnapshot {
  const id = world.nextId++;
  const g: GearSnapshot = {
    id,
    kind,
    material: 'steel',
    gate: 'screw',
    serial: `G-${id}`,
    majorKn,
    minorKn: null,
    gateOpenKn: null,
    wllKn: null,
    multiDirectional,
    status: 'in_service',
    manufacturedOn: life ? isoDay(life) : null,
    inServiceOn: null,
    serviceLifeYears: life ? life.years : null,
    inspectedUntil: null,
  };
  world.gear.set(id, g);
  return g;
}

function pathGearIds(world: World): number[] {
  return [...world.fixed.map((l) => l.gearId), ...(world.apparatusId === null ? [] : [world.apparatusId])];
}

function snapshotOf(world: World, clearance: ClearanceRecord | null): PointSnapshot {
  const ids = pathGearIds(world);
  const links: LinkSnapshot[] = world.fixed.map((l) => ({
    gear: { ...world.gear.get(l.gearId)! },
    mode: l.mode,
    threeWay: l.threeWay,
    basketOverHalf: l.basketOverHalf,
    leg: null,
    includedAngleDeg: null,
  }));
  if (world.apparatusId !== null) {
    links.push({
      gear: { ...world.gear.get(world.apparatusId)! },
      mode: 'major',
      threeWay: false,
      basketOverHalf: false,
      leg: null,
      includedAngleDeg: null,
    });
  }
  return {
    id: POINT_ID,
    label: 'P-1',
    structure: 'beam',
    structuralRatingKn: world.structuralRatingKn,
    inService: world.inService,
    apparatus: ['fabric', 'hoop', 'trapeze', 'hammock', 'straps', 'rope'],
    maxPerformers: 2,
    links,
    lastClearance: clearance ? { ...clearance } : null,
    openFaults: world.faults
      .filter((f) => f.open && (f.pointId === POINT_ID || (f.gearId !== null && ids.includes(f.gearId))))
      .map((f) => ({ id: f.id, pointId: f.pointId, gearId: f.gearId, severity: 'low' as const, description: 'worn' })),
  };
}

// ---------------------------------------------------------------------------------------------
// The reference model: §4.1 read plainly.

const TEXTILE_KINDS = new Set<GearKind>(['round_sling', 'span_set', 'fabric', 'trapeze', 'hammock', 'straps', 'rope']);
const CONNECTOR_KINDS = new Set<GearKind>(['carabiner', 'screw_link_delta', 'screw_link_tri', 'quick_link']);

function intervalDaysOf(kind: GearKind, policy: Policy): number {
  return TEXTILE_KINDS.has(kind) ? policy.intervalDays.textile : policy.intervalDays.hardware;
}

/** The point's own interval under a policy: the structure's and each fixed link's, the shortest. */
function pointDays(world: World, policy: Policy): number {
  let days = policy.intervalDays.structure;
  for (const l of world.fixed) days = Math.min(days, intervalDaysOf(world.gear.get(l.gearId)!.kind, policy));
  return days;
}

/** Same wall-clock time `days` later in the studio zone. */
function plusStudioDays(d: Date, days: number): Date {
  return new Date(addDays(new TZDate(d.getTime(), ZONE), days).getTime());
}

function referenceLifeEnd(g: GearSnapshot): Date | null {
  if (!g.manufacturedOn || g.serviceLifeYears === null) return null;
  const [y, m, d] = g.manufacturedOn.split('-').map(Number);
  // Days are generated at most 28, so the anniversary always exists.
  return new Date(new TZDate(y + g.serviceLifeYears, m - 1, d, ZONE).getTime());
}

interface Expected {
  status: 'cleared' | 'expiring' | 'blocked';
  clearedUntil: Date | null;
  codes: string[];
}

function reference(world: World, t: Date): Expected {
  const codes: string[] = [];
  const ids = pathGearIds(world);
  const apparatus = world.apparatusId === null ? null : world.gear.get(world.apparatusId)!;

  if (!world.inService) codes.push('out_of_service');
  if (world.fixed.length === 0) codes.push('no_load_path');
  for (const f of world.faults) {
    if (f.open && (f.pointId === POINT_ID || (f.gearId !== null && ids.includes(f.gearId)))) codes.push('fault_open');
  }

  let until: Date | null = null;
  const c = world.modelClearance;
  if (c === null) {
    codes.push('inspection_lapsed');
  } else if (c.voidedAt !== null) {
    codes.push('awaiting_clearance');
  } else {
    // §4.9: the end kept when signed, unless today's policy gives a sooner one.
    const byPolicy = plusStudioDays(c.at, pointDays(world, world.policy));
    until = c.until && c.until < byPolicy ? c.until : byPolicy;
    if (apparatus) {
      const own = apparatus.inspectedUntil;
      until = own === null ? null : own < until ? own : until;
    }
    if (until !== null && t >= until) codes.push('inspection_lapsed');
  }

  for (const id of ids) {
    const g = world.gear.get(id)!;
    if (g.status !== 'in_service') codes.push('gear_unfit');
    const end = referenceLifeEnd(g);
    if (end !== null && t >= end) codes.push('gear_unfit');
  }
  if (apparatus && (apparatus.inspectedUntil === null || t >= apparatus.inspectedUntil)) codes.push('gear_unfit');

  for (const l of world.fixed) {
    const g = world.gear.get(l.gearId)!;
    if (l.threeWay && CONNECTOR_KINDS.has(g.kind) && !g.multiDirectional) codes.push('rule_violation');
    if (l.basketOverHalf && g.kind === 'carabiner') codes.push('rule_violation');
  }

  if (codes.length > 0) return { status: 'blocked', clearedUntil: until, codes: codes.sort() };
  const windowEnd = plusStudioDays(t, world.policy.warningDays);
  return { status: until! <= windowEnd ? 'expiring' : 'cleared', clearedUntil: until, codes: [] };
}

// ---------------------------------------------------------------------------------------------
// Applying an action to the world, voiding on both sides.

function voidBoth(world: World, moduleVoids: boolean, modelVoids: boolean): void {
  if (moduleVoids && world.moduleClearance && !world.moduleClearance.voidedAt) {
    world.moduleClearance = { ...world.moduleClearance, voidedAt: world.now };
  }
  if (modelVoids && world.modelClearance && !world.modelClearance.voidedAt) {
    world.modelClearance = { ...world.modelClearance, voidedAt: world.now };
  }
}

function openFaultsOnPath(world: World): boolean {
  const ids = pathGearIds(world);
  return world.faults.some((f) => f.open && (f.pointId === POINT_ID || (f.gearId !== null && ids.includes(f.gearId))));
}

function openFault(world: World, pointId: number | null, gearId: number | null): void {
  world.faults.push({ id: world.faults.length + 1, pointId, gearId, open: true });
  // A fault opened on the point or its path voids the clearance it follows (§4.1), on both sides.
  voidBoth(world, true, true);
}

function apply(world: World, action: Action): void {
  const path = pathGearIds(world);
  const pickPath = (n: number) => (path.length === 0 ? null : world.gear.get(path[n % path.length])!);
  const fixedIndex = (n: number) => (world.fixed.length === 0 ? null : n % world.fixed.length);

  // The load path as saved before an edit, for the module's voiding decision.
  const before = pathConfigOf(snapshotOf(world, null));
  let modelVoids = false;
  let pathEdit = false;

  switch (action.type) {
    case 'advance':
      world.now = new Date(world.now.getTime() + action.hours * 3_600_000);
      return;
    case 'clearance':
      if (!action.pass) {
        // A failed item opens a fault on the point instead of clearing it.
        openFault(world, POINT_ID, null);
        return;
      }
      // A rigger's clearance is recorded only while no fault is open on the point or its path.
      if (openFaultsOnPath(world)) return;
      // The end is worked out as the rigger signs and kept with the clearance (§4.9): the module's
      // side by the module's rule, the model's side by its own reading.
      world.moduleClearance = { at: world.now, voidedAt: null, until: policyClearanceEnd(world.now, snapshotOf(world, null).links, world.policy) };
      world.modelClearance = { at: world.now, voidedAt: null, until: plusStudioDays(world.now, pointDays(world, world.policy)) };
      for (const id of path) {
        const g = world.gear.get(id)!;
        g.inspectedUntil = plusStudioDays(world.now, intervalDaysOf(g.kind, world.policy));
      }
      return;
    case 'fault': {
      const g = pickPath(action.pick);
      if (action.onPoint || !g) openFault(world, POINT_ID, null);
      else openFault(world, null, g.id);
      return;
    }
    case 'resolve': {
      const open = world.faults.filter((f) => f.open);
      // A resolved fault never reopens a point by itself.
      if (open.length > 0) open[action.pick % open.length].open = false;
      return;
    }
    case 'retire': {
      const g = pickPath(action.pick);
      if (g) g.status = 'retired';
      return;
    }
    case 'incident': {
      // An arrested fall, drop, ... quarantines the item; it opens no fault and voids nothing.
      const g = pickPath(action.pick);
      if (g && g.status !== 'retired') g.status = 'quarantined';
      return;
    }
    case 'afterIncidentPass': {
      const g = pickPath(action.pick);
      if (g && g.status === 'quarantined') {
        g.status = 'in_service';
        g.inspectedUntil = plusStudioDays(world.now, intervalDaysOf(g.kind, world.policy));
      }
      return;
    }
    case 'inspectApparatus': {
      if (world.apparatusId === null) return;
      const g = world.gear.get(world.apparatusId)!;
      g.inspectedUntil = plusStudioDays(world.now, intervalDaysOf(g.kind, world.policy));
      return;
    }
    case 'addLink': {
      const g = makeGear(world, action.gear.kind, action.gear.multiDirectional, action.gear.majorKn, action.gear.life);
      world.fixed.splice(action.at % (world.fixed.length + 1), 0, {
        gearId: g.id,
        mode: 'major',
        threeWay: action.threeWay,
        basketOverHalf: action.basketOverHalf,
      });
      modelVoids = true;
      pathEdit = true;
      break;
    }
    case 'removeLink': {
      const i = fixedIndex(action.pick);
      if (i === null) return;
      world.fixed.splice(i, 1);
      modelVoids = true;
      pathEdit = true;
      break;
    }
    case 'swapLink': {
      const i = fixedIndex(action.pick);
      if (i === null) return;
      const g = makeGear(world, action.gear.kind, action.gear.multiDirectional, action.gear.majorKn, action.gear.life);
      world.fixed[i] = { ...world.fixed[i], gearId: g.id };
      modelVoids = true;
      pathEdit = true;
      break;
    }
    case 'reorder': {
      if (world.fixed.length < 2) return;
      const i = action.pick % (world.fixed.length - 1);
      [world.fixed[i], world.fixed[i + 1]] = [world.fixed[i + 1], world.fixed[i]];
      modelVoids = true;
      pathEdit = true;
      break;
    }
    case 'flipMode':
    case 'flipThreeWay':
    case 'flipBasket': {
      const i = fixedIndex(action.pick);
      if (i === null) return;
      const l = world.fixed[i];
      world.fixed[i] =
        action.type === 'flipMode'
          ? { ...l, mode: l.mode === 'major' ? 'minor' : 'major' }
          : action.type === 'flipThreeWay'
            ? { ...l, threeWay: !l.threeWay }
            : { ...l, basketOverHalf: !l.basketOverHalf };
      modelVoids = true;
      pathEdit = true;
      break;
    }
    case 'rerate': {
      const id = action.onApparatus ? world.apparatusId : world.fixed.length ? world.fixed[action.pick % world.fixed.length].gearId : null;
      if (id === null) return;
      const g = world.gear.get(id)!;
      const old = { ...g };
      const next = Math.max(10, g.majorKn + action.deltaKn);
      g.majorKn = next === g.majorKn ? g.majorKn + 1 : next;
      // The module's side decides as the gear editor would; the model knows fixed gear voids.
      voidBoth(world, gearRatingChangeVoids(old, g), !action.onApparatus);
      expect(voidsClearance(before, pathConfigOf(snapshotOf(world, null)))).toBe(!action.onApparatus);
      return;
    }
    case 'mountApparatus': {
      const g = makeGear(world, action.kind, false, 40, action.life);
      g.inspectedUntil = action.inspectedForDays === null ? null : plusStudioDays(world.now, action.inspectedForDays);
      world.apparatusId = g.id;
      pathEdit = true;
      break;
    }
    case 'unmountApparatus':
      if (world.apparatusId === null) return;
      world.apparatusId = null;
      pathEdit = true;
      break;
    case 'resave':
      pathEdit = true;
      break;
    case 'restructure':
      world.structuralRatingKn = Math.max(1, world.structuralRatingKn + action.deltaKn);
      if (world.structuralRatingKn === before.structuralRatingKn) world.structuralRatingKn += 1;
      modelVoids = true;
      pathEdit = true;
      break;
    case 'toggleService':
      world.inService = !world.inService;
      return;
    case 'repolicy':
      // Kept clearances keep their ends; the status rule takes the sooner of kept and today's.
      world.policy = { ...world.policy, intervalDays: { textile: action.textile, hardware: action.hardware, structure: action.structure } };
      return;
  }

  if (pathEdit) {
    const after = pathConfigOf(snapshotOf(world, null));
    const moduleVoids = voidsClearance(before, after);
    expect(moduleVoids, `voidsClearance after ${action.type}`).toBe(modelVoids);
    voidBoth(world, moduleVoids, modelVoids);
  }
}

// ---------------------------------------------------------------------------------------------

const initialArb = fc.record({
  fixed: fc.array(
    fc.record({ gear: newGearArb, threeWay: rarely, basketOverHalf: rarely, minor: rarely }),
    { minLength: 1, maxLength: 5 },
  ),
  apparatus: fc.option(fc.record({ kind: apparatusKindArb, inspectedForDays: fc.integer({ min: 1, max: 90 }) }), { nil: null, freq: 5 }),
  structuralRatingKn: fc.integer({ min: 5, max: 30 }),
});

describe('pointStatusAt against a reference model of §4.1', () => {
  it('agrees with the model over random histories and never reads as cleared while a rule blocks', () => {
    const seenStatus = new Set<string>();
    const seenCodes = new Set<string>();

    fc.assert(
      fc.property(
        initialArb,
        fc.array(fc.tuple(actionArb, fc.integer({ min: 0, max: 24 * 40 })), { minLength: 1, maxLength: 40 }),
        (initial, steps) => {
          const world: World = {
            now: new Date('2025-01-06T10:00:00Z'),
            policy: defaultPolicy,
            nextId: 1,
            gear: new Map(),
            fixed: [],
            apparatusId: null,
            structuralRatingKn: initial.structuralRatingKn,
            inService: true,
            faults: [],
            moduleClearance: null,
            modelClearance: null,
          };
          for (const f of initial.fixed) {
            const g = makeGear(world, f.gear.kind, f.gear.multiDirectional, f.gear.majorKn, f.gear.life);
            world.fixed.push({ gearId: g.id, mode: f.minor ? 'minor' : 'major', threeWay: f.threeWay, basketOverHalf: f.basketOverHalf });
          }
          if (initial.apparatus) {
            const g = makeGear(world, initial.apparatus.kind, false, 40, null);
            g.inspectedUntil = plusStudioDays(world.now, initial.apparatus.inspectedForDays);
            world.apparatusId = g.id;
          }

          for (const [action, probeHours] of steps) {
            const untilBefore = pointStatusAt(snapshotOf(world, world.moduleClearance), world.policy, world.now).clearedUntil;
            const policyBefore = world.policy;
            apply(world, action);
            if (action.type === 'repolicy') {
              const longer = (['textile', 'hardware', 'structure'] as const).every((k) => world.policy.intervalDays[k] >= policyBefore.intervalDays[k]);
              const after = pointStatusAt(snapshotOf(world, world.moduleClearance), world.policy, world.now).clearedUntil;
              const kept = world.moduleClearance && !world.moduleClearance.voidedAt ? world.moduleClearance.until! : null;
              // §4.9: lengthening an interval never takes a clearance past the end kept when it was
              // signed, and leaves an end that already was the kept one where it is.
              if (longer && kept && after && untilBefore) {
                expect(after.getTime()).toBeLessThanOrEqual(kept.getTime());
                if (untilBefore.getTime() === kept.getTime()) expect(after.getTime()).toBe(untilBefore.getTime());
              }
            }
            const snapshot = snapshotOf(world, world.moduleClearance);
            for (const t of [world.now, new Date(world.now.getTime() + probeHours * 3_600_000)]) {
              const actual = pointStatusAt(snapshot, world.policy, t);
              const expected = reference(world, t);
              seenStatus.add(actual.status);
              for (const r of actual.reasons) seenCodes.add(r.code);

              // The safety property first: whenever any rule blocks, never cleared or expiring.
              if (expected.codes.length > 0) expect(actual.status).toBe('blocked');
              if (actual.status !== 'blocked') expect(actual.reasons).toEqual([]);
              expect(actual.status).toBe(expected.status);
              expect(actual.reasons.map((r) => r.code).sort()).toEqual(expected.codes);
              expect(actual.clearedUntil?.getTime() ?? null).toBe(expected.clearedUntil?.getTime() ?? null);
              for (const r of actual.reasons) expect(r.message.length).toBeGreaterThan(0);
            }
          }
        },
      ),
      { numRuns: 2000 },
    );

    // The histories must actually reach every status and every reason, or the comparison proves little.
    expect([...seenStatus].sort()).toEqual(['blocked', 'cleared', 'expiring']);
    expect([...seenCodes].sort()).toEqual(
      ['awaiting_clearance', 'fault_open', 'gear_unfit', 'inspection_lapsed', 'no_load_path', 'out_of_service', 'rule_violation'].sort(),
    );
  });
});
