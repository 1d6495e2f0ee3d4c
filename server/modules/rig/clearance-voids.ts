import type { Db } from '../../db/knex';
import type { AuditRepository } from '../audit/audit.repository';
import type { RigRepository, VoidCause } from './rig.repository';

/**
 * Voids a point's live clearance (PRODUCT.md §4.1) inside `trx`: the void row the status is derived
 * from, and an audit entry naming the clearance voided, so that a void row deleted from the file
 * later is reported by the audit check.
 */
export async function voidClearance(trx: Db, deps: { rig: RigRepository; audit: AuditRepository }, o: { pointId: number; at: Date; why: VoidCause; actorId: number | null }): Promise<void> {
  const written = await deps.rig.voidClearance(o.pointId, o.at, trx, o.why);
  if (written) {
    await deps.audit.record(trx, { actorId: o.actorId, action: 'point.clearance_voided', entity: 'point', entityId: o.pointId, after: { inspectionId: written.inspectionId, reason: o.why.reason, source: o.why.source } }, o.at);
  }
}
