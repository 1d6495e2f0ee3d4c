import type { GearSnapshot, LinkSnapshot, PointSnapshot } from '../../../shared/clearance';
import type { GearKind } from '../../../shared/schemas/vocabulary';

// Shared builders for the clearance tests; each test changes only what it is about.
let nextId = 1;
export function gear(kind: GearKind, over: Partial<GearSnapshot> = {}): GearSnapshot {
  const id = nextId++;
  return {
    id,
    kind,
    material: 'steel',
    gate: 'screw',
    serial: `SN-${id}`,
    majorKn: 40,
    minorKn: 12,
    gateOpenKn: 8,
    wllKn: null,
    multiDirectional: false,
    status: 'in_service',
    manufacturedOn: null,
    inServiceOn: null,
    serviceLifeYears: null,
    inspectedUntil: null,
    ...over,
  };
}

export function link(g: GearSnapshot, over: Partial<LinkSnapshot> = {}): LinkSnapshot {
  return { gear: g, mode: 'major', threeWay: false, basketOverHalf: false, leg: null, includedAngleDeg: null, ...over };
}

/** 10:00 in London (BST) on 2 June 2025; the round sling gives 30 days: cleared until 2 Jul 10:00. */
export const clearedAt = new Date('2025-06-02T09:00:00Z');

/** A beam clamp, a round sling, a carabiner, a swivel, a carabiner and a fabric, cleared on 2 June. */
export function healthyPoint(over: Partial<PointSnapshot> = {}): PointSnapshot {
  return {
    id: 7,
    label: 'B-2',
    structure: 'beam',
    structuralRatingKn: 12,
    inService: true,
    apparatus: ['fabric', 'hammock'],
    maxPerformers: 1,
    links: [
      link(gear('beam_clamp')),
      link(gear('round_sling', { material: 'polyester', gate: 'none', minorKn: null, gateOpenKn: null })),
      link(gear('carabiner')),
      link(gear('swivel', { serial: 'SW-0031', gate: 'none', gateOpenKn: null })),
      link(gear('carabiner')),
      link(gear('fabric', { material: 'nylon', gate: 'none', minorKn: null, gateOpenKn: null, serial: 'FB-12', inspectedUntil: new Date('2025-12-01T10:00:00Z') })),
    ],
    lastClearance: { at: clearedAt, voidedAt: null },
    openFaults: [],
    ...over,
  };
}
