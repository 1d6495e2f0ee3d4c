import type { Reason } from '../clearance/types';

export type RecordedPointStatus = 'cleared' | 'expiring' | 'blocked';

/** What one inspection row records (PRODUCT.md §10): the log, the printout and the CSV read this alone. */
export interface InspectionFacts {
  kind: 'pre_use' | 'periodic' | 'after_incident';
  pointId: number | null;
  /** `inspections.cleared`: a clean inspection was signed as the point's clearance. */
  clearanceSigned: boolean;
  /** The point's status the moment the inspection was signed; null on rows written before it was kept. */
  pointStatus: RecordedPointStatus | null;
  pointReasons: Reason[] | null;
  /** Labels of the checklist items that failed. */
  failedItems: string[];
}

export interface InspectionOutcome {
  /** Yes only when the inspection cleared its point: a clearance was signed and nothing still blocked it. */
  cleared: boolean;
  /** The point's status when signed; null for a gear item inspected on its own, or when not recorded. */
  status: RecordedPointStatus | null;
  /** Whether `status` and `reasons` were recorded at the time (rather than worked out from the row). */
  recorded: boolean;
  reasons: Reason[];
}

/**
 * The one reading of an inspection row shared by the screen, the printable log and the CSV, so
 * they cannot disagree. Never uses today's state of the point: only what the row holds.
 */
export function inspectionOutcome(f: InspectionFacts): InspectionOutcome {
  if (f.pointId === null) return { cleared: false, status: null, recorded: false, reasons: [] };
  if (f.pointStatus !== null) {
    return { cleared: f.clearanceSigned && f.pointStatus !== 'blocked', status: f.pointStatus, recorded: true, reasons: f.pointReasons ?? [] };
  }
  // An older row: only what it holds. A failed item is a reason; a signed clearance is the row's own word.
  const failed = f.failedItems.map((label) => ({ code: 'item_failed', message: `Failed: ${label}` }));
  if (failed.length) return { cleared: false, status: 'blocked', recorded: false, reasons: failed };
  return { cleared: f.clearanceSigned, status: null, recorded: false, reasons: [] };
}

/**
 * The status an inspection records for its point: the rules' answer the moment it was signed, and
 * blocked by each failed item (each opens a fault in the same transaction, written after the row).
 */
export function statusWhenSigned(rules: { status: RecordedPointStatus; reasons: Reason[] }, failedItems: string[]): { status: RecordedPointStatus; reasons: Reason[] } {
  if (!failedItems.length) return { status: rules.status, reasons: rules.reasons.map((r) => ({ code: r.code, message: r.message })) };
  return {
    status: 'blocked',
    reasons: [...failedItems.map((label) => ({ code: 'item_failed', message: `Failed: ${label} (a fault was opened)` })), ...rules.reasons.map((r) => ({ code: r.code, message: r.message }))],
  };
}
