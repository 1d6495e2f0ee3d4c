import type { BridleLeg } from '../schemas/vocabulary';
import { describeGear } from './strength';
import type { Finding, LinkInput } from './types';
import { fixedToward } from './format';

/** Above this included angle a bridle is flagged as wide (a warning). */
export const BRIDLE_WIDE_ABOVE_DEG = 90;
/** Above this included angle each leg carries more than the whole load: the check fails. */
export const BRIDLE_MAX_DEG = 120;

function assertAngleInDomain(includedAngleDeg: number): void {
  // At 180° the legs pull straight against each other and the tension has no finite value.
  if (!(includedAngleDeg >= 0 && includedAngleDeg < 180)) {
    throw new RangeError(`A bridle's included angle must be at least 0° and below 180°; got ${includedAngleDeg}.`);
  }
}

/** Tension in one leg of a two-leg bridle per unit of the load W it holds: 1 / (2·cos(θ/2)). */
export function legShare(includedAngleDeg: number): number {
  assertAngleInDomain(includedAngleDeg);
  return 1 / (2 * Math.cos(((includedAngleDeg / 2) * Math.PI) / 180));
}

/** Tension factor of the published load-angle tables: 1 / cos(θ/2), i.e. twice the leg share. */
export function tensionFactor(includedAngleDeg: number): number {
  assertAngleInDomain(includedAngleDeg);
  return 1 / Math.cos(((includedAngleDeg / 2) * Math.PI) / 180);
}

/** T = W / (2·cos(θ/2)), in the unit W is given in. */
export function legTension(designLoad: number, includedAngleDeg: number): number {
  return designLoad * legShare(includedAngleDeg);
}

export interface BridleLayout {
  /** `plain`: no link is marked as a leg; `malformed`: marked links that do not make a bridle. */
  kind: 'plain' | 'bridle' | 'malformed';
  /** θ of a well-formed bridle; null otherwise. */
  includedAngleDeg: number | null;
  /** Indexes of the links of each leg, from the structure down (well-formed bridle only). */
  legA: number[];
  legB: number[];
  /** Index of the first unmarked link, where the legs meet (well-formed bridle only). */
  meetingIndex: number | null;
  /** Load on each link as a share of W; null where a malformed layout leaves it unknown. */
  loadShares: (number | null)[];
  violations: Finding[];
  warnings: Finding[];
}

function linkName(links: LinkInput[], index: number): string {
  return `${describeGear(links[index].gear)} (link ${index + 1})`;
}

/** Problems that stop the marked links from reading as leg a, then leg b, then the meeting link. */
function findMalformations(links: LinkInput[]): Finding[] {
  const problems: Finding[] = [];
  const malformed = (message: string, linkIndex?: number): void => {
    problems.push({ code: 'bridle_malformed', message, ...(linkIndex === undefined ? {} : { linkIndex }) });
  };
  const legOf = (i: number): BridleLeg | null => links[i].leg;
  const marked = links.map((_, i) => i).filter((i) => legOf(i) !== null);
  const firstUnmarked = links.findIndex((link) => link.leg === null);

  if (firstUnmarked === -1) {
    malformed(
      'Every link is marked as a bridle leg, so the legs never meet: list leg a, then leg b, then the link they meet in (for example a delta screw link or a ring) and the rest of the path below it.',
    );
  } else {
    const strays = marked.filter((i) => i > firstUnmarked);
    for (const i of strays) {
      malformed(
        `${linkName(links, i)} is marked as leg ${legOf(i)} but comes after ${linkName(links, firstUnmarked)}, where the legs have already met: list both legs first.`,
        i,
      );
    }
  }

  const prefix = marked.filter((i) => firstUnmarked === -1 || i < firstUnmarked);
  const legA = prefix.filter((i) => legOf(i) === 'a');
  const legB = prefix.filter((i) => legOf(i) === 'b');
  if (prefix.length === 0) {
    // Nothing above the meeting link is marked; the stray marks are already reported.
  } else if (legA.length === 0 || legB.length === 0) {
    const present = legA.length === 0 ? 'b' : 'a';
    const missing = present === 'a' ? 'b' : 'a';
    malformed(
      `Only leg ${present} of the bridle is listed: a bridle needs both legs, leg a then leg b, each from the structure down. Add leg ${missing} or clear the leg marks.`,
      prefix[0],
    );
  } else {
    const firstB = legB[0];
    const lateA = legA.find((i) => i > firstB);
    if (lateA !== undefined) {
      malformed(
        `The bridle legs are interleaved: ${linkName(links, lateA)} is marked leg a but comes after ${linkName(links, firstB)} of leg b. List all of leg a, then all of leg b.`,
        lateA,
      );
    }
  }

  const missingAngle = marked.filter((i) => links[i].includedAngleDeg === null);
  for (const i of missingAngle) {
    malformed(`${linkName(links, i)} is marked as a bridle leg but has no included angle: enter the angle between the two legs.`, i);
  }
  const angles = [...new Set(marked.map((i) => links[i].includedAngleDeg).filter((a): a is number => a !== null))];
  if (angles.length > 1) {
    malformed(
      `The bridle legs give different included angles (${angles.map((a) => `${a}°`).join(', ')}): the angle between the legs is one figure, entered the same on every leg link.`,
      marked[0],
    );
  }
  for (const angle of angles) {
    if (!(angle >= 0 && angle < 180)) {
      malformed(`A bridle's included angle must be at least 0° and below 180°; ${angle}° cannot be rigged.`, marked[0]);
    }
  }
  return problems;
}

/**
 * Reads a path's leg marks (PRODUCT.md §4.2): links marked leg a, then leg b, each from the
 * structure down and each with the same included angle θ, meeting in the first unmarked link.
 * Each leg link carries W / (2·cos(θ/2)); the meeting link and everything below it carry W.
 * An angle on an unmarked link is ignored: only leg links hang at an angle.
 */
export function parseBridle(links: LinkInput[]): BridleLayout {
  const noMarks = links.every((link) => link.leg === null);
  if (noMarks) {
    return {
      kind: 'plain',
      includedAngleDeg: null,
      legA: [],
      legB: [],
      meetingIndex: null,
      loadShares: links.map(() => 1),
      violations: [],
      warnings: [],
    };
  }

  const problems = findMalformations(links);
  if (problems.length > 0) {
    return {
      kind: 'malformed',
      includedAngleDeg: null,
      legA: [],
      legB: [],
      meetingIndex: null,
      // The leg loads depend on a geometry we cannot read, so they stay unknown.
      loadShares: links.map((link) => (link.leg === null ? 1 : null)),
      violations: problems,
      warnings: [],
    };
  }

  const meetingIndex = links.findIndex((link) => link.leg === null);
  const legA = links.map((_, i) => i).filter((i) => links[i].leg === 'a');
  const legB = links.map((_, i) => i).filter((i) => links[i].leg === 'b');
  const theta = links[legA[0]].includedAngleDeg as number;
  const share = legShare(theta);
  const violations: Finding[] = [];
  const warnings: Finding[] = [];
  const meeting = linkName(links, meetingIndex);
  if (theta > BRIDLE_MAX_DEG) {
    violations.push({
      code: 'bridle_angle_too_wide',
      message: `The bridle meeting at ${meeting} has an included angle of ${theta}°, above the ${BRIDLE_MAX_DEG}° limit: each leg would carry ${fixedToward(share, 2, 'up')} times the whole load. Narrow the bridle.`,
      linkIndex: meetingIndex,
    });
  } else if (theta > BRIDLE_WIDE_ABOVE_DEG) {
    warnings.push({
      code: 'bridle_angle_wide',
      message: `The bridle meeting at ${meeting} has an included angle of ${theta}°, wider than ${BRIDLE_WIDE_ABOVE_DEG}°: each leg carries ${fixedToward(share, 2, 'up')} times the load. A narrower bridle puts less on the legs.`,
      linkIndex: meetingIndex,
    });
  }

  return {
    kind: 'bridle',
    includedAngleDeg: theta,
    legA,
    legB,
    meetingIndex,
    loadShares: links.map((link) => (link.leg === null ? 1 : share)),
    violations,
    warnings,
  };
}
