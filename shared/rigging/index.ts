export type {
  Finding,
  LinkInput,
  LoadCheckInput,
  LoadCheckResult,
  LoadProfile,
  RatedGear,
  WorkingStep,
} from './types';
export { G, KGF_IN_N, LBF_IN_N, fromKn, toKn } from './units';
export {
  FACTOR_PLACES,
  FORCE_PLACES,
  FORCE_INPUT_PLACES,
  fixedToward,
  forceInputText,
  formatFactor,
  formatForce,
  formatLoad,
  formatRequiredFactor,
  workingFigureToward,
  type Toward,
} from './format';
export {
  MINOR_DEFAULT_CAP_KN,
  MINOR_DEFAULT_FRACTION,
  assumedMinorKn,
  describeGear,
  effectiveStrengthKn,
  gearKindLabels,
  isUsableStrength,
  validateRatings,
  type EffectiveStrength,
  type StrengthBasis,
} from './strength';
export {
  BRIDLE_MAX_DEG,
  BRIDLE_WIDE_ABOVE_DEG,
  legShare,
  legTension,
  parseBridle,
  tensionFactor,
  type BridleLayout,
} from './bridle';
export {
  SCREW_GATE_CHECKLIST_ITEM,
  SCREW_GATE_CHECKLIST_LABEL,
  apparatusNotLast,
  basketOverfilled,
  checkRules,
  crossLoaded,
  gateOpen,
  gateOpenUnrated,
  manyLinks,
  minorRatingAssumed,
  ratingFindings,
  threeWayOnConnector,
  type RuleFindings,
  type RuleOptions,
} from './rules';
export { checkLoadPath, designLoadKn } from './load-check';
