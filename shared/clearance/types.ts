import type { LinkInput, RatedGear } from '../rigging/types';
import type { ApparatusKind, GearStatus, PointStatusWord, Severity, Structure } from '../schemas/vocabulary';

/** A gear item as the status rules see it: its ratings plus what decides whether it may be used. */
export interface GearSnapshot extends RatedGear {
  status: GearStatus;
  /** 'YYYY-MM-DD', a calendar day in the studio's zone. */
  manufacturedOn: string | null;
  /** 'YYYY-MM-DD', a calendar day in the studio's zone. */
  inServiceOn: string | null;
  serviceLifeYears: number | null;
  /** Null until the item first passes an inspection. */
  inspectedUntil: Date | null;
}

export type LinkSnapshot = LinkInput<GearSnapshot>;

export interface OpenFault {
  id: number;
  pointId: number | null;
  gearId: number | null;
  severity: Severity;
  description: string;
}

export interface ClearanceRecord {
  at: Date;
  voidedAt: Date | null;
  /**
   * PRODUCT.md §4.9: the point's own clearance end worked out when the rigger signed, kept with
   * the clearance. Null or absent (a clearance kept before ends were stored): the policy alone decides.
   */
  until?: Date | null;
}

/** Everything known now about one rigging point, gathered by the caller. */
export interface PointSnapshot {
  id: number;
  label: string;
  structure: Structure;
  structuralRatingKn: number;
  inService: boolean;
  apparatus: ApparatusKind[];
  maxPerformers: number;
  /** Fixed links from the structure down, then at most one apparatus (a gear kind that isApparatusKind). */
  links: LinkSnapshot[];
  lastClearance: ClearanceRecord | null;
  /** Open faults on the point or on any gear in its path. */
  openFaults: OpenFault[];
}

export interface Reason {
  code: string;
  message: string;
}

export interface PointStatus {
  status: PointStatusWord;
  clearedUntil: Date | null;
  /** Why the point is blocked; empty when cleared or expiring. */
  reasons: Reason[];
}

/** The worst a point gets over a period, split the way booking needs it. */
export interface PointStatusOver {
  status: PointStatusWord;
  clearedUntil: Date | null;
  /** Reasons holding at the start, or arising before the end, other than an inspection running out. */
  blockedReasons: Reason[];
  /** The point's clearance or its apparatus's inspection running out before the end (code `inspection_due`). */
  dueBeforeEnd: Reason[];
}

/** Reason codes of PRODUCT.md §4.1 and §4.4; `Reason.code` stays a string so callers can add their own. */
export const reasonCodes = {
  noLoadPath: 'no_load_path',
  faultOpen: 'fault_open',
  inspectionLapsed: 'inspection_lapsed',
  awaitingClearance: 'awaiting_clearance',
  gearUnfit: 'gear_unfit',
  ruleViolation: 'rule_violation',
  outOfService: 'out_of_service',
  apparatusNotAllowed: 'apparatus_not_allowed',
  tooManyPerformers: 'too_many_performers',
  loadCheckFailed: 'load_check_failed',
  pointDoubleBooked: 'point_double_booked',
  instructorDoubleBooked: 'instructor_double_booked',
  inspectionDue: 'inspection_due',
  noApparatusAvailable: 'no_apparatus_available',
  apparatusDoubleBooked: 'apparatus_double_booked',
} as const;
