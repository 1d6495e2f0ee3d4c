import { describe, expect, it } from 'vitest';
import {
  SCREW_GATE_CHECKLIST_ITEM,
  SCREW_GATE_CHECKLIST_LABEL,
  apparatusNotLast,
  basketOverfilled,
  checkRules,
  crossLoaded,
  describeGear,
  effectiveStrengthKn,
  gateOpen,
  gateOpenUnrated,
  legShare,
  manyLinks,
  parseBridle,
  tensionFactor,
  threeWayOnConnector,
  validateRatings,
  type Finding,
  type LinkInput,
} from '../../../shared/rigging';
import { connectorKinds } from '../../../shared/schemas/vocabulary';
import { fabric, gear, link, sling, typicalPath } from './link-builders';

const codes = (findings: Finding[]): string[] => findings.map((f) => f.code);

describe('naming gear in findings', () => {
  it('names a link by its kind and serial, as on its tag', () => {
    expect(describeGear({ kind: 'carabiner', serial: 'CB-0142' })).toBe('Carabiner CB-0142');
    expect(describeGear({ kind: 'screw_link_delta', serial: 'DL-7' })).toBe('Delta screw link DL-7');
    expect(describeGear({ kind: 'wire_rope_sling', serial: ' WR-2 ' })).toBe('Wire-rope sling WR-2');
  });
});

describe('effective strength', () => {
  const rated = gear({ majorKn: 24, minorKn: 8, gateOpenKn: 7 });

  it('counts a link loaded along its major axis at its major rating', () => {
    expect(effectiveStrengthKn(rated, 'major')).toEqual({ kn: 24, basis: 'major' });
  });

  it("counts a cross-loaded link at the maker's minor rating where one is given", () => {
    expect(effectiveStrengthKn(rated, 'minor')).toEqual({ kn: 8, basis: 'minor' });
  });

  it('counts a cross-loaded link at 30 % of its major rating when the maker gives no minor rating and that is at most 7 kN', () => {
    const result = effectiveStrengthKn({ ...rated, majorKn: 20, minorKn: null }, 'minor');
    expect(result.basis).toBe('minor_default_30pct');
    expect(result.kn).toBeCloseTo(20 * 0.3, 12);
  });

  it('counts a cross-loaded link at 7 kN when 30 % of its major rating would be more', () => {
    expect(effectiveStrengthKn({ ...rated, majorKn: 24, minorKn: null }, 'minor')).toEqual({ kn: 7, basis: 'minor_default_cap' });
  });

  it('counts a gate-open link at its gate-open rating, and at nothing when none is given', () => {
    expect(effectiveStrengthKn(rated, 'gate_open')).toEqual({ kn: 7, basis: 'gate_open' });
    expect(effectiveStrengthKn({ ...rated, gateOpenKn: null }, 'gate_open')).toEqual({ kn: null, basis: 'gate_open_unrated' });
  });
});

describe('rating validation', () => {
  it('accepts positive ratings with minor, gate-open and working load at or below the major', () => {
    expect(validateRatings(gear({ majorKn: 20, minorKn: 20, gateOpenKn: 7, wllKn: 4 }))).toEqual([]);
    expect(validateRatings(gear({ majorKn: 20, minorKn: null, gateOpenKn: null, wllKn: null }))).toEqual([]);
  });

  it('flags a rating that is zero, negative or not a number, naming the item', () => {
    for (const bad of [0, -3, Number.NaN, Number.POSITIVE_INFINITY]) {
      const findings = validateRatings(gear({ serial: 'CB-9', majorKn: bad }));
      expect(codes(findings)).toContain('rating_not_positive');
      expect(findings[0].message).toContain('Carabiner CB-9');
      expect(findings[0].message).toContain('major-axis rating');
    }
    expect(codes(validateRatings(gear({ minorKn: 0 })))).toEqual(['rating_not_positive']);
    expect(codes(validateRatings(gear({ gateOpenKn: -1 })))).toEqual(['rating_not_positive']);
    expect(codes(validateRatings(gear({ wllKn: 0 })))).toEqual(['rating_not_positive']);
  });

  it('flags a minor, gate-open or working-load figure above the major rating', () => {
    const findings = validateRatings(gear({ serial: 'CB-3', majorKn: 20, minorKn: 21, gateOpenKn: 25, wllKn: 30 }));
    expect(codes(findings)).toEqual(['rating_above_major', 'rating_above_major', 'rating_above_major']);
    expect(findings[0].message).toContain('minor-axis rating of 21 kN');
    expect(findings[1].message).toContain('gate-open rating of 25 kN');
    expect(findings[2].message).toContain('working load limit of 30 kN');
  });
});

describe('three_way_on_connector', () => {
  it('flags a carabiner taking a three-way load, suggesting a tri or delta screw link or a swivel base', () => {
    const finding = threeWayOnConnector(link({ serial: 'CB-0142' }, { threeWay: true }), 2);
    expect(finding?.code).toBe('three_way_on_connector');
    expect(finding?.linkIndex).toBe(2);
    expect(finding?.message).toContain('Carabiner CB-0142');
    expect(finding?.message).toMatch(/tri or delta screw link/);
    expect(finding?.message).toMatch(/swivel base/);
  });

  it('flags every connector kind not rated multi-directional, including a delta screw link', () => {
    for (const kind of connectorKinds) {
      expect(threeWayOnConnector(link({ kind, multiDirectional: false }, { threeWay: true }), 0)?.code).toBe('three_way_on_connector');
    }
  });

  it('allows a tri or delta screw link rated multi-directional', () => {
    expect(threeWayOnConnector(link({ kind: 'screw_link_tri', multiDirectional: true }, { threeWay: true }), 0)).toBeNull();
    expect(threeWayOnConnector(link({ kind: 'screw_link_delta', multiDirectional: true }, { threeWay: true }), 0)).toBeNull();
  });

  it('leaves a connector alone when it takes no three-way load, and a ring that does', () => {
    expect(threeWayOnConnector(link({}, { threeWay: false }), 0)).toBeNull();
    expect(threeWayOnConnector(link({ kind: 'descender_ring', gate: 'none' }, { threeWay: true }), 0)).toBeNull();
  });
});

describe('basket_overfilled', () => {
  it('flags wide material past the halfway point of a carabiner basket, suggesting a screw link', () => {
    const finding = basketOverfilled(link({ serial: 'CB-5' }, { basketOverHalf: true }), 1);
    expect(finding).toMatchObject({ code: 'basket_overfilled', linkIndex: 1 });
    expect(finding?.message).toContain('Carabiner CB-5');
    expect(finding?.message).toMatch(/screw link/);
  });

  it('leaves a carabiner with its basket at or below half, and a screw link, alone', () => {
    expect(basketOverfilled(link({}, { basketOverHalf: false }), 0)).toBeNull();
    expect(basketOverfilled(link({ kind: 'quick_link' }, { basketOverHalf: true }), 0)).toBeNull();
  });
});

describe('cross_loaded and gate_open', () => {
  it('warns about a cross-loaded link, saying what it is counted at', () => {
    const withMinor = crossLoaded(link({ serial: 'CB-1', majorKn: 24, minorKn: 8 }, { mode: 'minor' }), 0);
    expect(withMinor?.code).toBe('cross_loaded');
    expect(withMinor?.message).toContain('Carabiner CB-1');
    expect(withMinor?.message).toContain('8.0 kN');
    const defaulted = crossLoaded(link({ majorKn: 20, minorKn: null }, { mode: 'minor' }), 0);
    expect(defaulted?.message).toContain('6.0 kN');
    expect(defaulted?.message).toContain('30 %');
  });

  it('quotes the strength in the display unit when asked', () => {
    const finding = crossLoaded(link({ majorKn: 24, minorKn: 7 }, { mode: 'minor' }), 0, { displayUnit: 'lbf' });
    // 7 kN is 1,573.66 lbf, cut down as a strength.
    expect(finding?.message).toContain('1,573 lbf');
  });

  it('warns about a gate-open link, and adds a violation only when it has no gate-open rating', () => {
    const rated = link({ serial: 'CB-2', gateOpenKn: 7 }, { mode: 'gate_open' });
    expect(gateOpen(rated, 0)?.code).toBe('gate_open');
    expect(gateOpen(rated, 0)?.message).toContain('7.0 kN');
    expect(gateOpenUnrated(rated, 0)).toBeNull();

    const unrated = link({ serial: 'CB-3', gateOpenKn: null }, { mode: 'gate_open' });
    expect(gateOpen(unrated, 0)?.code).toBe('gate_open');
    const violation = gateOpenUnrated(unrated, 4);
    expect(violation).toMatchObject({ code: 'gate_open_unrated', linkIndex: 4 });
    expect(violation?.message).toContain('Carabiner CB-3');
  });

  it('says nothing about a link loaded along its major axis', () => {
    const major = link({ gateOpenKn: null, minorKn: null });
    expect(crossLoaded(major, 0)).toBeNull();
    expect(gateOpen(major, 0)).toBeNull();
    expect(gateOpenUnrated(major, 0)).toBeNull();
  });
});

describe('apparatus_not_last', () => {
  it('allows one apparatus as the last link', () => {
    expect(apparatusNotLast(typicalPath())).toEqual([]);
  });

  it('flags an apparatus above the last link, naming it and its position', () => {
    const path = [sling(), fabric({ serial: 'FB-1' }), link({ serial: 'CB-1' })];
    const findings = apparatusNotLast(path);
    expect(findings).toHaveLength(1);
    expect(findings[0]).toMatchObject({ code: 'apparatus_not_last', linkIndex: 1 });
    expect(findings[0].message).toContain('Fabric FB-1');
    expect(findings[0].message).toContain('link 2 of 3');
  });

  it('flags a second apparatus even when one is last', () => {
    const path = [sling(), link(), fabric({ serial: 'FB-1' }), link({ kind: 'hoop', serial: 'HP-1', gate: 'none' })];
    const findings = apparatusNotLast(path);
    expect(findings.map((f) => f.linkIndex)).toEqual([2]);
    expect(findings[0].message).toMatch(/at most|only one/);
  });
});

describe('many_links', () => {
  it('says nothing when slings, swivels or rings sit between the connectors', () => {
    expect(manyLinks(typicalPath())).toEqual([]);
  });

  it('suggests removing the weaker of two connectors clipped straight into each other', () => {
    const path = [sling(), link({ serial: 'CB-1', majorKn: 30 }), link({ serial: 'CB-2', majorKn: 45 }), fabric()];
    const findings = manyLinks(path);
    expect(findings).toHaveLength(1);
    expect(findings[0]).toMatchObject({ code: 'many_links', linkIndex: 1 });
    expect(findings[0].message).toMatch(/removing Carabiner CB-1 and keeping Carabiner CB-2/);
  });

  it('keeps the first of equally strong connectors and suggests removing the rest of the run', () => {
    const path = [sling(), link({ serial: 'A' }), link({ kind: 'quick_link', serial: 'B' }), link({ serial: 'C' }), fabric()];
    const findings = manyLinks(path);
    expect(findings.map((f) => f.linkIndex)).toEqual([2, 3]);
    for (const finding of findings) expect(finding.message).toContain('keeping Carabiner A');
  });

  it('judges strength in the way each connector is loaded', () => {
    // 50 kN cross-loaded at 15 kN is weaker than a 30 kN connector on its major axis.
    const path = [sling(), link({ serial: 'X', majorKn: 50, minorKn: 15 }, { mode: 'minor' }), link({ serial: 'Y', majorKn: 30 }), fabric()];
    expect(manyLinks(path).map((f) => f.linkIndex)).toEqual([1]);
  });

  it('does not join the last link of leg a to the first of leg b, which never touch', () => {
    const path = [
      sling({}, { leg: 'a', includedAngleDeg: 60 }),
      link({ serial: 'A1' }, { leg: 'a', includedAngleDeg: 60 }),
      link({ serial: 'B1' }, { leg: 'b', includedAngleDeg: 60 }),
      sling({}, { leg: 'b', includedAngleDeg: 60 }),
      link({ kind: 'descender_ring', gate: 'none' }),
      fabric(),
    ];
    expect(manyLinks(path)).toEqual([]);
  });

  it('keeps the delta link a bridle meets in and suggests removing the connectors the legs clip to it with', () => {
    const path = [
      sling({}, { leg: 'a', includedAngleDeg: 60 }),
      link({ serial: 'A1' }, { leg: 'a', includedAngleDeg: 60 }),
      sling({}, { leg: 'b', includedAngleDeg: 60 }),
      link({ serial: 'B1' }, { leg: 'b', includedAngleDeg: 60 }),
      link({ kind: 'screw_link_delta', serial: 'DL-1', majorKn: 30, multiDirectional: true }, { threeWay: true }),
      link({ kind: 'swivel', gate: 'none' }),
      fabric(),
    ];
    const findings = manyLinks(path);
    expect(findings.map((f) => f.linkIndex)).toEqual([1, 3]);
    for (const finding of findings) expect(finding.message).toContain('keeping Delta screw link DL-1');
  });
});

describe('bridle layout', () => {
  const legLink = (leg: 'a' | 'b', angle: number | null = 60): LinkInput => sling({}, { leg, includedAngleDeg: angle });
  const meeting = (): LinkInput => link({ kind: 'screw_link_delta', multiDirectional: true }, { threeWay: true });

  it('reads leg a, then leg b, meeting in the first unmarked link, and shares the load by the angle', () => {
    const path = [legLink('a'), legLink('a'), legLink('b'), meeting(), fabric()];
    const layout = parseBridle(path);
    expect(layout.kind).toBe('bridle');
    expect(layout.legA).toEqual([0, 1]);
    expect(layout.legB).toEqual([2]);
    expect(layout.meetingIndex).toBe(3);
    const perLeg = 1 / (2 * Math.cos(Math.PI / 6));
    expect(layout.loadShares.slice(0, 3).every((s) => Math.abs((s as number) - perLeg) < 1e-12)).toBe(true);
    expect(layout.loadShares.slice(3)).toEqual([1, 1]);
    expect(layout.violations).toEqual([]);
    expect(layout.warnings).toEqual([]);
  });

  it('puts half the load on each leg of a bridle with parallel legs', () => {
    expect(legShare(0)).toBe(0.5);
    expect(tensionFactor(0)).toBe(1);
  });

  it('refuses an angle outside 0° to below 180° in the arithmetic', () => {
    expect(() => legShare(180)).toThrow(RangeError);
    expect(() => tensionFactor(-1)).toThrow(RangeError);
    expect(() => legShare(Number.NaN)).toThrow(RangeError);
  });

  it('reads a path with no leg marks as a plain chain carrying W on every link', () => {
    const layout = parseBridle(typicalPath());
    expect(layout.kind).toBe('plain');
    expect(layout.loadShares).toEqual([1, 1, 1, 1, 1, 1]);
  });

  it('warns about a bridle wider than 90° and fails one wider than 120°', () => {
    const at = (angle: number) => parseBridle([legLink('a', angle), legLink('b', angle), meeting(), fabric()]);
    expect(codes(at(90).warnings)).toEqual([]);
    expect(codes(at(91).warnings)).toEqual(['bridle_angle_wide']);
    expect(codes(at(120).warnings)).toEqual(['bridle_angle_wide']);
    expect(codes(at(120).violations)).toEqual([]);
    expect(codes(at(121).violations)).toEqual(['bridle_angle_too_wide']);
    expect(at(121).warnings).toEqual([]);
    expect(at(150).violations[0].message).toContain('150°');
  });

  const malformed: [string, LinkInput[], RegExp][] = [
    ['only one leg', [legLink('a'), legLink('a'), meeting(), fabric()], /Only leg a/],
    ['legs interleaved', [legLink('a'), legLink('b'), legLink('a'), meeting(), fabric()], /interleaved/],
    ['differing angles', [legLink('a', 60), legLink('b', 70), meeting(), fabric()], /different included angles \(60°, 70°\)/],
    ['an angle missing', [legLink('a', 60), legLink('b', null), meeting(), fabric()], /no included angle/],
    ['no meeting link', [legLink('a'), legLink('b')], /never meet/],
    ['a leg after an unmarked link', [legLink('a'), legLink('b'), meeting(), legLink('a'), fabric()], /after .* where the legs have already met/],
    ['an angle of 180°', [legLink('a', 180), legLink('b', 180), meeting(), fabric()], /below 180°/],
    ['a negative angle', [legLink('a', -10), legLink('b', -10), meeting(), fabric()], /at least 0°/],
  ];

  for (const [what, path, message] of malformed) {
    it(`fails a malformed bridle with ${what}, saying what is wrong`, () => {
      const layout = parseBridle(path);
      expect(layout.kind).toBe('malformed');
      expect(layout.violations.length).toBeGreaterThan(0);
      expect(layout.violations.every((v) => v.code === 'bridle_malformed')).toBe(true);
      expect(layout.violations.map((v) => v.message).join(' ')).toMatch(message);
      // Leg loads cannot be known from a layout that does not make a bridle.
      path.forEach((l, i) => expect(layout.loadShares[i]).toBe(l.leg === null ? 1 : null));
    });
  }

  it('starts the leg b first when it is the only leg listed', () => {
    const layout = parseBridle([legLink('b'), meeting(), fabric()]);
    expect(layout.violations[0].message).toMatch(/Only leg b/);
  });
});

describe('checkRules', () => {
  it('finds nothing wrong with a typical silks point', () => {
    expect(checkRules(typicalPath())).toEqual({ violations: [], warnings: [] });
  });

  it('finds nothing in an empty path, whose missing load path is reported on its own', () => {
    expect(checkRules([])).toEqual({ violations: [], warnings: [] });
  });

  it('gathers the violations and warnings of every rule, each on its link', () => {
    const path = [
      sling({ majorKn: -1 }),
      link({ serial: 'TW' }, { threeWay: true }),
      sling(),
      link({ serial: 'BK' }, { basketOverHalf: true }),
      sling(),
      link({ serial: 'GO', gateOpenKn: null }, { mode: 'gate_open' }),
      sling(),
      link({ serial: 'XL' }, { mode: 'minor' }),
      link({ serial: 'XX' }),
      fabric(),
    ];
    const result = checkRules(path);
    expect(result.violations.map((v) => [v.code, v.linkIndex])).toEqual([
      ['rating_not_positive', 0],
      ['three_way_on_connector', 1],
      ['basket_overfilled', 3],
      ['gate_open_unrated', 5],
    ]);
    expect(result.warnings.map((w) => [w.code, w.linkIndex])).toEqual([
      ['gate_open', 5],
      ['cross_loaded', 7],
      ['many_links', 7],
    ]);
  });

  it('includes the bridle and apparatus findings', () => {
    const path = [
      sling({}, { leg: 'a', includedAngleDeg: 130 }),
      sling({}, { leg: 'b', includedAngleDeg: 130 }),
      fabric(),
      link({ kind: 'descender_ring', gate: 'none' }),
    ];
    expect(codes(checkRules(path).violations).sort()).toEqual(['apparatus_not_last', 'bridle_angle_too_wide']);
  });
});

describe('the standing inspection checklist item', () => {
  it('asks that screw gates hang gate down and locked', () => {
    expect(SCREW_GATE_CHECKLIST_LABEL).toBe('Screw gates hang gate down and locked');
    expect(SCREW_GATE_CHECKLIST_ITEM.label).toBe(SCREW_GATE_CHECKLIST_LABEL);
    expect(SCREW_GATE_CHECKLIST_ITEM.key).toMatch(/^[a-z_]+$/);
  });
});
