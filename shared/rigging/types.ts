import type { BridleLeg, ForceUnit, Gate, GearKind, LoadingMode, Material } from '../schemas/vocabulary';

/** The ratings of one gear item, in kN, as the rigger typed them from its marking. */
export interface RatedGear {
  id: number;
  kind: GearKind;
  material: Material;
  gate: Gate;
  serial: string;
  majorKn: number;
  minorKn: number | null;
  gateOpenKn: number | null;
  wllKn: number | null;
  multiDirectional: boolean;
}

/** One link of a load path, from the structure down; the mounted apparatus, if any, is last. */
export interface LinkInput<G extends RatedGear = RatedGear> {
  gear: G;
  mode: LoadingMode;
  threeWay: boolean;
  basketOverHalf: boolean;
  leg: BridleLeg | null;
  includedAngleDeg: number | null;
}

export interface LoadProfile {
  performers: number;
  bodyMassKg: number;
  dynamicFactor: number;
}

export interface Finding {
  code: string;
  message: string;
  /** Index of the link the finding is about, where it is about one. */
  linkIndex?: number;
}

export interface WorkingStep {
  step: string;
  label: string;
  inputs: Record<string, number | string | null>;
  output: number | string | null;
  unit?: string;
}

export interface LoadCheckResult {
  designLoadKn: number;
  chainStrengthKn: number | null;
  achievedFactor: number | null;
  requiredFactor: number;
  /** Why the studio accepts a required factor below 5, shown beside the factor; null otherwise. */
  requiredFactorReason: string | null;
  structuralRatingKn: number;
  pass: boolean;
  violations: Finding[];
  warnings: Finding[];
  working: WorkingStep[];
}

/** What the load check of PRODUCT.md §4.2 needs: the path, the point's rating and the class. */
export interface LoadCheckInput<G extends RatedGear = RatedGear> {
  links: LinkInput<G>[];
  /** The allowable load the engineer's assessment gives for the point, in kN. */
  structuralRatingKn: number;
  profile: LoadProfile;
  /** The studio's required ratio of chain strength to design load. */
  requiredFactor: number;
  /** The owner's reason for a required factor below 5 (PRODUCT.md §4.9), carried to the result. */
  requiredFactorReason?: string | null;
  /** Unit for forces quoted in messages (the studio's display units); figures stay in kN. */
  displayUnit?: ForceUnit;
}
