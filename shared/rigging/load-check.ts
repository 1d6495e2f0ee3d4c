import { isApparatusKind, type LoadingMode } from '../schemas/vocabulary';
import { parseBridle } from './bridle';
import { checkRules } from './rules';
import {
  describeGear,
  effectiveStrengthKn,
  isUsableStrength,
  MINOR_DEFAULT_CAP_KN,
  MINOR_DEFAULT_FRACTION,
  type EffectiveStrength,
  type StrengthBasis,
} from './strength';
import type { Finding, LoadCheckInput, LoadCheckResult, LoadProfile, WorkingStep } from './types';
import { formatFactor, formatForce, formatLoad, formatRequiredFactor } from './format';
import { G } from './units';

/** W = performers × body mass × g × dynamic factor, in kN (PRODUCT.md §4.2). */
export function designLoadKn(profile: LoadProfile): number {
  return (profile.performers * profile.bodyMassKg * G * profile.dynamicFactor) / 1000;
}

const MODE_WORDS: Record<LoadingMode, string> = {
  major: 'along its major axis',
  minor: 'across its minor axis (cross-loaded)',
  gate_open: 'with its gate open',
};

const BASIS_WORDS: Record<StrengthBasis, string> = {
  major: 'its major-axis rating',
  minor: 'its minor-axis rating',
  minor_default_30pct: '30 % of its major-axis rating, as no minor-axis rating is entered',
  minor_default_cap: 'the 7 kN cap on the assumed minor-axis figure (below 30 % of its major-axis rating), as no minor-axis rating is entered',
  gate_open: 'its gate-open rating',
  gate_open_unrated: 'nothing, as no gate-open rating is entered',
};

interface LinkFigures {
  name: string;
  strength: EffectiveStrength;
  share: number | null;
  loadKn: number | null;
  /** Effective strength ÷ load share: the W at which this link would break. */
  capacityKn: number | null;
}

/**
 * The load check of PRODUCT.md §4.2 for one class profile on one point: design load, the load
 * on each link, the chain's strength, the achieved factor, the structure, working load limits,
 * and every load-independent rule of §4.3. `pass` is true exactly when there is no violation.
 */
export function checkLoadPath(input: LoadCheckInput): LoadCheckResult {
  const { links, structuralRatingKn, profile, requiredFactor } = input;
  const unit = input.displayUnit ?? 'kN';
  const violations: Finding[] = [];
  const warnings: Finding[] = [];
  const working: WorkingStep[] = [];

  const w = designLoadKn(profile);
  const loadKnown = Number.isFinite(w) && w > 0;
  working.push({
    step: 'design_load',
    label: 'Design load W = performers × body mass × g × dynamic factor',
    inputs: {
      performers: profile.performers,
      bodyMassKg: profile.bodyMassKg,
      gravityMps2: G,
      dynamicFactor: profile.dynamicFactor,
    },
    output: w,
    unit: 'kN',
  });
  if (!loadKnown) {
    violations.push({
      code: 'load_profile_invalid',
      message: `The class profile gives a design load of ${String(w)} kN; performers, body mass and dynamic factor must all be positive figures.`,
    });
  }

  if (links.every((link) => isApparatusKind(link.gear.kind))) {
    violations.push({
      code: 'no_load_path',
      message:
        links.length === 0
          ? 'The point has no load path: enter the fixed links from the structure down before anything hangs from it.'
          : 'The load path holds only an apparatus: enter the fixed links it hangs from, from the structure down.',
    });
  }

  const rules = checkRules(links, { displayUnit: unit });
  violations.push(...rules.violations);
  warnings.push(...rules.warnings);

  const layout = parseBridle(links);
  if (layout.kind === 'bridle' && layout.includedAngleDeg !== null) {
    const share = layout.loadShares[layout.legA[0]] as number;
    working.push({
      step: 'bridle_leg_tension',
      label: 'Bridle leg tension T = W ÷ (2·cos(θ/2)), carried by every leg link; the meeting link and below carry W',
      inputs: { designLoadKn: w, includedAngleDeg: layout.includedAngleDeg, legShare: share },
      output: w * share,
      unit: 'kN',
    });
  }

  const figures: LinkFigures[] = links.map((link, index) => {
    const strength = effectiveStrengthKn(link.gear, link.mode);
    const share = layout.loadShares[index];
    const capacityKn = share !== null && isUsableStrength(strength.kn) ? strength.kn / share : null;
    return { name: describeGear(link.gear), strength, share, loadKn: share === null ? null : w * share, capacityKn };
  });

  figures.forEach((figure, index) => {
    const { gear, mode } = links[index];
    const prefix = `Link ${index + 1}, ${figure.name}`;
    working.push({
      step: 'link_strength',
      label: `${prefix}, loaded ${MODE_WORDS[mode]}: effective strength from ${BASIS_WORDS[figure.strength.basis]}`,
      inputs: {
        mode,
        basis: figure.strength.basis,
        majorKn: gear.majorKn,
        minorKn: gear.minorKn,
        gateOpenKn: gear.gateOpenKn,
        ...(figure.strength.basis === 'minor_default_30pct' || figure.strength.basis === 'minor_default_cap'
          ? { defaultMinorFraction: MINOR_DEFAULT_FRACTION, defaultMinorCapKn: MINOR_DEFAULT_CAP_KN }
          : {}),
      },
      output: figure.strength.kn,
      unit: 'kN',
    });
    working.push({
      step: 'link_capacity',
      label: `${prefix}: strength ÷ load share, the design load at which this link would break`,
      inputs: { effectiveStrengthKn: figure.strength.kn, loadShare: figure.share, loadKn: figure.loadKn },
      output: figure.capacityKn,
      unit: 'kN',
    });
  });

  const chainStrengthKn =
    figures.length > 0 && figures.every((f) => f.capacityKn !== null)
      ? Math.min(...figures.map((f) => f.capacityKn as number))
      : null;
  const weakestIndex = chainStrengthKn === null ? -1 : figures.findIndex((f) => f.capacityKn === chainStrengthKn);
  working.push({
    step: 'chain_strength',
    label: 'Chain strength = the smallest strength ÷ load share over all links (for a plain chain, the weakest link)',
    inputs: {
      ...Object.fromEntries(figures.map((f, i) => [`link${i + 1}Kn`, f.capacityKn])),
      weakestLink: weakestIndex === -1 ? null : `${weakestIndex + 1} (${figures[weakestIndex].name})`,
    },
    output: chainStrengthKn,
    unit: 'kN',
  });

  const achievedFactor = chainStrengthKn !== null && loadKnown ? chainStrengthKn / w : null;
  working.push({
    step: 'achieved_factor',
    label: 'Achieved factor = chain strength ÷ W, which must be at least the required factor',
    inputs: { chainStrengthKn, designLoadKn: w, requiredFactor },
    output: achievedFactor,
  });
  if (achievedFactor !== null && !(achievedFactor >= requiredFactor)) {
    violations.push({
      code: 'factor_below_required',
      message: `The chain's strength of ${formatForce(chainStrengthKn as number, unit)} is ${formatFactor(achievedFactor)} times the design load of ${formatLoad(w, unit, unit === 'kN' ? 2 : 0)}; the studio requires at least ${formatRequiredFactor(requiredFactor)} times. The weakest link is ${figures[weakestIndex].name} (link ${weakestIndex + 1}).`,
      linkIndex: weakestIndex,
    });
  }

  const structureOk = Number.isFinite(structuralRatingKn) && structuralRatingKn > 0 && w <= structuralRatingKn;
  working.push({
    step: 'structure',
    label: "Structure: W against the point's structural rating from the engineer's assessment",
    inputs: { designLoadKn: w, structuralRatingKn },
    output: structureOk ? 'within rating' : 'over rating',
  });
  if (!structureOk) {
    violations.push({
      code: 'structure_overloaded',
      message:
        Number.isFinite(structuralRatingKn) && structuralRatingKn > 0
          ? `The design load of ${formatLoad(w, unit, unit === 'kN' ? 2 : 0)} is above the point's structural rating of ${formatForce(structuralRatingKn, unit)}.`
          : `The point's structural rating (${String(structuralRatingKn)} kN) is not a positive figure, so the design load cannot be shown to be within it.`,
    });
  }

  figures.forEach((figure, index) => {
    const { wllKn } = links[index].gear;
    if (wllKn === null) return;
    const within = figure.loadKn === null ? null : figure.loadKn <= wllKn;
    working.push({
      step: 'working_load_limit',
      label: `Link ${index + 1}, ${figure.name}: load on the link against its working load limit`,
      inputs: { loadKn: figure.loadKn, wllKn },
      output: within === null ? null : within ? 'within limit' : 'over limit',
    });
    if (within === false) {
      violations.push({
        code: 'wll_exceeded',
        message: `${figure.name} (link ${index + 1}) carries ${formatLoad(figure.loadKn as number, unit, unit === 'kN' ? 2 : 0)}, above its working load limit of ${formatForce(wllKn, unit)}.`,
        linkIndex: index,
      });
    }
  });

  // A strength that cannot be worked out must never read as a pass, whatever the cause.
  if (links.length > 0 && chainStrengthKn === null && violations.length === 0) {
    violations.push({
      code: 'factor_below_required',
      message: "The chain's strength could not be worked out from the ratings entered, so the factor cannot be shown to be met.",
    });
  }

  return {
    designLoadKn: w,
    chainStrengthKn,
    achievedFactor,
    requiredFactor,
    requiredFactorReason: input.requiredFactorReason?.trim() || null,
    structuralRatingKn,
    pass: violations.length === 0,
    violations,
    warnings,
    working,
  };
}
