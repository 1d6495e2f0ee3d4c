import { describe, expect, it } from 'vitest';
import { gravity, unit } from 'mathjs';
import {
  G,
  KGF_IN_N,
  LBF_IN_N,
  checkLoadPath,
  designLoadKn,
  effectiveStrengthKn,
  formatForce,
  fromKn,
  legShare,
  tensionFactor,
  toKn,
  validateRatings,
  type LinkInput,
} from '../../../shared/rigging';
import { defaultPolicy } from '../../../shared/schemas/policy';
import { intervalClassOfKind } from '../../../shared/schemas/vocabulary';
import { gear, link, sling } from './link-builders';

// Every expectation here comes from ../shared/CHECK-VALUES.md, with that file's source label.

/** |actual − expected| within `tolerance` × |expected|. */
function expectRelative(actual: number, expected: number, tolerance: number): void {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(tolerance * Math.abs(expected));
}

/** Equal to `printed` at the number of decimals it is printed with. */
function expectPrinted(actual: number, printed: number, decimals: number): void {
  expect(Math.abs(actual - printed)).toBeLessThanOrEqual(0.5 * 10 ** -decimals);
}

const POUND_MASS_KG = 0.45359237; // the avoirdupois pound, exact by definition
const STANDARD_GRAVITY = 9.80665; // m/s², exact by definition

describe('force units', () => {
  it('defines the pound-force as a pound of mass under standard gravity [published: NIST SP 811, App. B]', () => {
    expectRelative(LBF_IN_N, POUND_MASS_KG * STANDARD_GRAVITY, 1e-12);
    // NIST prints 4.448 222 N, rounded to six decimals.
    expectPrinted(LBF_IN_N, 4.448222, 6);
  });

  it('defines the kilogram-force and g as standard gravity, exactly [published: NIST SP 811, App. B]', () => {
    expect(KGF_IN_N).toBe(STANDARD_GRAVITY);
    expect(G).toBe(STANDARD_GRAVITY);
  });

  it('converts pound-force and kilogram-force to kN exactly [published: NIST SP 811, App. B]', () => {
    expectRelative(toKn(1, 'lbf'), (POUND_MASS_KG * STANDARD_GRAVITY) / 1000, 1e-12);
    expectRelative(toKn(1, 'kgf'), STANDARD_GRAVITY / 1000, 1e-12);
    expectRelative(toKn(5000, 'lbf'), (5000 * POUND_MASS_KG * STANDARD_GRAVITY) / 1000, 1e-12);
    expect(toKn(12.5, 'kN')).toBe(12.5);
  });

  // NIST prints the pound-force in newtons; the inverse figures are worked from its exact definition, not printed by it.
  it('gives 1 kN as 224.80894 lbf and 101.97162 kgf [hand calculation: derived from NIST SP 811, App. B definitions]', () => {
    expectPrinted(fromKn(1, 'lbf'), 224.80894, 5);
    expectPrinted(fromKn(1, 'kgf'), 101.97162, 5);
    expectRelative(fromKn(1, 'lbf'), 1000 / (POUND_MASS_KG * STANDARD_GRAVITY), 1e-12);
    expectRelative(fromKn(1, 'kgf'), 1000 / STANDARD_GRAVITY, 1e-12);
  });

  it('gives the same inverse figures as the unit library, 1 kN in lbf and kgf [published: mathjs unit definitions]', () => {
    expectRelative(fromKn(1, 'lbf'), unit(1, 'kN').toNumber('lbf'), 1e-12);
    expectRelative(fromKn(1, 'kgf'), unit(1, 'kN').toNumber('kgf'), 1e-12);
  });

  it('agrees with the unit library to 1e-12 relative [published: mathjs unit definitions]', () => {
    expectRelative(LBF_IN_N, unit(1, 'lbf').toNumber('N'), 1e-12);
    expectRelative(KGF_IN_N, unit(1, 'kgf').toNumber('N'), 1e-12);
    for (const kn of [0.5, 1, 7, 22.2, 44.5]) {
      expectRelative(fromKn(kn, 'lbf'), unit(kn, 'kN').toNumber('lbf'), 1e-12);
      expectRelative(fromKn(kn, 'kgf'), unit(kn, 'kN').toNumber('kgf'), 1e-12);
    }
    for (const lbf of [900, 1800, 3600, 5000, 10000]) {
      expectRelative(toKn(lbf, 'lbf'), unit(lbf, 'lbf').toNumber('kN'), 1e-12);
    }
  });

  it('takes g from the same definition as the unit library [published: mathjs unit definitions]', () => {
    expectRelative(G, gravity.toNumber('m/s^2'), 1e-12);
  });

  it('shows a 7 kN gate-open rating as 1,573.66 lbf, about 1,500 lb [common practice; matches EN 12275 class B]', () => {
    expectPrinted(fromKn(7, 'lbf'), 1573.66, 2);
    expect(formatForce(7, 'lbf', 2)).toBe('1,573.66 lbf');
    // A rating reads cut down at whole pounds (PRODUCT.md §4.8).
    expect(formatForce(7, 'lbf')).toBe('1,573 lbf');
    expect(formatForce(7, 'kN')).toBe('7.0 kN');
  });

  it('reads the ANSI carabiner minimums of 5,000 lbf and 3,600 lbf as 22.2 kN and 16 kN [published: ANSI/ASSP Z359.12-2019, via a test-house summary]', () => {
    expectPrinted(toKn(5000, 'lbf'), 22.2, 1);
    expectPrinted(toKn(3600, 'lbf'), 16, 0);
  });

  it("reads OSHA's arresting-force limits of 1,800 lbf and 900 lbf as 8 kN and 4 kN [published: OSHA 29 CFR 1926.502(d)(16)]", () => {
    expectPrinted(toKn(1800, 'lbf'), 8, 0);
    expectPrinted(toKn(900, 'lbf'), 4, 0);
  });

  it('reads an aluminium carabiner at roughly 5,000 lb as about 22 kN and a steel one at 10,000 lb as about 44 kN [common practice]', () => {
    expectPrinted(toKn(5000, 'lbf'), 22, 0);
    expectPrinted(toKn(10000, 'lbf'), 44, 0);
  });
});

describe('connector strengths', () => {
  it('counts a cross-loaded link at 30 % of its major rating when the maker gives no minor rating, so a 20 kN connector at 6 kN [common practice]', () => {
    // Cross-loading takes away about 70 % of the strength.
    const major = 20;
    const counted = effectiveStrengthKn(gear({ majorKn: major, minorKn: null }), 'minor');
    expect(counted.basis).toBe('minor_default_30pct');
    expectRelative(counted.kn as number, major * (1 - 0.7), 1e-12);
  });

  // Class: major axis gate closed / major gate open / minor axis minimums, in kN; Q has no gate-open figure.
  const en12275 = [
    { cls: 'B', majorKn: 20, gateOpenKn: 7, minorKn: 7 },
    { cls: 'H', majorKn: 20, gateOpenKn: 6, minorKn: 7 },
    { cls: 'K', majorKn: 25, gateOpenKn: 8, minorKn: 7 },
    { cls: 'X', majorKn: 18, gateOpenKn: 5, minorKn: 7 },
    { cls: 'Q', majorKn: 25, gateOpenKn: null, minorKn: 10 },
  ] as const;

  // The rule under test: where the maker gives no minor-axis rating, the product assumes one. A
  // connector rated at its class's major minimum is only known to meet the class's minor minimum,
  // so the assumed figure must never exceed it.
  for (const row of en12275) {
    it(`never counts an EN 12275 class ${row.cls} connector (${row.majorKn} kN major) above its ${row.minorKn} kN minor-axis minimum when no minor rating is entered [published: EN 12275:2013, via a test-house summary]`, () => {
      const connector = gear({ kind: row.cls === 'Q' ? 'quick_link' : 'carabiner', majorKn: row.majorKn, minorKn: null, gateOpenKn: row.gateOpenKn });
      const counted = effectiveStrengthKn(connector, 'minor');
      expect(counted.basis).not.toBe('minor');
      expect(counted.kn as number).toBeLessThanOrEqual(row.minorKn);
    });
  }

  it('fails a gate-open check on an auto-locking class B connector entered without a gate-open figure [published: EN 12275:2013, via a test-house summary]', () => {
    // No gate-open requirement for B, H and X when the gate locks automatically.
    const autoLocking = link({ gate: 'auto_three_action', majorKn: 20, minorKn: 7, gateOpenKn: null }, { mode: 'gate_open' });
    const result = checkLoadPath({
      links: [sling(), autoLocking],
      structuralRatingKn: 20,
      profile: { performers: 1, bodyMassKg: 60, dynamicFactor: 1 },
      requiredFactor: 1,
    });
    expect(result.pass).toBe(false);
    expect(result.violations.map((v) => v.code)).toContain('gate_open_unrated');
    expect(result.chainStrengthKn).toBeNull();
  });

  // EN 362: class B 20 kN locked, minor 7 kN; class Q 25 kN locked, minor 10 kN. The same rule as above.
  const en362 = [
    { cls: 'B', kind: 'carabiner', majorKn: 20, minorKn: 7 },
    { cls: 'Q', kind: 'quick_link', majorKn: 25, minorKn: 10 },
  ] as const;
  for (const row of en362) {
    it(`never counts an EN 362 class ${row.cls} connector (${row.majorKn} kN locked) above its ${row.minorKn} kN minor-axis minimum when no minor rating is entered [published: EN 362:2004, via a secondary summary; weaker source]`, () => {
      const counted = effectiveStrengthKn(gear({ kind: row.kind, majorKn: row.majorKn, minorKn: null, gateOpenKn: null }), 'minor');
      expect(counted.kn as number).toBeLessThanOrEqual(row.minorKn);
    });
  }
});

describe('two-leg bridles', () => {
  const tableByIncludedAngle = [
    [0, 1.0],
    [30, 1.04],
    [60, 1.16], // printed rounded up; exactly 1.1547
    [90, 1.41],
    [120, 2.0],
  ] as const;

  for (const [angle, factor] of tableByIncludedAngle) {
    it(`gives a tension factor of ${factor} at ${angle}° included, within 0.01 [published: lifting-equipment trade association guidance, via a training reference]`, () => {
      expect(Math.abs(tensionFactor(angle) - factor)).toBeLessThanOrEqual(0.01);
    });
  }

  it('gives the exact tension factor of 1.1547 at 60° included [published: lifting-equipment trade association guidance, via a training reference]', () => {
    expectPrinted(tensionFactor(60), 1.1547, 4);
  });

  const sharesByIncludedAngle = [
    [60, 0.5774],
    [90, 0.7071],
    [120, 1.0],
    [150, 1.9319],
  ] as const;

  for (const [angle, share] of sharesByIncludedAngle) {
    it(`puts ${share} of the load on each leg at ${angle}° included [hand calculation: plain statics, 1 ÷ (2·cos(θ/2))]`, () => {
      expectPrinted(legShare(angle), share, 4);
    });
  }

  // Angle of each leg from the horizontal α; the included angle is then 180° − 2α.
  const catalogue = [
    { fromHorizontalDeg: 90, multiplier: 1.0, perLegLb: 5000 },
    { fromHorizontalDeg: 60, multiplier: 1.155, perLegLb: 5775 },
    { fromHorizontalDeg: 45, multiplier: 1.414, perLegLb: 7070 },
    { fromHorizontalDeg: 30, multiplier: 2.0, perLegLb: 10000 },
  ] as const;

  for (const row of catalogue) {
    it(`matches the catalogue at ${row.fromHorizontalDeg}° from horizontal: multiplier ${row.multiplier}, ${row.perLegLb.toLocaleString('en-US')} lb per leg of 10,000 lb, within 0.1 % [published: sling manufacturer's catalogue load-angle table]`, () => {
      const included = 180 - 2 * row.fromHorizontalDeg;
      expectRelative(tensionFactor(included), row.multiplier, 0.001);
      expectRelative(10000 * legShare(included), row.perLegLb, 0.001);
    });

    it(`loads each leg link of a bridle at ${included(row.fromHorizontalDeg)}° included with ${row.perLegLb.toLocaleString('en-US')} lbf of a 10,000 lbf load, within 0.1 % [published: sling manufacturer's catalogue load-angle table]`, () => {
      const angle = included(row.fromHorizontalDeg);
      const leg = (side: 'a' | 'b'): LinkInput => sling({ majorKn: 500 }, { leg: side, includedAngleDeg: angle });
      // 10,000 lb of mass under standard gravity weighs 10,000 lbf.
      const result = checkLoadPath({
        links: [leg('a'), leg('b'), link({ kind: 'screw_link_delta', majorKn: 500, minorKn: null, gateOpenKn: null }), sling({ majorKn: 500 })],
        structuralRatingKn: 1000,
        profile: { performers: 1, bodyMassKg: 10000 * POUND_MASS_KG, dynamicFactor: 1 },
        requiredFactor: 1,
      });
      expectRelative(fromKn(result.designLoadKn, 'lbf'), 10000, 1e-12);
      const legLoads = result.working
        .filter((step) => step.step === 'link_capacity')
        .map((step) => fromKn(step.inputs.loadKn as number, 'lbf'));
      expectRelative(legLoads[0], row.perLegLb, 0.001);
      expectRelative(legLoads[1], row.perLegLb, 0.001);
      expectRelative(legLoads[2], 10000, 1e-12);
      expectRelative(legLoads[3], 10000, 1e-12);
    });
  }

  function included(fromHorizontalDeg: number): number {
    return 180 - 2 * fromHorizontalDeg;
  }
});

describe('policy defaults', () => {
  // Peak force as a multiple of body weight, from the study's abstract.
  const published = {
    hoop: 4.8,
    rope: 7.3,
    silk: 5.6,
    swingingTrapeze: 5.6,
    soloFixedTrapeze: 6.8,
    duoFixedTrapeze: 2.5,
  };

  it('takes the dynamic factor of each apparatus from the measured peaks, hammock as silk, straps as rope, trapeze the highest trapeze figure [studio choice on the published figures: Cossin, Bergeron-Parenteau & Ross (2022)]', () => {
    expect(defaultPolicy.dynamicFactors).toEqual({
      fabric: published.silk,
      hammock: published.silk,
      hoop: published.hoop,
      rope: published.rope,
      straps: published.rope,
      trapeze: Math.max(published.swingingTrapeze, published.soloFixedTrapeze, published.duoFixedTrapeze),
    });
  });

  it('requires a chain five times the peak dynamic load, for a 90 kg performer [studio choice]', () => {
    expect(defaultPolicy.requiredFactor).toBe(5);
    expect(defaultPolicy.bodyMassKg).toBe(90);
  });

  // ASME's design factor is breaking strength ÷ rated (static) load. The product's achieved factor
  // is chain strength ÷ design load, where the design load carries a dynamic factor; with a dynamic
  // factor of 1 the two are the same ratio, so the comparison is made there.
  it('passes, on a static load, hardware whose breaking strength is 5 × its rated load exactly at that load, and fails it above [published: ASME B30.26 §26-1.2, via mirrors]', () => {
    const staticProfile = { performers: 1, bodyMassKg: 400, dynamicFactor: 1 };
    const ratedKn = designLoadKn(staticProfile);
    const hardware = () => link({ kind: 'screw_link_delta', majorKn: 5 * ratedKn, minorKn: null, gateOpenKn: null, wllKn: ratedKn });
    const at = checkLoadPath({ links: [sling({ majorKn: 1000 }), hardware()], structuralRatingKn: 100, profile: staticProfile, requiredFactor: defaultPolicy.requiredFactor });
    expectRelative(at.achievedFactor as number, 5, 1e-12);
    expect(at.pass).toBe(true);
    const above = checkLoadPath({ links: [sling({ majorKn: 1000 }), hardware()], structuralRatingKn: 100, profile: { ...staticProfile, bodyMassKg: 401 }, requiredFactor: defaultPolicy.requiredFactor });
    expect(above.violations.map((v) => v.code).sort()).toEqual(['factor_below_required', 'wll_exceeded']);
  });

  it('asks more than the lifting-hardware factor once the dynamic peak is counted: the same hardware fails a 5.6 silks load at its rated mass [studio choice on ASME B30.26 §26-1.2, via mirrors]', () => {
    const ratedKn = designLoadKn({ performers: 1, bodyMassKg: 90, dynamicFactor: 1 });
    const result = checkLoadPath({
      links: [sling({ majorKn: 1000 }), link({ kind: 'screw_link_delta', majorKn: 5 * ratedKn, minorKn: null, gateOpenKn: null })],
      structuralRatingKn: 100,
      profile: { performers: 1, bodyMassKg: 90, dynamicFactor: defaultPolicy.dynamicFactors.fabric },
      requiredFactor: defaultPolicy.requiredFactor,
    });
    // 5 × the static load is 5 ÷ 5.6 = 0.89 × the dynamic peak [hand calculation].
    expectRelative(result.achievedFactor as number, 5 / 5.6, 1e-12);
    expect(result.pass).toBe(false);
  });

  it('inspects textiles every 30 days, hardware and wire rope every 90, the structure every 365, warning 7 days ahead [studio choice]', () => {
    expect(defaultPolicy.intervalDays).toEqual({ textile: 30, hardware: 90, structure: 365 });
    expect(defaultPolicy.warningDays).toBe(7);
    const textiles = ['fabric', 'hammock', 'straps', 'rope', 'trapeze', 'round_sling', 'span_set'];
    const hardware = [
      'carabiner',
      'screw_link_delta',
      'screw_link_tri',
      'quick_link',
      'swivel',
      'descender_ring',
      'beam_clamp',
      'pulley',
      'hoop',
      'wire_rope_sling',
    ];
    for (const kind of textiles) expect(intervalClassOfKind[kind as keyof typeof intervalClassOfKind]).toBe('textile');
    for (const kind of hardware) expect(intervalClassOfKind[kind as keyof typeof intervalClassOfKind]).toBe('hardware');
  });
});

describe('a worked design load', () => {
  const silks = { performers: 1, bodyMassKg: 90, dynamicFactor: 5.6 };
  const expectedW = (1 * 90 * STANDARD_GRAVITY * 5.6) / 1000;

  it('puts 4.943 kN on a silks point for one 90 kg performer [studio choice]', () => {
    expectPrinted(designLoadKn(silks), 4.943, 3);
    expectRelative(designLoadKn(silks), expectedW, 1e-12);
  });

  it('fails a single 22 kN aluminium carabiner on silks at 4.45 times, below the required 5 [studio choice; common practice for the 22 kN carabiner]', () => {
    const chainKn = 22;
    const result = checkLoadPath({
      links: [sling({ majorKn: 100 }), link({ material: 'aluminium', majorKn: chainKn, minorKn: 7, gateOpenKn: 7 }), link({ kind: 'fabric', gate: 'none', majorKn: 60, minorKn: null, gateOpenKn: null })],
      structuralRatingKn: 10,
      profile: silks,
      requiredFactor: defaultPolicy.requiredFactor,
    });
    expect(result.chainStrengthKn).toBe(chainKn);
    expectRelative(result.achievedFactor as number, chainKn / expectedW, 1e-12);
    expectPrinted(result.achievedFactor as number, 4.45, 2);
    expect(result.pass).toBe(false);
    expect(result.violations.map((v) => v.code)).toEqual(['factor_below_required']);
  });

  it('passes the same point with a 44 kN steel carabiner at about 8.9 times [studio choice; common practice for the 44 kN carabiner]', () => {
    const chainKn = 44;
    const result = checkLoadPath({
      links: [sling({ majorKn: 100 }), link({ majorKn: chainKn, minorKn: 14, gateOpenKn: 14 }), link({ kind: 'fabric', gate: 'none', majorKn: 60, minorKn: null, gateOpenKn: null })],
      structuralRatingKn: 10,
      profile: silks,
      requiredFactor: defaultPolicy.requiredFactor,
    });
    expectRelative(result.achievedFactor as number, chainKn / expectedW, 1e-12);
    expect(result.pass).toBe(true);
  });

  it('puts 2,222.26 lbf on a duo silks point for two 90 kg performers [hand calculation: 180 kg ÷ 0.45359237 × 5.6], above the 1,500 lb two performers readily produce [common practice]', () => {
    const duo = designLoadKn({ performers: 2, bodyMassKg: 90, dynamicFactor: 5.6 });
    expectPrinted(fromKn(duo, 'lbf'), 2222.26, 2);
    expect(fromKn(duo, 'lbf')).toBeGreaterThan(1500);
  });
});

// Peak force as a multiple of body weight measured on fixed trapezes: solo 6.8, duo 2.5 [published:
// Cossin, Bergeron-Parenteau & Ross (2022), doi:10.3998/circus.2776 — from the abstract]. The duo
// figure is read as a multiple of the pair's combined weight; read per performer the published peak
// would be half as large, and the product's margin over it larger still.
describe('published trapeze figures', () => {
  const bodyWeightKn = (kg: number) => (kg * STANDARD_GRAVITY) / 1000;

  it('designs a solo trapeze class under the default policy for exactly the published 6.8 × body weight: 6.0017 kN at 90 kg [published: Cossin, Bergeron-Parenteau & Ross (2022), from the abstract]', () => {
    const w = designLoadKn({ performers: 1, bodyMassKg: 90, dynamicFactor: defaultPolicy.dynamicFactors.trapeze });
    expectRelative(w / bodyWeightKn(90), 6.8, 1e-12);
    expectPrinted(w, 6.0017, 4);
  });

  it('designs a duo trapeze class under the default policy for 2.72 × the published duo peak of 2.5 × the pair’s weight: 12.0033 kN against 4.4130 kN [published: Cossin, Bergeron-Parenteau & Ross (2022), from the abstract; hand calculation for the ratio]', () => {
    const w = designLoadKn({ performers: 2, bodyMassKg: 90, dynamicFactor: defaultPolicy.dynamicFactors.trapeze });
    const publishedDuoPeak = 2.5 * bodyWeightKn(2 * 90);
    expectPrinted(publishedDuoPeak, 4.413, 3);
    expectPrinted(w, 12.0033, 4);
    expect(w).toBeGreaterThan(publishedDuoPeak);
    expectRelative(w / publishedDuoPeak, 6.8 / 2.5, 1e-12);
  });

  it('gives a duo class set to the published 2.5 a design load of 2.5 × the pair’s weight, which a 22 kN chain meets at 4.98 ×, short of 5 [published: Cossin, Bergeron-Parenteau & Ross (2022), from the abstract; studio choice for the factor of 5]', () => {
    const duo = { performers: 2, bodyMassKg: 90, dynamicFactor: 2.5 };
    expectRelative(designLoadKn(duo), 2.5 * bodyWeightKn(180), 1e-12);
    const result = checkLoadPath({
      links: [sling({ majorKn: 100 }), link({ majorKn: 22, minorKn: 7, gateOpenKn: 7 }), link({ kind: 'trapeze', gate: 'none', majorKn: 60, minorKn: null, gateOpenKn: null })],
      structuralRatingKn: 10,
      profile: duo,
      requiredFactor: defaultPolicy.requiredFactor,
    });
    // 22 ÷ 4.41299 = 4.9853 [hand calculation].
    expectPrinted(result.achievedFactor as number, 4.9853, 4);
    expect(result.pass).toBe(false);
  });
});
