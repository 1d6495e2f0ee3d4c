import type { Point } from '../../../shared/schemas/rig';
import type { InspectionResult } from '../../../shared/schemas/vocabulary';
import type { InspectionKind } from './api';

export const kindText: Record<InspectionKind, string> = { pre_use: 'Pre-use', periodic: 'Periodic', after_incident: 'After incident' };
export const resultText: Record<InspectionResult, { label: string; explain: string }> = {
  pass: { label: 'Pass', explain: 'Fit for use' },
  attention: { label: 'Attention', explain: 'Usable, watch it: recorded, does not block' },
  fail: { label: 'Fail', explain: 'Not fit: opens a fault and blocks' },
};

export type Urgency = 'lapsed' | 'awaiting' | 'faulted' | 'blocked' | 'expiring' | 'cleared';
export const urgencyText: Record<Urgency, string> = {
  lapsed: 'Clearance lapsed',
  awaiting: 'Awaiting clearance',
  faulted: 'Open fault',
  blocked: 'Blocked',
  expiring: 'Expiring soon',
  cleared: 'Cleared',
};
const rank: Record<Urgency, number> = { lapsed: 0, awaiting: 1, faulted: 2, blocked: 3, expiring: 4, cleared: 5 };

/** The most pressing thing about a point for a rigger's round, from its status reasons. */
export function urgencyOf(p: Point): Urgency {
  const codes = new Set(p.status.reasons.map((r) => r.code));
  // An open fault voids the clearance too, but inspecting cannot clear it until the fault is resolved.
  if (codes.has('fault_open')) return 'faulted';
  if (codes.has('inspection_lapsed')) return 'lapsed';
  if (codes.has('awaiting_clearance')) return 'awaiting';
  if (p.status.status === 'blocked') return 'blocked';
  return p.status.status === 'expiring' ? 'expiring' : 'cleared';
}

/** Most urgent first; within a group, the clearance ending soonest, then by label. */
export function byUrgency(a: Point, b: Point): number {
  const r = rank[urgencyOf(a)] - rank[urgencyOf(b)];
  if (r) return r;
  const until = (p: Point) => (p.status.clearedUntil ? Date.parse(p.status.clearedUntil) : 0);
  return until(a) - until(b) || a.label.localeCompare(b.label, undefined, { numeric: true });
}
