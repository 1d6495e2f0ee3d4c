import { formatForce, gearKindLabels } from '../../../shared/rigging';
import type { Policy } from '../../../shared/schemas/policy';
import type { Point } from '../../../shared/schemas/rig';
import type { ApparatusKind, Gate, GearEventKind, GearStatus, LoadingMode, Material, Structure } from '../../../shared/schemas/vocabulary';
import { formatInZone } from '../../components/ui/zoned-time';

// Words for the wire's lower snake_case values, as the rig pages say them.
export const structureLabels: Record<Structure, string> = { beam: 'Beam', truss: 'Truss', ceiling_anchor: 'Ceiling anchor', frame: 'Freestanding frame' };
export const apparatusLabel = (kind: ApparatusKind) => gearKindLabels[kind];
export const modeLabels: Record<LoadingMode, string> = { major: 'Major axis', minor: 'Minor axis (cross-loaded)', gate_open: 'Gate open' };
export const materialLabels: Record<Material, string> = { steel: 'Steel', aluminium: 'Aluminium', polyester: 'Polyester', nylon: 'Nylon' };
export const gateLabels: Record<Gate, string> = { none: 'No gate', screw: 'Screw gate', auto_two_action: 'Auto-locking, two actions', auto_three_action: 'Auto-locking, three actions' };
export const gearStatusLabels: Record<GearStatus, string> = { in_service: 'In service', quarantined: 'Quarantined', retired: 'Retired' };
export const eventKindLabels: Record<GearEventKind, string> = { arrested_fall: 'Arrested fall', shock_load: 'Shock load', drop: 'Dropped', overload: 'Overload' };


export interface StudioFormat {
  policy: Policy;
  unit: Policy['units'];
  /** A force stored in kN, in the studio's display unit. */
  force: (kn: number | null | undefined) => string;
  /** An instant with its time, in the studio's zone; a bare date as that calendar day. */
  when: (iso: string | null | undefined, fallback?: string) => string;
  /** Only the calendar day, in the studio's zone. */
  day: (iso: string | null | undefined, fallback?: string) => string;
}

/** Formatting bound to the studio's policy: its time zone and its display unit. */
export function studioFormat(policy: Policy): StudioFormat {
  const zone = policy.timeZone;
  return {
    policy,
    unit: policy.units,
    force: (kn) => (kn == null ? '—' : formatForce(kn, policy.units)),
    // The one date format of the product, in the studio's zone (components/ui/zoned-time).
    when: (iso, fallback = '—') => formatInZone(iso, zone, 'dateTime', fallback),
    day: (iso, fallback = '—') => formatInZone(iso, zone, 'day', fallback),
  };
}

const STATUS_RANK: Record<Point['status']['status'], number> = { blocked: 0, expiring: 1, cleared: 2 };

/** Most urgent first: blocked, then expiring, then cleared; within each, the clearance ending soonest. */
export function byUrgency(a: Point, b: Point): number {
  const rank = STATUS_RANK[a.status.status] - STATUS_RANK[b.status.status];
  if (rank !== 0) return rank;
  // No clearance date (never cleared or voided) is the most urgent of all.
  const until = (p: Point) => (p.status.clearedUntil ? new Date(p.status.clearedUntil).getTime() : -1);
  const soon = until(a) - until(b);
  if (soon !== 0 && !Number.isNaN(soon)) return soon;
  return a.label.localeCompare(b.label, undefined, { numeric: true });
}

// Factors are cut toward the unsafe side by the shared formatter (PRODUCT.md §4.8).
export { formatFactor, formatRequiredFactor } from '../../../shared/rigging';
