import type { Policy } from '../schemas/policy';
import { pointStatusAt, splitPath } from './status';
import type { PointSnapshot, Reason } from './types';

/** What a session keeps of a booked point as the class starts (PRODUCT.md §10). */
export interface PointRecordAtStart {
  status: 'cleared' | 'expiring' | 'blocked';
  clearedUntil: Date | null;
  reasons: Reason[];
  /** The apparatus hanging on the point at the start, if any. */
  apparatus: { gearId: number; kind: string; serial: string } | null;
}

/** A record's status: the point's at the class's start, or `not_recorded` for a class begun before records were kept. */
export type RecordedStatus = PointRecordAtStart['status'] | 'not_recorded';

/** The point's status, reasons and hanging apparatus at `startsAt`, from the records as they are now. */
export function recordAtStart(snapshot: PointSnapshot, policy: Policy, startsAt: Date): PointRecordAtStart {
  const st = pointStatusAt(snapshot, policy, startsAt);
  const apparatus = splitPath(snapshot.links).apparatus;
  return {
    status: st.status,
    clearedUntil: st.clearedUntil,
    reasons: st.reasons.map((r) => ({ code: r.code, message: r.message })),
    apparatus: apparatus ? { gearId: apparatus.gear.id, kind: apparatus.gear.kind, serial: apparatus.gear.serial } : null,
  };
}

/** Places from a session's records: one per point that was not blocked at the start, up to the capacity. */
export function placesFromRecords(records: Array<{ status: RecordedStatus }>, capacity: number, cancelled: boolean): number {
  if (cancelled) return 0;
  return Math.min(capacity, records.filter((r) => r.status === 'cleared' || r.status === 'expiring').length);
}
