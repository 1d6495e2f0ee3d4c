import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  checkLoadPath,
  fixedToward,
  formatFactor,
  formatForce,
  formatLoad,
  formatRequiredFactor,
  fromKn,
  workingFigureToward,
} from '../../../shared/rigging';
import { units } from '../../../shared/schemas/vocabulary';
import { link, sling } from './link-builders';

// PRODUCT.md §4.8: a factor or strength is cut toward the unsafe side, never rounded across a requirement.

const RUNS = { numRuns: 2000 };
const figure = fc.double({ min: 0.001, max: 1e6, noNaN: true, noDefaultInfinity: true });
/** "1,234.5 kN" → 1234.5 */
const numberIn = (text: string) => Number(text.replace(/,/g, '').split(' ')[0]);

describe('a figure cut toward a side', () => {
  it('never shows more than the value when cut down, nor less when cut up, and is within one step of it', () => {
    fc.assert(
      fc.property(figure, fc.integer({ min: 0, max: 4 }), (v, places) => {
        const down = Number(fixedToward(v, places, 'down'));
        const up = Number(fixedToward(v, places, 'up'));
        expect(down).toBeLessThanOrEqual(v);
        expect(up).toBeGreaterThanOrEqual(v);
        expect(v - down).toBeLessThan(10 ** -places + 1e-9 * v);
        expect(up - v).toBeLessThan(10 ** -places + 1e-9 * v);
      }),
      RUNS,
    );
  });

  it('shows an entered figure as entered: 1.15 stays 1.15, 22.2 stays 22.2', () => {
    expect(fixedToward(1.15, 2, 'down')).toBe('1.15');
    expect(fixedToward(22.2, 1, 'down')).toBe('22.2');
    expect(fixedToward(0.1 + 0.2, 2, 'up')).toBe('0.31');
    expect(fixedToward(0.1 + 0.2, 2, 'down')).toBe('0.30');
  });
});

describe('factors', () => {
  it('reads 4.996 against a required 5 as "4.99" and the requirement as "5"', () => {
    expect(formatFactor(4.996)).toBe('4.99');
    expect(formatRequiredFactor(5)).toBe('5');
    expect(formatFactor(4.9999999)).toBe('4.99');
    expect(formatFactor(8.9024)).toBe('8.9');
    expect(formatFactor(null)).toBe('—');
  });

  it('never shows a failing factor equal to or above the required one, whatever the figures', () => {
    const factor = fc.double({ min: 0.01, max: 50, noNaN: true, noDefaultInfinity: true });
    fc.assert(
      fc.property(factor, factor, (achieved, required) => {
        fc.pre(achieved < required);
        expect(Number(formatFactor(achieved))).toBeLessThan(Number(formatRequiredFactor(required)));
      }),
      RUNS,
    );
  });

  it('never shows a passing factor below the required one when the requirement has at most two decimals', () => {
    const required = fc.integer({ min: 100, max: 5000 }).map((n) => n / 100);
    const factor = fc.double({ min: 1, max: 60, noNaN: true, noDefaultInfinity: true });
    fc.assert(
      fc.property(factor, required, (achieved, req) => {
        fc.pre(achieved >= req);
        expect(Number(formatFactor(achieved))).toBeGreaterThanOrEqual(Number(formatRequiredFactor(req)));
      }),
      RUNS,
    );
  });

  it('writes the failing load check of a chain just short of 5 × as "4.99 times", with "at least 5 times" required', () => {
    // A 24.7 kN link on one 90 kg performer at 5.6: W = 4.9432 kN; the carabiner is sized for 4.996 ×.
    const w = (90 * 9.80665 * 5.6) / 1000;
    const result = checkLoadPath({
      links: [sling(), link({ majorKn: 4.996 * w, minorKn: null, gateOpenKn: null })],
      structuralRatingKn: 20,
      profile: { performers: 1, bodyMassKg: 90, dynamicFactor: 5.6 },
      requiredFactor: 5,
    });
    expect(result.achievedFactor).toBeCloseTo(4.996, 12);
    expect(result.pass).toBe(false);
    const message = result.violations.find((v) => v.code === 'factor_below_required')?.message ?? '';
    expect(message).toContain('is 4.99 times the design load');
    expect(message).toContain('at least 5 times');
  });
});

describe('forces', () => {
  it('cuts a strength down and a load up in every display unit', () => {
    fc.assert(
      fc.property(fc.double({ min: 0.01, max: 2000, noNaN: true, noDefaultInfinity: true }), fc.constantFrom(...units), fc.integer({ min: 0, max: 3 }), (kn, unit, places) => {
        const exact = fromKn(kn, unit);
        expect(numberIn(formatForce(kn, unit, places))).toBeLessThanOrEqual(exact);
        expect(numberIn(formatLoad(kn, unit, places))).toBeGreaterThanOrEqual(exact);
      }),
      RUNS,
    );
  });

  it('never shows a load above a strength as within it, nor a strength below a load as enough', () => {
    fc.assert(
      fc.property(fc.double({ min: 0.01, max: 2000, noNaN: true }), fc.double({ min: 0.01, max: 2000, noNaN: true }), (load, strength) => {
        fc.pre(load > strength);
        for (const unit of units) expect(numberIn(formatLoad(load, unit))).toBeGreaterThanOrEqual(numberIn(formatForce(strength, unit)));
      }),
      RUNS,
    );
  });

  it('shows a 7 kN rating as 1,573 lbf (1,573.66 cut down) and a 7 kN load as 1,574 lbf', () => {
    expect(formatForce(7, 'lbf')).toBe('1,573 lbf');
    expect(formatLoad(7, 'lbf')).toBe('1,574 lbf');
    expect(formatForce(7, 'kN')).toBe('7.0 kN');
    expect(formatForce(22.2499, 'kN')).toBe('22.2 kN');
  });

  it('cuts the working’s loads up and its strengths and factor down', () => {
    expect(workingFigureToward('design_load', null)).toBe('up');
    expect(workingFigureToward('bridle_leg_tension', null)).toBe('up');
    expect(workingFigureToward('achieved_factor', null)).toBe('down');
    expect(workingFigureToward('chain_strength', null)).toBe('down');
    expect(workingFigureToward('link_capacity', 'loadKn')).toBe('up');
    expect(workingFigureToward('achieved_factor', 'requiredFactor')).toBe('up');
    expect(workingFigureToward('link_strength', 'majorKn')).toBe('down');
  });
});

describe('force fields', () => {
  it('show 5000 lbf switched to kN as 22.24, and a stored 22.2411 kN opened in lbf as 5000', async () => {
    const { forceInputText, toKn } = await import('../../../shared/rigging');
    expect(forceInputText(toKn(5000, 'lbf'), 'kN')).toBe('22.24');
    expect(forceInputText(toKn(5000, 'lbf'), 'lbf')).toBe('5000');
    expect(forceInputText(45, 'kN')).toBe('45');
    // 45 kN is 10,116.41 lbf and 4,588.72 kgf: a rating is cut down.
    expect(forceInputText(45, 'lbf')).toBe('10116.4');
    expect(forceInputText(45, 'kgf')).toBe('4588.7');
  });
});
