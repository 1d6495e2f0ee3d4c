import { describe, expect, it } from 'vitest';
import { checkLoadPath, checkRules, effectiveStrengthKn, type LinkInput, type LoadProfile } from '../../../shared/rigging';
import { fabric, link, sling } from './link-builders';

/*
 * PRODUCT.md §4.2 as amended: the link a bridle's legs meet in is three-way by construction, and
 * a missing minor-axis rating counts at the lesser of 30 % of the major rating and 7 kN.
 */

const silks: LoadProfile = { performers: 1, bodyMassKg: 90, dynamicFactor: 5.6 };
const codes = (findings: { code: string }[]): string[] => findings.map((f) => f.code);

describe('the bridle meeting link', () => {
  // Two round-sling legs at 90° meet in a plain carabiner whose three-way box was left unticked.
  const bridle = (meeting: LinkInput): LinkInput[] => [
    sling({ serial: 'RS-A' }, { leg: 'a', includedAngleDeg: 90 }),
    sling({ serial: 'RS-B' }, { leg: 'b', includedAngleDeg: 90 }),
    meeting,
    link({ kind: 'swivel', gate: 'none', majorKn: 36, minorKn: null, gateOpenKn: null, serial: 'SW-1' }),
    fabric({ majorKn: 40 }),
  ];

  it('lists three_way_on_connector for a plain carabiner where a 90° bridle meets, three-way unticked [common practice]', () => {
    const result = checkLoadPath({
      links: bridle(link({ kind: 'carabiner', serial: 'CB-7', majorKn: 45 }, { threeWay: false })),
      structuralRatingKn: 20,
      profile: silks,
      requiredFactor: 5,
    });
    const finding = result.violations.find((v) => v.code === 'three_way_on_connector');
    expect(finding, 'the meeting carabiner is flagged').toBeDefined();
    expect(finding!.linkIndex).toBe(2);
    expect(finding!.message).toContain('Carabiner CB-7');
    expect(finding!.message).toMatch(/bridle legs meet/);
    expect(result.pass).toBe(false);
  });

  it('flags it the same whether or not the box is ticked, once', () => {
    const ticked = checkRules(bridle(link({ serial: 'CB-8' }, { threeWay: true })));
    const unticked = checkRules(bridle(link({ serial: 'CB-8' }, { threeWay: false })));
    expect(codes(ticked.violations).filter((c) => c === 'three_way_on_connector')).toHaveLength(1);
    expect(codes(unticked.violations)).toEqual(codes(ticked.violations));
  });

  it('accepts a delta screw link rated multi-directional as the meeting link, ticked or not', () => {
    const delta = link({ kind: 'screw_link_delta', serial: 'DL-1', majorKn: 30, multiDirectional: true }, { threeWay: false });
    expect(codes(checkRules(bridle(delta)).violations)).not.toContain('three_way_on_connector');
  });

  it('leaves an unticked carabiner in a plain chain alone: only the meeting link is three-way by construction', () => {
    const plain = [sling(), link({ serial: 'CB-9' }, { threeWay: false }), fabric()];
    expect(codes(checkRules(plain).violations)).not.toContain('three_way_on_connector');
  });
});

describe('the minor-axis default where the maker gives none', () => {
  it('counts a 25 kN connector loaded on its minor axis at 7 kN, the EN 12275 class minimum, not 7.5 kN [published: EN 12275:2013, via a test-house summary]', () => {
    // EN 12275 class K: 25 kN major axis, 7 kN minor axis (CHECK-VALUES.md). The rule that caps the
    // assumed figure there is the studio's [studio choice]; the minimum it must not exceed is published.
    const classKMinorMinimumKn = 7;
    const connector = link({ serial: 'CB-25', majorKn: 25, minorKn: null }, { mode: 'minor' });
    const counted = effectiveStrengthKn(connector.gear, 'minor');
    expect(counted.kn).toBe(classKMinorMinimumKn);
    expect(counted.kn as number).toBeLessThan(25 * 0.3);

    const result = checkLoadPath({ links: [sling(), connector, fabric()], structuralRatingKn: 20, profile: silks, requiredFactor: 5 });
    expect(result.chainStrengthKn).toBe(classKMinorMinimumKn);
    const warning = result.warnings.find((w) => w.code === 'minor_rating_assumed');
    expect(warning, 'the assumption is warned about').toBeDefined();
    expect(warning!.message).toContain('Carabiner CB-25');
    expect(warning!.message).toMatch(/counted at 7(\.0+)? kN/);
    expect(warning!.linkIndex).toBe(1);
  });

  it('keeps 30 % where that is below 7 kN: a 20 kN connector counts 6 kN, naming the figure [studio choice]', () => {
    const result = checkRules([sling(), link({ serial: 'CB-20', majorKn: 20, minorKn: null }, { mode: 'minor' }), fabric()]);
    const warning = result.warnings.find((w) => w.code === 'minor_rating_assumed');
    expect(warning!.message).toMatch(/counted at 6(\.0+)? kN/);
    expect(effectiveStrengthKn({ majorKn: 20, minorKn: null, gateOpenKn: null }, 'minor').kn).toBeCloseTo(6, 12);
  });

  it('names the figure in the display unit when the studio shows lbf', () => {
    const result = checkRules([sling(), link({ majorKn: 25, minorKn: null }, { mode: 'minor' }), fabric()], { displayUnit: 'lbf' });
    // 7 kN = 1,573.66 lbf [hand calculation from 1 lbf = 4.4482216152605 N].
    expect(result.warnings.find((w) => w.code === 'minor_rating_assumed')!.message).toMatch(/1,57\d lbf/);
  });

  it('does not warn when the maker gives a minor rating, or the link is loaded along its major axis', () => {
    expect(codes(checkRules([sling(), link({ majorKn: 25, minorKn: 8 }, { mode: 'minor' }), fabric()]).warnings)).not.toContain('minor_rating_assumed');
    expect(codes(checkRules([sling(), link({ majorKn: 25, minorKn: null }), fabric()]).warnings)).not.toContain('minor_rating_assumed');
  });
});
