import type { GearKind, GearStatus } from '../schemas/vocabulary';
import { isApparatusKind } from '../schemas/vocabulary';
import { reasonCodes, type Reason } from './types';

/**
 * Where a gear item stands at an instant, in one word: its recorded status (retired, quarantined)
 * first, then what the clock says of an item recorded as in service (PRODUCT.md §3, §4.1): past its
 * service life, never passed an inspection, or its own inspection run out. Only `in_service` means
 * nothing stands in the way; the gear page never shows a green "In service" for anything else.
 */
export type GearStanding = 'in_service' | 'quarantined' | 'retired' | 'past_service_life' | 'never_inspected' | 'inspection_lapsed';

export const gearStandingWords: Record<GearStanding, string> = {
  in_service: 'In service',
  quarantined: 'Quarantined',
  retired: 'Retired',
  past_service_life: 'Past its service life',
  never_inspected: 'Never inspected',
  inspection_lapsed: 'Inspection lapsed',
};

/** A gear item as the wire or a snapshot carries it; instants as ISO text or Date. */
export interface GearStandingInput {
  status: GearStatus;
  inspectedUntil: string | Date | null;
  /** The instant its service life ends (the wire's `serviceLifeEndsOn`); null when none is entered. */
  serviceLifeEndsOn?: string | Date | null;
}

const ms = (v: string | Date) => (typeof v === 'string' ? Date.parse(v) : v.getTime());

export function gearStandingAt(g: GearStandingInput, at: Date): GearStanding {
  if (g.status === 'retired') return 'retired';
  if (g.status === 'quarantined') return 'quarantined';
  const t = at.getTime();
  if (g.serviceLifeEndsOn && t >= ms(g.serviceLifeEndsOn)) return 'past_service_life';
  if (!g.inspectedUntil) return 'never_inspected';
  if (t >= ms(g.inspectedUntil)) return 'inspection_lapsed';
  return 'in_service';
}

/** A gear item in a point's path that needs its own inspection before the point can be used. */
export interface GearInspectionNeed {
  gearId: number;
  kind: GearKind;
  serial: string;
  /** After an incident returns a quarantined item to service; a periodic one renews an apparatus's own inspection. */
  inspection: 'after_incident' | 'periodic';
  standing: Extract<GearStanding, 'quarantined' | 'never_inspected' | 'inspection_lapsed'>;
}

/**
 * The gear inspections that would unblock a point (PRODUCT.md §4.1 gear_unfit): a quarantined item
 * anywhere in the path goes back to service only through an after-incident inspection of that item
 * (a point inspection does not release it), and the mounted apparatus needs its own inspection when
 * it has none or it ran out. A retired item or one past its service life is replaced, not inspected.
 */
export function gearInspectionsNeeded(links: ReadonlyArray<{ gear: { id: number; kind: GearKind; serial: string } & GearStandingInput }>, at: Date): GearInspectionNeed[] {
  const needs: GearInspectionNeed[] = [];
  links.forEach((l, i) => {
    const standing = gearStandingAt(l.gear, at);
    const base = { gearId: l.gear.id, kind: l.gear.kind, serial: l.gear.serial };
    if (standing === 'quarantined') needs.push({ ...base, inspection: 'after_incident', standing });
    else if ((standing === 'never_inspected' || standing === 'inspection_lapsed') && i === links.length - 1 && isApparatusKind(l.gear.kind)) needs.push({ ...base, inspection: 'periodic', standing });
  });
  return needs;
}

/**
 * Whether inspecting the point itself is what it needs: it is not blocked (a periodic inspection
 * renews its clearance), or its clearance lapsed, was voided or never given. A point blocked only
 * by quarantined gear, a fault or a rule is not helped by a point inspection.
 */
export function pointInspectionHelps(status: { status: string; reasons: ReadonlyArray<Reason> }): boolean {
  if (status.status !== 'blocked') return true;
  return status.reasons.some((r) => r.code === reasonCodes.inspectionLapsed || r.code === reasonCodes.awaitingClearance);
}
