import type { LinkInput, RatedGear } from '../../../shared/rigging';

let nextId = 1;

/** A gear item with sensible ratings (a steel screw-gate carabiner) unless told otherwise. */
export function gear(overrides: Partial<RatedGear> = {}): RatedGear {
  const id = nextId++;
  return {
    id,
    kind: 'carabiner',
    material: 'steel',
    gate: 'screw',
    serial: `G-${id}`,
    majorKn: 50,
    minorKn: 15,
    gateOpenKn: 15,
    wllKn: null,
    multiDirectional: false,
    ...overrides,
  };
}

/** A link loaded along its major axis, no three-way load, nothing in the basket, no bridle leg. */
export function link(gearOverrides: Partial<RatedGear> = {}, overrides: Partial<Omit<LinkInput, 'gear'>> = {}): LinkInput {
  return {
    gear: gear(gearOverrides),
    mode: 'major',
    threeWay: false,
    basketOverHalf: false,
    leg: null,
    includedAngleDeg: null,
    ...overrides,
  };
}

/** A round sling rated 100 kN breaking: strong, and not a connector. */
export function sling(overrides: Partial<RatedGear> = {}, linkOverrides: Partial<Omit<LinkInput, 'gear'>> = {}): LinkInput {
  return link(
    { kind: 'round_sling', material: 'polyester', gate: 'none', majorKn: 100, minorKn: null, gateOpenKn: null, ...overrides },
    linkOverrides,
  );
}

/** A fabric apparatus rated 40 kN. */
export function fabric(overrides: Partial<RatedGear> = {}): LinkInput {
  return link({ kind: 'fabric', material: 'nylon', gate: 'none', majorKn: 40, minorKn: null, gateOpenKn: null, ...overrides });
}

/** A typical silks point: beam clamp, round sling, carabiner, swivel, carabiner, fabric. */
export function typicalPath(): LinkInput[] {
  return [
    link({ kind: 'beam_clamp', gate: 'none', majorKn: 60, minorKn: null, gateOpenKn: null, serial: 'BC-1' }),
    sling({ serial: 'RS-1' }),
    link({ serial: 'CB-1', majorKn: 50 }),
    link({ kind: 'swivel', gate: 'none', majorKn: 36, minorKn: null, gateOpenKn: null, serial: 'SW-1' }),
    link({ serial: 'CB-2', majorKn: 50 }),
    fabric({ serial: 'FB-1' }),
  ];
}
