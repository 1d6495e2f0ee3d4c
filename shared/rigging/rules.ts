import { isApparatusKind, isConnectorKind, type ForceUnit } from '../schemas/vocabulary';
import { parseBridle, type BridleLayout } from './bridle';
import { assumedMinorKn, describeGear, effectiveStrengthKn, isUsableStrength, MINOR_DEFAULT_CAP_KN, validateRatings } from './strength';
import type { Finding, LinkInput } from './types';
import { formatForce } from './format';

/** A standing item of every inspection checklist (PRODUCT.md §4.3). */
export const SCREW_GATE_CHECKLIST_LABEL = 'Screw gates hang gate down and locked';
export const SCREW_GATE_CHECKLIST_ITEM = { key: 'screw_gates_down_locked', label: SCREW_GATE_CHECKLIST_LABEL } as const;

export interface RuleOptions {
  /** Unit for forces quoted in messages; figures in the result stay in kN. */
  displayUnit?: ForceUnit;
}

export interface RuleFindings {
  violations: Finding[];
  warnings: Finding[];
}

function nameOf(link: LinkInput): string {
  return describeGear(link.gear);
}

/** Rating checks of one link's gear, tagged with the link's position. */
export function ratingFindings(link: LinkInput, index: number): Finding[] {
  return validateRatings(link.gear).map((finding) => ({ ...finding, linkIndex: index }));
}

/**
 * Violation: a connector not rated multi-directional takes three strands (a three-way load).
 * `bridleMeeting`: the link a bridle's legs meet in takes three strands by construction
 * (PRODUCT.md §4.2), so the rule applies to it whether or not its flag is set.
 */
export function threeWayOnConnector(link: LinkInput, index: number, bridleMeeting = false): Finding | null {
  if (!(link.threeWay || bridleMeeting) || !isConnectorKind(link.gear.kind) || link.gear.multiDirectional) return null;
  const why = bridleMeeting ? 'takes a three-way load (the two bridle legs meet in it and the load hangs below)' : 'takes a three-way load';
  return {
    code: 'three_way_on_connector',
    message: `${nameOf(link)} ${why} but is not rated multi-directional. Use a tri or delta screw link, or a swivel base, rated for a three-way load.`,
    linkIndex: index,
  };
}

/** Warning: no minor-axis rating is entered, so a cross-loaded link counts at an assumed figure. */
export function minorRatingAssumed(link: LinkInput, index: number, options: RuleOptions = {}): Finding | null {
  if (link.mode !== 'minor' || link.gear.minorKn !== null || !isUsableStrength(link.gear.majorKn)) return null;
  const unit = options.displayUnit ?? 'kN';
  const assumed = assumedMinorKn(link.gear.majorKn);
  const rule =
    assumed.basis === 'minor_default_cap'
      ? `the lesser of 30 % of its major rating and ${formatForce(MINOR_DEFAULT_CAP_KN, unit)}, the smallest minor-axis minimum of EN 12275's classes`
      : `30 % of its major rating (the lesser of that and ${formatForce(MINOR_DEFAULT_CAP_KN, unit)})`;
  return {
    code: 'minor_rating_assumed',
    message: `${nameOf(link)} has no minor-axis rating entered, so it is counted at ${formatForce(assumed.kn, unit)} across its minor axis: ${rule}. Enter the maker's minor-axis rating from its marking.`,
    linkIndex: index,
  };
}

/** Violation: wide material sits past the halfway point of a carabiner's basket and levers it. */
export function basketOverfilled(link: LinkInput, index: number): Finding | null {
  if (!link.basketOverHalf || link.gear.kind !== 'carabiner') return null;
  return {
    code: 'basket_overfilled',
    message: `Wide material fills the basket of ${nameOf(link)} past its halfway point, which overloads it through leverage. Use a screw link or a connector made for wide material.`,
    linkIndex: index,
  };
}

/** Warning: a link loaded across its minor axis, on top of the lower strength it is counted at. */
export function crossLoaded(link: LinkInput, index: number, options: RuleOptions = {}): Finding | null {
  if (link.mode !== 'minor') return null;
  const unit = options.displayUnit ?? 'kN';
  const strength = effectiveStrengthKn(link.gear, 'minor');
  const countedAt =
    strength.basis === 'minor_default_30pct'
      ? `${formatForce(strength.kn as number, unit)}, 30 % of its major rating, as no minor-axis rating is entered`
      : strength.basis === 'minor_default_cap'
        ? `${formatForce(strength.kn as number, unit)}, the assumed minor-axis figure, as no minor-axis rating is entered`
        : `its minor-axis rating of ${formatForce(strength.kn as number, unit)}`;
  return {
    code: 'cross_loaded',
    message: `${nameOf(link)} is loaded across its minor axis (cross-loaded) and is counted at ${countedAt}. Re-clip it so the load runs along its spine where the rigging allows.`,
    linkIndex: index,
  };
}

/** Warning: a link loaded with its gate open, on top of the strength it is counted at. */
export function gateOpen(link: LinkInput, index: number, options: RuleOptions = {}): Finding | null {
  if (link.mode !== 'gate_open') return null;
  const unit = options.displayUnit ?? 'kN';
  const strength = effectiveStrengthKn(link.gear, 'gate_open');
  const countedAt =
    strength.kn === null
      ? 'it has no gate-open rating, so its strength cannot be counted'
      : `it is counted at its gate-open rating of ${formatForce(strength.kn, unit)}`;
  return {
    code: 'gate_open',
    message: `${nameOf(link)} is loaded with its gate open; ${countedAt}. Close and lock the gate where it can be.`,
    linkIndex: index,
  };
}

/** Violation: a link loaded gate open whose maker gives no gate-open rating: no figure is assumed. */
export function gateOpenUnrated(link: LinkInput, index: number): Finding | null {
  if (link.mode !== 'gate_open' || link.gear.gateOpenKn !== null) return null;
  return {
    code: 'gate_open_unrated',
    message: `${nameOf(link)} is loaded with its gate open but has no gate-open rating, so its strength cannot be counted. Close the gate, or enter the maker's gate-open rating.`,
    linkIndex: index,
  };
}

/** Violation: an apparatus anywhere but the bottom of the path; a path holds at most one. */
export function apparatusNotLast(links: LinkInput[]): Finding[] {
  const last = links.length - 1;
  const apparatusCount = links.filter((link) => isApparatusKind(link.gear.kind)).length;
  const findings: Finding[] = [];
  links.forEach((link, index) => {
    if (!isApparatusKind(link.gear.kind) || index === last) return;
    const why =
      apparatusCount > 1
        ? `the path holds ${apparatusCount} apparatus, and it may hold only one, hung as the last link`
        : 'the apparatus hangs as the last link of the path, below all the fixed rigging';
    findings.push({
      code: 'apparatus_not_last',
      message: `${nameOf(link)} is an apparatus at link ${index + 1} of ${links.length}: ${why}.`,
      linkIndex: index,
    });
  });
  return findings;
}

/** "A and B", "A, B and C". */
function listInProse(names: string[]): string {
  if (names.length < 2) return names.join('');
  return `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`;
}

/** The physical chains from the structure down, as link indexes: one, or one per bridle leg. */
function physicalChains(links: LinkInput[], layout: BridleLayout): number[][] {
  const all = links.map((_, i) => i);
  if (layout.kind !== 'bridle' || layout.meetingIndex === null) return [all];
  const trunk = all.slice(layout.meetingIndex);
  return [
    [...layout.legA, ...trunk],
    [...layout.legB, ...trunk],
  ];
}

/** Maximal runs (two or more) of connectors joined directly to each other along a chain. */
function connectorRuns(links: LinkInput[], chain: number[]): number[][] {
  const runs: number[][] = [];
  let current: number[] = [];
  for (const index of chain) {
    if (isConnectorKind(links[index].gear.kind)) {
      current.push(index);
      continue;
    }
    if (current.length > 1) runs.push(current);
    current = [];
  }
  if (current.length > 1) runs.push(current);
  return runs;
}

function countedStrength(link: LinkInput): number {
  const { kn } = effectiveStrengthKn(link.gear, link.mode);
  return isUsableStrength(kn) ? kn : -Infinity;
}

/**
 * Warning: more connectors than the path needs. Our definition: two or more connectors
 * (carabiners, screw links, quick links) joined directly to each other, with no sling,
 * swivel, ring, clamp, pulley or apparatus between, along any chain from the structure down
 * (in a bridle, each leg followed by the links below the meeting link). One connector does
 * the job of such a run, and connectors clipped into each other can lever and cross-load one
 * another. Of each run we suggest keeping the link the bridle legs meet in, if it is in the
 * run, or else the connector counted strongest (the first of equals), and removing the rest.
 * One warning per connector suggested for removal, on that link.
 */
export function manyLinks(links: LinkInput[], layout: BridleLayout = parseBridle(links)): Finding[] {
  const seenRuns = new Set<string>();
  const suggested = new Set<number>();
  const findings: Finding[] = [];
  for (const chain of physicalChains(links, layout)) {
    for (const run of connectorRuns(links, chain)) {
      const key = run.join(',');
      if (seenRuns.has(key)) continue;
      seenRuns.add(key);
      const keep =
        layout.meetingIndex !== null && run.includes(layout.meetingIndex)
          ? layout.meetingIndex
          : run.reduce((best, i) => (countedStrength(links[i]) > countedStrength(links[best]) ? i : best), run[0]);
      const runNames = listInProse(run.map((i) => nameOf(links[i])));
      for (const index of run) {
        if (index === keep || suggested.has(index)) continue;
        suggested.add(index);
        findings.push({
          code: 'many_links',
          message: `${runNames} are joined directly to each other with no sling, swivel or ring between, and one connector does that job. Consider removing ${nameOf(links[index])} and keeping ${nameOf(links[keep])}.`,
          linkIndex: index,
        });
      }
    }
  }
  return findings.sort((a, b) => (a.linkIndex ?? 0) - (b.linkIndex ?? 0));
}

/**
 * Every finding about a load path that does not depend on the load a class puts on it:
 * ratings, the rigging rules of PRODUCT.md §4.3, the bridle layout, the apparatus position.
 * An empty path has nothing to break a rule; the missing load path is reported on its own.
 */
export function checkRules(links: LinkInput[], options: RuleOptions = {}): RuleFindings {
  const layout = parseBridle(links);
  const violations: Finding[] = [];
  const warnings: Finding[] = [];
  const push = (into: Finding[], finding: Finding | null): void => {
    if (finding) into.push(finding);
  };

  links.forEach((link, index) => {
    violations.push(...ratingFindings(link, index));
    push(violations, threeWayOnConnector(link, index, index === layout.meetingIndex));
    push(violations, basketOverfilled(link, index));
    push(violations, gateOpenUnrated(link, index));
    push(warnings, crossLoaded(link, index, options));
    push(warnings, minorRatingAssumed(link, index, options));
    push(warnings, gateOpen(link, index, options));
  });
  violations.push(...apparatusNotLast(links), ...layout.violations);
  warnings.push(...layout.warnings, ...manyLinks(links, layout));
  return { violations, warnings };
}
