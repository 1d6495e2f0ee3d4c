import { describe, expect, it } from 'vitest';
import {
  gearRatingChangeVoids,
  pathConfigOf,
  voidsClearance,
  type GearSnapshot,
  type PathConfig,
  type PathLinkConfig,
} from '../../../shared/clearance';
import { gear } from './fixtures';

function fixed(gearId: number, over: Partial<PathLinkConfig> = {}): PathLinkConfig {
  return {
    gearId,
    mode: 'major',
    threeWay: false,
    basketOverHalf: false,
    leg: null,
    includedAngleDeg: null,
    majorKn: 30,
    minorKn: 9,
    gateOpenKn: 8,
    wllKn: null,
    multiDirectional: false,
    isApparatus: false,
    ...over,
  };
}
function apparatus(gearId: number, over: Partial<PathLinkConfig> = {}): PathLinkConfig {
  return fixed(gearId, { majorKn: 40, minorKn: null, gateOpenKn: null, isApparatus: true, ...over });
}

/** A beam clamp, a sling, a carabiner and a swivel, with a fabric below. */
function path(over: Partial<PathConfig> = {}): PathConfig {
  return {
    structuralRatingKn: 12,
    links: [fixed(1), fixed(2), fixed(3), fixed(4), apparatus(50)],
    ...over,
  };
}

function withLink(index: number, change: Partial<PathLinkConfig>): PathConfig {
  const p = path();
  p.links[index] = { ...p.links[index], ...change };
  return p;
}

describe('voidsClearance', () => {
  it('voids nothing when an identical path is saved again', () => {
    expect(voidsClearance(path(), path())).toBe(false);
  });

  it('treats a leg left out and a leg of null as the same saved path', () => {
    const before = path();
    const after = path();
    after.links = after.links.map(({ leg: _leg, includedAngleDeg: _angle, ...rest }) => rest);
    expect(voidsClearance(before, after)).toBe(false);
  });

  describe('the mounted apparatus carries its own inspection', () => {
    it('voids nothing when only the apparatus is swapped for another', () => {
      const after = path();
      after.links[4] = apparatus(51, { majorKn: 35 });
      expect(voidsClearance(path(), after)).toBe(false);
    });

    it('voids nothing when the apparatus is taken down or mounted', () => {
      const bare = path();
      bare.links = bare.links.slice(0, 4);
      expect(voidsClearance(path(), bare)).toBe(false);
      expect(voidsClearance(bare, path())).toBe(false);
    });

    it("voids nothing when the apparatus link's own flags change", () => {
      expect(voidsClearance(path(), withLink(4, { mode: 'minor', basketOverHalf: true }))).toBe(false);
    });
  });

  describe('a change to the fixed rigging voids the clearance', () => {
    it('voids when a fixed link is added', () => {
      const after = path();
      after.links.splice(3, 0, fixed(9));
      expect(voidsClearance(path(), after)).toBe(true);
    });

    it('voids when a fixed link is removed', () => {
      const after = path();
      after.links.splice(2, 1);
      expect(voidsClearance(path(), after)).toBe(true);
    });

    it('voids when fixed links are reordered', () => {
      const after = path();
      [after.links[2], after.links[3]] = [after.links[3], after.links[2]];
      expect(voidsClearance(path(), after)).toBe(true);
    });

    it('voids when a fixed link is swapped for another gear item with the same ratings', () => {
      expect(voidsClearance(path(), withLink(3, { gearId: 99 }))).toBe(true);
    });

    it.each<[string, Partial<PathLinkConfig>]>([
      ['its loading mode', { mode: 'minor' }],
      ['its loading mode to gate open', { mode: 'gate_open' }],
      ['its three-way flag', { threeWay: true }],
      ['its basket flag', { basketOverHalf: true }],
      ['its bridle leg', { leg: 'a', includedAngleDeg: 60 }],
      ['its major rating', { majorKn: 28 }],
      ['its minor rating', { minorKn: null }],
      ['its gate-open rating', { gateOpenKn: 7 }],
      ['its working load limit', { wllKn: 5 }],
      ['its multi-directional rating', { multiDirectional: true }],
    ])('voids when a fixed link changes %s', (_what, change) => {
      expect(voidsClearance(path(), withLink(2, change))).toBe(true);
    });

    it("voids when a bridle's included angle changes", () => {
      const bridle = (angle: number): PathConfig =>
        path({
          links: [
            fixed(1, { leg: 'a', includedAngleDeg: angle }),
            fixed(2, { leg: 'b', includedAngleDeg: angle }),
            fixed(3),
            apparatus(50),
          ],
        });
      expect(voidsClearance(bridle(60), bridle(60))).toBe(false);
      expect(voidsClearance(bridle(60), bridle(75))).toBe(true);
    });

    it("voids when the point's structural rating changes", () => {
      expect(voidsClearance(path(), path({ structuralRatingKn: 10 }))).toBe(true);
    });

    it('voids when a fixed link takes the place the apparatus had', () => {
      const after = path();
      after.links[4] = fixed(50);
      expect(voidsClearance(path(), after)).toBe(true);
    });
  });
});

describe('gearRatingChangeVoids', () => {
  const carabiner: GearSnapshot = gear('carabiner', { id: 3, serial: 'CB-3', majorKn: 30, minorKn: 9 });

  it('voids nothing when the ratings are saved unchanged, even if other details change', () => {
    expect(gearRatingChangeVoids(carabiner, { ...carabiner, serial: 'CB-3a', inspectedUntil: new Date() })).toBe(false);
  });

  it('voids when any rating of a fixed item changes', () => {
    expect(gearRatingChangeVoids(carabiner, { ...carabiner, majorKn: 25 })).toBe(true);
    expect(gearRatingChangeVoids(carabiner, { ...carabiner, minorKn: 7 })).toBe(true);
    expect(gearRatingChangeVoids(carabiner, { ...carabiner, gateOpenKn: null })).toBe(true);
    expect(gearRatingChangeVoids(carabiner, { ...carabiner, wllKn: 4 })).toBe(true);
    expect(gearRatingChangeVoids(carabiner, { ...carabiner, multiDirectional: true })).toBe(true);
  });

  it("voids nothing when an apparatus's ratings change: it is never fixed rigging", () => {
    const hoop = { ...carabiner, kind: 'hoop' as const };
    expect(gearRatingChangeVoids(hoop, { ...hoop, majorKn: 20 })).toBe(false);
  });
});

describe('pathConfigOf', () => {
  it('marks only the last apparatus-kind link as the mounted apparatus, so swapping it voids nothing', () => {
    const g = (id: number, kind: GearSnapshot['kind']): GearSnapshot => ({
      id,
      kind,
      material: 'steel',
      gate: 'screw',
      serial: `S-${id}`,
      majorKn: 30,
      minorKn: null,
      gateOpenKn: null,
      wllKn: null,
      multiDirectional: false,
      status: 'in_service',
      manufacturedOn: null,
      inServiceOn: null,
      serviceLifeYears: null,
      inspectedUntil: null,
    });
    const l = (gear: GearSnapshot) => ({
      gear,
      mode: 'major' as const,
      threeWay: false,
      basketOverHalf: false,
      leg: null,
      includedAngleDeg: null,
    });
    const before = pathConfigOf({ structuralRatingKn: 12, links: [l(g(1, 'beam_clamp')), l(g(2, 'carabiner')), l(g(3, 'hoop'))] });
    const after = pathConfigOf({ structuralRatingKn: 12, links: [l(g(1, 'beam_clamp')), l(g(2, 'carabiner')), l(g(4, 'fabric'))] });
    expect(before.links.map((x) => x.isApparatus)).toEqual([false, false, true]);
    expect(voidsClearance(before, after)).toBe(false);
    const moved = pathConfigOf({ structuralRatingKn: 12, links: [l(g(1, 'beam_clamp')), l(g(5, 'carabiner')), l(g(3, 'hoop'))] });
    expect(voidsClearance(before, moved)).toBe(true);
  });
});
