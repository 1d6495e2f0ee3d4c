import { describe, expect, it } from 'vitest';
import { checkLoadPath, designLoadKn, formatForce, type LinkInput, type LoadCheckInput, type LoadProfile } from '../../../shared/rigging';
import { fabric, link, sling, typicalPath } from './link-builders';

const STANDARD_GRAVITY = 9.80665;
const silks: LoadProfile = { performers: 1, bodyMassKg: 90, dynamicFactor: 5.6 };
const wSilks = (90 * STANDARD_GRAVITY * 5.6) / 1000;

function check(links: LinkInput[], overrides: Partial<LoadCheckInput> = {}) {
  return checkLoadPath({ links, structuralRatingKn: 10, profile: silks, requiredFactor: 5, ...overrides });
}

const codes = (findings: { code: string }[]): string[] => findings.map((f) => f.code);

describe('design load', () => {
  it('multiplies performers, body mass, g and the dynamic factor, in kN', () => {
    expect(designLoadKn({ performers: 2, bodyMassKg: 70, dynamicFactor: 4.8 })).toBeCloseTo((2 * 70 * STANDARD_GRAVITY * 4.8) / 1000, 12);
    expect(check(typicalPath()).designLoadKn).toBeCloseTo(wSilks, 12);
  });

  it('fails a profile that puts no load on the point rather than claiming an infinite factor', () => {
    const result = check(typicalPath(), { profile: { performers: 0, bodyMassKg: 90, dynamicFactor: 5.6 } });
    expect(codes(result.violations)).toEqual(['load_profile_invalid']);
    expect(result.achievedFactor).toBeNull();
    expect(result.pass).toBe(false);
  });
});

describe('a plain chain', () => {
  it('is as strong as its weakest link and passes at or above the required factor', () => {
    // Weakest of the typical path is the 36 kN swivel.
    const result = check(typicalPath());
    expect(result.chainStrengthKn).toBe(36);
    expect(result.achievedFactor).toBeCloseTo(36 / wSilks, 12);
    expect(result.requiredFactor).toBe(5);
    expect(result.structuralRatingKn).toBe(10);
    expect(result).toMatchObject({ pass: true, violations: [], warnings: [] });
  });

  it('fails below the required factor, naming the weakest link and the figures', () => {
    const path = [sling(), link({ serial: 'CB-0142', majorKn: 20 }), fabric()];
    const result = check(path);
    expect(result.achievedFactor).toBeCloseTo(20 / wSilks, 12);
    expect(result.pass).toBe(false);
    expect(result.violations).toHaveLength(1);
    const [finding] = result.violations;
    expect(finding).toMatchObject({ code: 'factor_below_required', linkIndex: 1 });
    expect(finding.message).toContain('Carabiner CB-0142');
    expect(finding.message).toContain('20.0 kN');
    // Cut down to two decimals, never rounded up toward the requirement (PRODUCT.md §4.8).
    expect(finding.message).toContain(`${Math.floor((20 / wSilks) * 100) / 100} times`);
    expect(finding.message).toContain('at least 5 times');
  });

  it('fails a chain just below the required factor', () => {
    const justBelow = 5 * wSilks * 0.999;
    const result = check([link({ kind: 'beam_clamp', gate: 'none', majorKn: justBelow, minorKn: null, gateOpenKn: null }), fabric({ majorKn: 60 })]);
    expect(codes(result.violations)).toEqual(['factor_below_required']);
  });

  it('passes a chain exactly at the required factor', () => {
    const exactly = 5 * wSilks;
    const result = check([link({ kind: 'beam_clamp', gate: 'none', majorKn: exactly, minorKn: null, gateOpenKn: null }), fabric({ majorKn: 60 })]);
    expect(result.chainStrengthKn).toBe(exactly);
    expect(result.pass).toBe(true);
  });

  it('counts a cross-loaded link at its minor strength and warns, without failing when the chain is still strong enough', () => {
    const path = [sling(), link({ serial: 'X', majorKn: 100, minorKn: 40 }, { mode: 'minor' }), fabric()];
    const result = check(path);
    expect(result.chainStrengthKn).toBe(40);
    expect(codes(result.warnings)).toEqual(['cross_loaded']);
    expect(result.pass).toBe(true);
  });

  it('fails a chain whose cross-loading takes it below the factor, saying the minor figure was assumed', () => {
    const path = [sling(), link({ majorKn: 25, minorKn: null }, { mode: 'minor' }), fabric()];
    const result = check(path);
    expect(result.chainStrengthKn).toBe(7);
    expect(codes(result.violations)).toEqual(['factor_below_required']);
    expect(codes(result.warnings)).toEqual(['cross_loaded', 'minor_rating_assumed']);
  });

  it('includes every load-independent rule violation, failing a strong chain', () => {
    const path = [sling(), link({ serial: 'TW', majorKn: 100 }, { threeWay: true }), fabric()];
    const result = check(path);
    expect(result.achievedFactor as number).toBeGreaterThan(5);
    expect(codes(result.violations)).toEqual(['three_way_on_connector']);
    expect(result.pass).toBe(false);
  });
});

describe('gate open', () => {
  it('counts a gate-open link at its gate-open rating', () => {
    const result = check([sling(), link({ majorKn: 50, gateOpenKn: 30 }, { mode: 'gate_open' }), fabric()]);
    expect(result.chainStrengthKn).toBe(30);
    expect(codes(result.warnings)).toEqual(['gate_open']);
    expect(result.pass).toBe(true);
  });

  it('fails a gate-open link with no gate-open rating, leaving the chain strength and factor unknown', () => {
    const result = check([sling(), link({ gateOpenKn: null }, { mode: 'gate_open' }), fabric()]);
    expect(result.chainStrengthKn).toBeNull();
    expect(result.achievedFactor).toBeNull();
    expect(codes(result.violations)).toEqual(['gate_open_unrated']);
    expect(result.pass).toBe(false);
  });
});

describe('structure', () => {
  it('fails when the design load is above the structural rating, and passes at it', () => {
    expect(codes(check(typicalPath(), { structuralRatingKn: wSilks * 0.99 }).violations)).toEqual(['structure_overloaded']);
    expect(check(typicalPath(), { structuralRatingKn: wSilks }).pass).toBe(true);
    const over = check(typicalPath(), { structuralRatingKn: 4 });
    // W = 4.9433 kN, a load, reads cut up; the rating, a limit, cut down.
    expect(over.violations[0].message).toContain('4.95 kN');
    expect(over.violations[0].message).toContain('4.0 kN');
  });

  it('fails a structural rating that is not a positive figure', () => {
    for (const rating of [0, -5, Number.NaN]) {
      expect(codes(check(typicalPath(), { structuralRatingKn: rating }).violations)).toEqual(['structure_overloaded']);
    }
  });
});

describe('working load limit', () => {
  it('fails a link whose load exceeds its working load limit, whatever its breaking strength', () => {
    const path = [sling({ serial: 'RS-1', majorKn: 200, wllKn: 4 }), link(), fabric()];
    const result = check(path);
    expect(result.achievedFactor as number).toBeGreaterThan(5);
    expect(result.violations).toEqual([expect.objectContaining({ code: 'wll_exceeded', linkIndex: 0 })]);
    expect(result.violations[0].message).toContain('Round sling RS-1');
  });

  it('passes a link loaded at or below its working load limit', () => {
    expect(check([sling({ wllKn: wSilks }), link(), fabric()]).pass).toBe(true);
  });

  it('compares a bridle leg with the leg tension, not the whole load', () => {
    // At 60° each leg carries W / (2·cos 30°), about 0.577 W.
    const legTension = wSilks / (2 * Math.cos(Math.PI / 6));
    const leg = (side: 'a' | 'b', wllKn: number) => sling({ wllKn }, { leg: side, includedAngleDeg: 60 });
    const below = [leg('a', legTension * 1.01), leg('b', legTension * 1.01), link({ kind: 'descender_ring', gate: 'none' }), fabric()];
    expect(check(below).pass).toBe(true);
    const above = [leg('a', legTension * 0.99), leg('b', legTension * 1.01), link({ kind: 'descender_ring', gate: 'none' }), fabric()];
    expect(check(above).violations).toEqual([expect.objectContaining({ code: 'wll_exceeded', linkIndex: 0 })]);
  });
});

describe('a bridle', () => {
  const ring = () => link({ kind: 'descender_ring', gate: 'none', majorKn: 80, minorKn: null, gateOpenKn: null });
  const leg = (side: 'a' | 'b', majorKn: number, angle: number) => sling({ majorKn }, { leg: side, includedAngleDeg: angle });

  it("divides each leg's strength by its share of the load", () => {
    // 20 kN legs at 60° could carry 20 × 2·cos 30° ≈ 34.6 kN of W before breaking.
    const result = check([leg('a', 20, 60), leg('b', 20, 60), ring(), fabric()]);
    expect(result.chainStrengthKn).toBeCloseTo(20 * 2 * Math.cos(Math.PI / 6), 10);
  });

  it('lets the meeting link and those below it carry the whole load', () => {
    const result = check([leg('a', 100, 60), leg('b', 100, 60), ring(), fabric({ majorKn: 25 })]);
    expect(result.chainStrengthKn).toBe(25);
  });

  it('loads each leg with the whole load at 120° included', () => {
    const result = check([leg('a', 30, 120), leg('b', 30, 120), ring(), fabric({ majorKn: 60 })]);
    expect(result.chainStrengthKn).toBeCloseTo(30, 10);
    expect(codes(result.warnings)).toEqual(['bridle_angle_wide']);
    expect(result.pass).toBe(true);
  });

  it('fails a bridle wider than 120° even when every link is strong', () => {
    const result = check([leg('a', 50, 130), leg('b', 50, 130), ring(), fabric({ majorKn: 60 })]);
    expect(codes(result.violations)).toEqual(['bridle_angle_too_wide']);
    expect(result.pass).toBe(false);
    // Each leg carries W / (2·cos 65°), more than W, so the legs are the weak point.
    expect(result.chainStrengthKn).toBeCloseTo(50 * 2 * Math.cos((65 * Math.PI) / 180), 10);
    expect(result.achievedFactor as number).toBeGreaterThan(5);
  });

  it('fails a malformed bridle and leaves its chain strength unknown', () => {
    const result = check([leg('a', 100, 60), ring(), fabric()]);
    expect(codes(result.violations)).toEqual(['bridle_malformed']);
    expect(result.chainStrengthKn).toBeNull();
    expect(result.pass).toBe(false);
  });

  it('shows the leg tension in its working', () => {
    const result = check([leg('a', 100, 90), leg('b', 100, 90), ring(), fabric()]);
    const step = result.working.find((s) => s.step === 'bridle_leg_tension');
    expect(step?.inputs.includedAngleDeg).toBe(90);
    expect(step?.output as number).toBeCloseTo(wSilks / (2 * Math.cos(Math.PI / 4)), 12);
  });
});

describe('no load path', () => {
  it('fails an empty path', () => {
    const result = check([]);
    expect(codes(result.violations)).toEqual(['no_load_path']);
    expect(result.chainStrengthKn).toBeNull();
    expect(result.pass).toBe(false);
  });

  it('fails a path that holds only an apparatus', () => {
    const result = check([fabric({ majorKn: 100 })]);
    expect(codes(result.violations)).toEqual(['no_load_path']);
    expect(result.violations[0].message).toMatch(/only an apparatus/);
  });
});

describe('the working', () => {
  it('lets a rigger redo the check by hand from the steps', () => {
    const path = [sling({ majorKn: 90 }), link({ majorKn: 40, minorKn: 12 }, { mode: 'minor' }), link({ kind: 'swivel', gate: 'none', majorKn: 30, minorKn: null, gateOpenKn: null, wllKn: 5 }), fabric()];
    const result = check(path);
    const steps = result.working;

    const design = steps.find((s) => s.step === 'design_load');
    expect(design?.inputs).toEqual({ performers: 1, bodyMassKg: 90, gravityMps2: STANDARD_GRAVITY, dynamicFactor: 5.6 });
    const { performers, bodyMassKg, gravityMps2, dynamicFactor } = design?.inputs as Record<string, number>;
    const w = (performers * bodyMassKg * gravityMps2 * dynamicFactor) / 1000;
    expect(design?.output).toBe(result.designLoadKn);
    expect(w).toBeCloseTo(result.designLoadKn, 12);

    const strengths = steps.filter((s) => s.step === 'link_strength');
    const capacities = steps.filter((s) => s.step === 'link_capacity');
    expect(strengths).toHaveLength(path.length);
    expect(capacities).toHaveLength(path.length);
    expect(strengths[1].inputs).toMatchObject({ mode: 'minor', basis: 'minor', minorKn: 12 });
    expect(strengths[1].output).toBe(12);
    const byHand = capacities.map((s) => (s.inputs.effectiveStrengthKn as number) / (s.inputs.loadShare as number));
    capacities.forEach((s, i) => expect(s.output).toBe(byHand[i]));

    const chain = steps.find((s) => s.step === 'chain_strength');
    expect(chain?.output).toBe(Math.min(...byHand));
    expect(chain?.output).toBe(result.chainStrengthKn);
    expect(chain?.inputs.weakestLink).toContain('2');

    const factor = steps.find((s) => s.step === 'achieved_factor');
    expect(factor?.output).toBe((factor?.inputs.chainStrengthKn as number) / (factor?.inputs.designLoadKn as number));
    expect(factor?.inputs.requiredFactor).toBe(5);

    expect(steps.find((s) => s.step === 'structure')).toMatchObject({ inputs: { structuralRatingKn: 10 }, output: 'within rating' });
    expect(steps.filter((s) => s.step === 'working_load_limit')).toEqual([
      expect.objectContaining({ inputs: { loadKn: result.designLoadKn, wllKn: 5 }, output: 'within limit' }),
    ]);
  });

  it('states the 30 % default it used for a missing minor rating', () => {
    const result = check([sling(), link({ majorKn: 20, minorKn: null }, { mode: 'minor' }), fabric()]);
    const step = result.working.filter((s) => s.step === 'link_strength')[1];
    expect(step.inputs).toMatchObject({ basis: 'minor_default_30pct', majorKn: 20, defaultMinorFraction: 0.3, defaultMinorCapKn: 7 });
    expect(step.label).toMatch(/30 %/);
  });

  it('states the 7 kN cap where 30 % of the major rating would be more', () => {
    const result = check([sling(), link({ majorKn: 50, minorKn: null }, { mode: 'minor' }), fabric()]);
    const step = result.working.filter((s) => s.step === 'link_strength')[1];
    expect(step.inputs).toMatchObject({ basis: 'minor_default_cap', majorKn: 50, defaultMinorCapKn: 7 });
    expect(step.output).toBe(7);
    expect(step.label).toMatch(/7 kN cap/);
  });
});

describe('messages', () => {
  it('format forces with grouped thousands and a fixed number of decimals per unit', () => {
    // 12.5 kN is 2,810.11 lbf and 1,274.65 kgf; a strength is cut down.
    expect(formatForce(12.5, 'kN')).toBe('12.5 kN');
    expect(formatForce(12.5, 'lbf')).toBe('2,810 lbf');
    expect(formatForce(12.5, 'kgf')).toBe('1,274 kgf');
    expect(formatForce(4.94255, 'kN', 2)).toBe('4.94 kN');
    expect(formatForce(5000, 'lbf')).toBe('1,124,044 lbf');
    expect(formatForce(-0.01, 'kN')).toBe('-0.1 kN');
    expect(formatForce(-0.001, 'kN', 2)).toBe('-0.01 kN');
    expect(formatForce(0.001, 'kN', 2)).toBe('0.00 kN');
    expect(formatForce(-3.25, 'kN', 2)).toBe('-3.25 kN');
    expect(formatForce(Number.NaN, 'kN')).toBe('— kN');
  });

  it('quote forces in the display unit asked for', () => {
    const result = check([sling(), link({ majorKn: 20 }), fabric()], { displayUnit: 'lbf' });
    // 20 kN is 4,496 lbf.
    expect(result.violations[0].message).toContain('4,496 lbf');
    expect(result.chainStrengthKn).toBe(20);
  });
});

describe('pass', () => {
  it('is true exactly when there are no violations, whatever the warnings', () => {
    const cases = [
      check(typicalPath()),
      check([sling(), link({ serial: 'A' }), link({ serial: 'B' }), fabric()]),
      check([sling(), link({ majorKn: 20 }), fabric()]),
      check([]),
    ];
    expect(cases.map((r) => r.pass)).toEqual([true, true, false, false]);
    expect(codes(cases[1].warnings)).toEqual(['many_links']);
    for (const r of cases) expect(r.pass).toBe(r.violations.length === 0);
  });
});
