import type { GearKind, LoadingMode } from '../schemas/vocabulary';
import type { Finding, RatedGear } from './types';

/** How a kind reads at the start of a sentence in a finding. */
export const gearKindLabels: Record<GearKind, string> = {
  carabiner: 'Carabiner',
  screw_link_delta: 'Delta screw link',
  screw_link_tri: 'Tri screw link',
  quick_link: 'Quick link',
  swivel: 'Swivel',
  descender_ring: 'Descender ring',
  round_sling: 'Round sling',
  span_set: 'Span set',
  wire_rope_sling: 'Wire-rope sling',
  beam_clamp: 'Beam clamp',
  pulley: 'Pulley',
  fabric: 'Fabric',
  hoop: 'Hoop',
  trapeze: 'Trapeze',
  hammock: 'Hammock',
  straps: 'Straps',
  rope: 'Rope',
};

/** Names a gear item the way a rigger reads its tag: kind and serial, e.g. "Carabiner CB-0142". */
export function describeGear(gear: Pick<RatedGear, 'kind' | 'serial'>): string {
  const serial = gear.serial.trim();
  const label = gearKindLabels[gear.kind] ?? String(gear.kind);
  return serial ? `${label} ${serial}` : label;
}

/**
 * Where no minor-axis rating is given, a cross-loaded link counts at the lesser of this share of
 * its major rating (cross-loading takes away about 70 % of a connector's strength) and
 * MINOR_DEFAULT_CAP_KN (PRODUCT.md §4.2, CHECK-VALUES.md).
 */
export const MINOR_DEFAULT_FRACTION = 0.3;
/**
 * The smallest minor-axis minimum of EN 12275's connector classes: 30 % alone would count a 25 kN
 * class K connector at 7.5 kN, above what its class promises across the axis.
 */
export const MINOR_DEFAULT_CAP_KN = 7;

/** `minor_default_30pct` / `minor_default_cap`: no minor rating entered, counted at 30 % of major or at the 7 kN cap. */
export type StrengthBasis = 'major' | 'minor' | 'minor_default_30pct' | 'minor_default_cap' | 'gate_open' | 'gate_open_unrated';

/** The minor-axis figure assumed for a connector whose maker gives none: min(30 % of major, 7 kN). */
export function assumedMinorKn(majorKn: number): { kn: number; basis: 'minor_default_30pct' | 'minor_default_cap' } {
  const share = majorKn * MINOR_DEFAULT_FRACTION;
  return share <= MINOR_DEFAULT_CAP_KN ? { kn: share, basis: 'minor_default_30pct' } : { kn: MINOR_DEFAULT_CAP_KN, basis: 'minor_default_cap' };
}

export interface EffectiveStrength {
  /** Breaking strength the link is counted at, in kN; null when nothing usable is rated. */
  kn: number | null;
  basis: StrengthBasis;
}

/** The strength a link is counted at in the way it is loaded (PRODUCT.md §4.2). */
export function effectiveStrengthKn(
  gear: Pick<RatedGear, 'majorKn' | 'minorKn' | 'gateOpenKn'>,
  mode: LoadingMode,
): EffectiveStrength {
  switch (mode) {
    case 'major':
      return { kn: gear.majorKn, basis: 'major' };
    case 'minor':
      return gear.minorKn === null ? assumedMinorKn(gear.majorKn) : { kn: gear.minorKn, basis: 'minor' };
    case 'gate_open':
      // No figure is assumed for an open gate: the check fails instead of guessing.
      return gear.gateOpenKn === null
        ? { kn: null, basis: 'gate_open_unrated' }
        : { kn: gear.gateOpenKn, basis: 'gate_open' };
  }
}

/** True when a strength can be divided by: a finite figure above zero. */
export function isUsableStrength(kn: number | null): kn is number {
  return kn !== null && Number.isFinite(kn) && kn > 0;
}

const RATING_NAMES = {
  majorKn: 'major-axis rating',
  minorKn: 'minor-axis rating',
  gateOpenKn: 'gate-open rating',
  wllKn: 'working load limit',
} as const;

type RatingField = keyof typeof RATING_NAMES;

/**
 * Findings for ratings that cannot be right: a rating that is not a positive figure, or a
 * minor-axis, gate-open or working-load figure above the major-axis breaking strength (a
 * connector is never stronger across its axis or with its gate open, and a working load limit
 * is always a fraction of the breaking strength). Each is a violation.
 */
export function validateRatings(gear: RatedGear): Finding[] {
  const name = describeGear(gear);
  const findings: Finding[] = [];
  const fields: RatingField[] = ['majorKn', 'minorKn', 'gateOpenKn', 'wllKn'];
  for (const field of fields) {
    const value = gear[field];
    if (value === null) continue;
    if (!isUsableStrength(value)) {
      findings.push({
        code: 'rating_not_positive',
        message: `${name} has a ${RATING_NAMES[field]} of ${String(value)} kN; ratings must be positive figures taken from the maker's marking.`,
      });
      continue;
    }
    if (field !== 'majorKn' && isUsableStrength(gear.majorKn) && value > gear.majorKn) {
      findings.push({
        code: 'rating_above_major',
        message: `${name} has a ${RATING_NAMES[field]} of ${value} kN, above its major-axis rating of ${gear.majorKn} kN; check the figures against the maker's marking.`,
      });
    }
  }
  return findings;
}
