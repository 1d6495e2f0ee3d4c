import type { FaultResolution, Severity } from '../shared/schemas/vocabulary';

/**
 * The demo studio's safety history, in days before the seed runs and local wall-clock times.
 * What each point shows right after a fresh start:
 *   MH-1, MH-3 (bridle), MH-4, MH-5, MH-7, LS-1, LS-2, LS-6   cleared
 *   MH-6   expiring: cleared 25 days ago, textile in the path (30-day interval)
 *   MH-8   inspection lapsed: cleared 34 days ago (its hammock was inspected on its own since)
 *   MH-2   open fault on its swivel (reported before yesterday's class), clearance voided
 *   LS-7   awaiting clearance: sling replaced after a resolved fault, not re-inspected yet
 *   LS-4   gear unfit: its carabiner was retired yesterday and still hangs there
 *   LS-3   gear unfit: its hoop was dropped last night and is quarantined
 *   LS-5   rule violation: a three-way load on an aluminium carabiner (path changed, so voided too)
 */

export interface ClearancePlan {
  label: string;
  daysAgo: number;
  time: string;
  /** An item of the latest clearance marked `attention` ("usable, watch it"): the structure or a link position. */
  attention?: { item: 'structure' | number; note: string };
  notes?: string;
}

/** Each point's latest clearance; the seed adds the one before it, 27 days earlier. */
export const clearancePlans: ClearancePlan[] = [
  { label: 'MH-1', daysAgo: 3, time: '10:15', notes: 'Re-inspected after the fabric tail was trimmed.' },
  { label: 'MH-2', daysAgo: 8, time: '10:40' },
  { label: 'MH-3', daysAgo: 5, time: '11:00', attention: { item: 'structure', note: 'Paint flaking on the B4 flange beside the clamp; no section loss. Look again next round.' } },
  { label: 'MH-4', daysAgo: 4, time: '09:50', notes: 'Aluminium carabiner in the path: fine for solo work, not for duo classes.' },
  { label: 'MH-5', daysAgo: 2, time: '10:30' },
  { label: 'MH-6', daysAgo: 25, time: '10:00' },
  { label: 'MH-7', daysAgo: 6, time: '10:20', attention: { item: 3, note: 'Slight fading along the lower edge of the hammock; no pulled threads.' } },
  { label: 'MH-8', daysAgo: 34, time: '10:00' },
  { label: 'LS-1', daysAgo: 2, time: '14:00', notes: 'Re-inspected after the hoop was re-taped.' },
  { label: 'LS-2', daysAgo: 9, time: '14:30', attention: { item: 0, note: 'Light scuffing on the sleeve where it wraps the truss chord; wear pad added.' } },
  { label: 'LS-3', daysAgo: 6, time: '15:00' },
  { label: 'LS-4', daysAgo: 10, time: '15:20' },
  { label: 'LS-5', daysAgo: 12, time: '15:40' },
  { label: 'LS-6', daysAgo: 4, time: '16:00' },
  { label: 'LS-7', daysAgo: 15, time: '16:10' },
];
export const PREVIOUS_ROUND_DAYS = 27;

/** Links that hung in a path at its clearances and were swapped out since: position → serial. */
export const pathAtClearances: Record<string, Record<number, string>> = {
  'LS-5': { 2: 'DL-0190' },
  'LS-7': { 0: 'RS-0190' },
};

/** Gear inspected on its own, in the Gear Room (periodic, by the rigger). */
export const gearInspectionPlans: Array<{ serial?: string; pointLabel?: string; kind?: string; daysAgo: number; time: string; notes: string }> = [
  { pointLabel: 'MH-8', kind: 'hammock', daysAgo: 10, time: '11:00', notes: 'Taken down, washed and inspected in the Gear Room; re-hung on MH-8.' },
  { serial: 'CS-0190', daysAgo: 20, time: '12:00', notes: 'Intake inspection of new stock.' },
  { serial: 'FB-0190', daysAgo: 14, time: '12:10', notes: 'New fabric, intake inspection: seams and tag checked.' },
  { serial: 'HP-0190', daysAgo: 12, time: '12:20', notes: 'Spare hoop, ready to swap in.' },
  { serial: 'HM-0190', daysAgo: 40, time: '12:30', notes: 'Spare hammock, folded away after inspection.' },
  { serial: 'RS-0150', daysAgo: 5, time: '11:00', notes: 'Intake inspection before fitting to LS-7.' },
];

export interface FaultPlan {
  pointLabel: string;
  /** The gear kind in the point's path the fault is on (current path, or `serial`). */
  kind?: string;
  serial?: string;
  severity: Severity;
  description: string;
  daysAgo: number;
  time: string;
  resolved?: { daysAgo: number; time: string; resolution: FaultResolution; note: string; replacementSerial?: string; oldGearStatus?: 'retired' | 'quarantined' };
}

export const faultPlans: FaultPlan[] = [
  { pointLabel: 'MH-2', kind: 'swivel', severity: 'medium', description: 'Swivel grinds when turned', daysAgo: 1, time: '17:35' },
  {
    pointLabel: 'LS-7',
    serial: 'RS-0190',
    severity: 'high',
    description: 'Pulled thread on the sling cover where it wraps the truss chord',
    daysAgo: 6,
    time: '19:50',
    resolved: { daysAgo: 5, time: '11:30', resolution: 'replaced', replacementSerial: 'RS-0150', oldGearStatus: 'retired', note: 'Core yarns showing under the pull: sling retired, RS-0150 from stock (intake-inspected this morning) fitted. LS-7 needs a full inspection before it reopens.' },
  },
  {
    pointLabel: 'MH-1',
    kind: 'fabric',
    severity: 'low',
    description: 'Fabric tail frayed at the rigging knot',
    daysAgo: 4,
    time: '20:00',
    resolved: { daysAgo: 3, time: '09:40', resolution: 'repaired', note: 'Tail trimmed and heat-sealed above the knot; the rest of the fabric is sound.' },
  },
  {
    pointLabel: 'LS-1',
    kind: 'hoop',
    severity: 'low',
    description: 'Grip tape peeling on the lower half of the hoop',
    daysAgo: 4,
    time: '19:10',
    resolved: { daysAgo: 2, time: '13:40', resolution: 'repaired', note: 'Re-taped. The tape is cosmetic; the hoop itself has no dents or cracks at the tab.' },
  },
];

export const retirement = { pointLabel: 'LS-4', kind: 'carabiner', daysAgo: 1, time: '16:00', reason: 'Locking sleeve binds on a burr and no longer closes fully. Swap for a spare before LS-4 is used.' };
export const drop = { pointLabel: 'LS-3', kind: 'hoop', daysAgo: 1, time: '20:10', note: 'Slipped off the hook while being lowered after class and fell about 2 m onto the floor.' };
export const pathChange = { pointLabel: 'LS-5', position: 2, oldSerial: 'DL-0190', newSerial: 'CA-0150', daysAgo: 2, time: '15:00' };
/** Pre-use items marked `attention` yesterday, by point label. */
export const preuseAttention: Record<string, { key: string; note: string }> = {
  'MH-4': { key: 'textile_unworn', note: 'Small pull about 2 m up, below the wrap; keep an eye on it.' },
};
/** Points not checked before yesterday's class: already blocked by an open fault. */
export const preuseSkipped = ['MH-2'];
