import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  checkLoadPath,
  effectiveStrengthKn,
  legShare,
  legTension,
  validateRatings,
  type LinkInput,
  type LoadCheckInput,
  type LoadProfile,
  type RatedGear,
} from '../../../shared/rigging';
import { apparatusKinds, fixedGearKinds, gates, loadingModes, materials } from '../../../shared/schemas/vocabulary';

const RUNS = { numRuns: 500 };

const positive = (max = 200) => fc.double({ min: 0.5, max, noNaN: true, noDefaultInfinity: true });
const fraction = fc.double({ min: 0.05, max: 1, noNaN: true, noDefaultInfinity: true });

/** Gear whose ratings make sense: positive, minor and gate-open at or below the major. */
const soundGear = (kinds: readonly RatedGear['kind'][] = fixedGearKinds): fc.Arbitrary<RatedGear> =>
  fc
    .record({
      id: fc.integer({ min: 1, max: 1_000_000 }),
      kind: fc.constantFrom(...kinds),
      material: fc.constantFrom(...materials),
      gate: fc.constantFrom(...gates),
      serial: fc.integer({ min: 1, max: 9999 }).map((n) => `SN-${n}`),
      majorKn: positive(),
      minorShare: fc.option(fraction, { nil: null }),
      gateOpenShare: fc.option(fraction, { nil: null }),
      wllShare: fc.option(fc.double({ min: 0.01, max: 0.5, noNaN: true }), { nil: null }),
      multiDirectional: fc.boolean(),
    })
    .map(({ minorShare, gateOpenShare, wllShare, ...g }) => ({
      ...g,
      minorKn: minorShare === null ? null : g.majorKn * minorShare,
      gateOpenKn: gateOpenShare === null ? null : g.majorKn * gateOpenShare,
      wllKn: wllShare === null ? null : g.majorKn * wllShare,
    }));

const soundLink = (kinds?: readonly RatedGear['kind'][]): fc.Arbitrary<LinkInput> =>
  fc.record({
    gear: soundGear(kinds),
    mode: fc.constantFrom(...loadingModes),
    threeWay: fc.boolean(),
    basketOverHalf: fc.boolean(),
    leg: fc.constant(null),
    includedAngleDeg: fc.constant(null),
  });

const asLeg = (link: LinkInput, leg: 'a' | 'b', angle: number): LinkInput => ({ ...link, leg, includedAngleDeg: angle });

interface Path {
  links: LinkInput[];
  /** Index of the first link that carries the whole load (0 for a plain chain). */
  trunkStart: number;
}

const plainPath: fc.Arbitrary<Path> = fc
  .tuple(fc.array(soundLink(), { minLength: 1, maxLength: 7 }), fc.option(soundLink(apparatusKinds), { nil: null }))
  .map(([fixed, apparatus]) => ({ links: apparatus ? [...fixed, apparatus] : fixed, trunkStart: 0 }));

const bridlePath: fc.Arbitrary<Path> = fc
  .tuple(
    fc.array(soundLink(), { minLength: 1, maxLength: 3 }),
    fc.array(soundLink(), { minLength: 1, maxLength: 3 }),
    fc.double({ min: 0, max: 179, noNaN: true }),
    fc.array(soundLink(), { minLength: 1, maxLength: 4 }),
    fc.option(soundLink(apparatusKinds), { nil: null }),
  )
  .map(([legA, legB, angle, trunk, apparatus]) => ({
    links: [
      ...legA.map((l) => asLeg(l, 'a', angle)),
      ...legB.map((l) => asLeg(l, 'b', angle)),
      ...trunk,
      ...(apparatus ? [apparatus] : []),
    ],
    trunkStart: legA.length + legB.length,
  }));

const path = fc.oneof(plainPath, bridlePath);

const profile: fc.Arbitrary<LoadProfile> = fc.record({
  performers: fc.integer({ min: 1, max: 4 }),
  bodyMassKg: fc.double({ min: 20, max: 300, noNaN: true }),
  dynamicFactor: fc.double({ min: 1, max: 20, noNaN: true }),
});

const checkInput = (links: LinkInput[]): fc.Arbitrary<LoadCheckInput> =>
  fc.record({
    links: fc.constant(links),
    structuralRatingKn: fc.double({ min: 0.5, max: 100, noNaN: true }),
    profile,
    requiredFactor: fc.double({ min: 1, max: 12, noNaN: true }),
  });

/** Anything the rigger could type, sensible or not: odd ratings, stray leg marks, odd angles. */
const wildLink: fc.Arbitrary<LinkInput> = fc.record({
  gear: fc.record({
    id: fc.integer({ min: 1, max: 1000 }),
    kind: fc.constantFrom(...fixedGearKinds, ...apparatusKinds),
    material: fc.constantFrom(...materials),
    gate: fc.constantFrom(...gates),
    serial: fc.string({ maxLength: 6 }),
    majorKn: fc.double({ min: -5, max: 100, noNaN: true }),
    minorKn: fc.option(fc.double({ min: -5, max: 100, noNaN: true }), { nil: null }),
    gateOpenKn: fc.option(fc.double({ min: -5, max: 100, noNaN: true }), { nil: null }),
    wllKn: fc.option(fc.double({ min: -1, max: 20, noNaN: true }), { nil: null }),
    multiDirectional: fc.boolean(),
  }),
  mode: fc.constantFrom(...loadingModes),
  threeWay: fc.boolean(),
  basketOverHalf: fc.boolean(),
  leg: fc.constantFrom('a' as const, 'b' as const, null, null, null),
  includedAngleDeg: fc.option(fc.constantFrom(0, 45, 60, 90, 110, 120, 130, 179, 180, 200, -10), { nil: null }),
});

const wildInput: fc.Arbitrary<LoadCheckInput> = fc.record({
  links: fc.array(wildLink, { maxLength: 8 }),
  structuralRatingKn: fc.double({ min: -5, max: 60, noNaN: true }),
  profile: fc.record({
    performers: fc.integer({ min: 0, max: 4 }),
    bodyMassKg: fc.double({ min: 20, max: 300, noNaN: true }),
    dynamicFactor: fc.double({ min: 1, max: 20, noNaN: true }),
  }),
  requiredFactor: fc.double({ min: 1, max: 12, noNaN: true }),
});

const codes = (findings: { code: string }[]): string[] => findings.map((f) => f.code);

describe('properties of the load check', () => {
  it('never raises the chain strength when a link is added', () => {
    fc.assert(
      fc.property(path, soundLink(), profile, fc.nat(), fc.boolean(), (p, extra, load, at, onLeg) => {
        let links: LinkInput[];
        if (onLeg && p.trunkStart > 0) {
          // A further link in leg a, at the bridle's angle.
          const first = p.links[0];
          const position = at % (p.links.findIndex((l) => l.leg === 'b') + 1);
          links = [...p.links.slice(0, position), asLeg(extra, 'a', first.includedAngleDeg as number), ...p.links.slice(position)];
        } else {
          const position = p.trunkStart + (at % (p.links.length - p.trunkStart + 1));
          links = [...p.links.slice(0, position), extra, ...p.links.slice(position)];
        }
        const base = { structuralRatingKn: 50, profile: load, requiredFactor: 5 };
        const before = checkLoadPath({ ...base, links: p.links }).chainStrengthKn;
        const after = checkLoadPath({ ...base, links }).chainStrengthKn;
        if (before === null) expect(after).toBeNull();
        else if (after !== null) expect(after).toBeLessThanOrEqual(before);
      }),
      RUNS,
    );
  });

  it('is as strong as the weakest link of a plain chain', () => {
    fc.assert(
      fc.property(plainPath, profile, (p, load) => {
        const strengths = p.links.map((l) => effectiveStrengthKn(l.gear, l.mode).kn);
        const result = checkLoadPath({ links: p.links, structuralRatingKn: 50, profile: load, requiredFactor: 5 });
        if (strengths.some((s) => s === null)) expect(result.chainStrengthKn).toBeNull();
        else expect(result.chainStrengthKn).toBe(Math.min(...(strengths as number[])));
      }),
      RUNS,
    );
  });

  it('never counts a minor-axis or gate-open strength above the major without flagging the ratings', () => {
    const anyRatings = fc.record({
      majorKn: positive(),
      minorKn: fc.option(positive(300), { nil: null }),
      gateOpenKn: fc.option(positive(300), { nil: null }),
    });
    fc.assert(
      fc.property(soundGear(), anyRatings, (g, ratings) => {
        const gear = { ...g, ...ratings };
        const major = effectiveStrengthKn(gear, 'major').kn as number;
        const minor = effectiveStrengthKn(gear, 'minor').kn as number;
        const gateOpen = effectiveStrengthKn(gear, 'gate_open').kn;
        const flagged = codes(validateRatings(gear)).includes('rating_above_major');
        if (!flagged) {
          expect(minor).toBeLessThanOrEqual(major);
          if (gateOpen !== null) expect(gateOpen).toBeLessThanOrEqual(major);
        }
        if (gear.minorKn === null) expect(minor).toBeLessThan(major);
      }),
      RUNS,
    );
  });

  it('puts more tension on each leg as the bridle angle widens', () => {
    const angle = fc.double({ min: 0, max: 179.99, noNaN: true });
    fc.assert(
      fc.property(angle, angle, fc.double({ min: 0.1, max: 100, noNaN: true }), (x, y, w) => {
        const [narrow, wide] = x <= y ? [x, y] : [y, x];
        expect(legShare(narrow)).toBeLessThanOrEqual(legShare(wide));
        expect(legTension(w, narrow)).toBeLessThanOrEqual(legTension(w, wide));
        if (wide - narrow >= 0.001) expect(legShare(narrow)).toBeLessThan(legShare(wide));
      }),
      RUNS,
    );
  });

  it('never raises the chain strength of a bridle as its angle widens', () => {
    fc.assert(
      fc.property(bridlePath, fc.double({ min: 0, max: 179, noNaN: true }), profile, (p, other, load) => {
        const current = p.links[0].includedAngleDeg as number;
        const wider = Math.max(current, other);
        const widened = p.links.map((l) => (l.leg === null ? l : { ...l, includedAngleDeg: wider }));
        const base = { structuralRatingKn: 50, profile: load, requiredFactor: 5 };
        const before = checkLoadPath({ ...base, links: p.links }).chainStrengthKn;
        const after = checkLoadPath({ ...base, links: widened }).chainStrengthKn;
        if (before !== null && after !== null) expect(after).toBeLessThanOrEqual(before);
        expect(after === null).toBe(before === null);
      }),
      RUNS,
    );
  });

  it('never raises the achieved factor when more performers share the point', () => {
    fc.assert(
      fc.property(path, profile, fc.integer({ min: 1, max: 6 }), (p, load, more) => {
        const base = { links: p.links, structuralRatingKn: 50, requiredFactor: 5 };
        const fewer = checkLoadPath({ ...base, profile: load }).achievedFactor;
        const crowded = checkLoadPath({ ...base, profile: { ...load, performers: load.performers + more } }).achievedFactor;
        if (fewer === null) expect(crowded).toBeNull();
        else expect(crowded as number).toBeLessThanOrEqual(fewer);
      }),
      RUNS,
    );
  });

  it('passes exactly when there are no violations, for anything a rigger could enter', () => {
    fc.assert(
      fc.property(wildInput, (input) => {
        const result = checkLoadPath(input);
        expect(result.pass).toBe(result.violations.length === 0);
        // A strength that could not be worked out never reads as a pass.
        if (result.chainStrengthKn === null) expect(result.pass).toBe(false);
      }),
      RUNS,
    );
  });

  it('passes exactly when there are no violations, for sensible paths and loads', () => {
    fc.assert(
      fc.property(path.chain((p) => checkInput(p.links)), (input) => {
        const result = checkLoadPath(input);
        expect(result.pass).toBe(result.violations.length === 0);
        if (result.pass) expect(result.achievedFactor as number).toBeGreaterThanOrEqual(input.requiredFactor);
      }),
      RUNS,
    );
  });

  it('keeps the same pass when a link is cross-loaded at no loss of strength, adding only a warning', () => {
    fc.assert(
      fc.property(path.chain((p) => fc.tuple(checkInput(p.links), fc.nat())), ([input, at]) => {
        const index = at % input.links.length;
        const links = input.links.map((l, i) => (i === index ? { ...l, mode: 'minor' as const, gear: { ...l.gear, minorKn: l.gear.majorKn } } : l));
        // The same item, loaded along its major axis but rated equally across it, for comparison.
        const reference = input.links.map((l, i) => (i === index ? { ...l, mode: 'major' as const, gear: { ...l.gear, minorKn: l.gear.majorKn } } : l));
        const before = checkLoadPath({ ...input, links: reference });
        const after = checkLoadPath({ ...input, links });
        expect(codes(after.warnings)).toContain('cross_loaded');
        expect(after.warnings.length).toBeGreaterThan(before.warnings.length);
        expect(codes(after.violations)).toEqual(codes(before.violations));
        expect(after.pass).toBe(before.pass);
      }),
      RUNS,
    );
  });

  it('keeps the same pass when a strong spare connector is clipped in, adding only warnings', () => {
    const spare = (id: number): LinkInput => ({
      gear: {
        id,
        kind: 'quick_link',
        material: 'steel',
        gate: 'screw',
        serial: `SPARE-${id}`,
        majorKn: 1e6,
        minorKn: null,
        gateOpenKn: null,
        wllKn: null,
        multiDirectional: false,
      },
      mode: 'major',
      threeWay: false,
      basketOverHalf: false,
      leg: null,
      includedAngleDeg: null,
    });
    fc.assert(
      fc.property(path.chain((p) => fc.tuple(fc.constant(p), checkInput(p.links), fc.nat())), ([p, input, at]) => {
        // Into the part of the path that carries the whole load, above the last link; in a bridle,
        // below the meeting link, which takes three strands by construction (§4.2).
        const first = p.trunkStart > 0 ? p.trunkStart + 1 : 0;
        const span = input.links.length - first;
        if (span <= 0) return;
        const position = first + (at % span);
        const links = [...input.links.slice(0, position), spare(at), ...input.links.slice(position)];
        const before = checkLoadPath(input);
        const after = checkLoadPath({ ...input, links });
        expect(after.chainStrengthKn).toBe(before.chainStrengthKn);
        expect(codes(after.violations).sort()).toEqual(codes(before.violations).sort());
        expect(after.pass).toBe(before.pass);
        expect(after.warnings.length).toBeGreaterThanOrEqual(before.warnings.length);
      }),
      RUNS,
    );
  });
});
