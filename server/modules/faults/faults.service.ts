import { writeTransaction, type Db } from '../../db/knex';
import type { Clock } from '../../clock';
import { conflict, HttpError, notFound } from '../../http/errors';
import type { AuditRepository } from '../audit/audit.repository';
import type { DocumentsService, UploadedFile } from '../documents/documents.service';
import type { RigRepository } from '../rig/rig.repository';
import { voidClearance } from '../rig/clearance-voids';
import type { CreateFault, FaultListQuery, ResolveFault } from '../../../shared/schemas/safety';
import type { FaultsRepository } from './faults.repository';

/** Told inside the transaction that opens a fault, so its notice is queued with it or not at all. */
export interface FaultNotifier {
  faultOpened(trx: Db, f: { faultId: number; pointId: number | null; gearId: number | null; severity: string; description: string; reportedBy: number }): Promise<unknown>;
}

export interface FaultEvents {
  /** Told after a fault is opened, outside the transaction (at-risk alerts follow from it). */
  faultOpened?(faultId: number): Promise<void> | void;
}

export function faultsService(deps: { db: Db; faults: FaultsRepository; rig: RigRepository; audit: AuditRepository; docs: DocumentsService; clock: Clock; events?: FaultEvents; notifier?: FaultNotifier }) {
  const { db, faults, rig, audit, docs, clock } = deps;

  /** Opens a fault inside `trx`: it blocks at once and voids the clearance of the point it concerns. */
  async function open(trx: Db, f: CreateFault & { reportedBy: number; sourceInspectionId?: number }) {
    const now = clock.now();
    if (f.pointId !== undefined && !(await rig.pointById(f.pointId, trx))) throw new HttpError(400, 'invalid_request', 'That point does not exist.', { source: 'body', fields: { pointId: 'Unknown point' } });
    let pointId = f.pointId ?? null;
    if (f.gearId !== undefined) {
      const gear = await rig.gearById(f.gearId, trx);
      if (!gear) throw new HttpError(400, 'invalid_request', 'That gear item does not exist.', { source: 'body', fields: { gearId: 'Unknown gear item' } });
      pointId ??= gear.pointId;
    }
    const id = await faults.insert(f, now, trx);
    const affected = new Set<number>();
    if (f.pointId !== undefined) affected.add(f.pointId);
    if (f.gearId !== undefined) {
      const holder = await rig.pointOfGear(f.gearId, trx);
      if (holder) affected.add(holder);
    }
    for (const p of affected) await voidClearance(trx, { rig, audit }, { pointId: p, at: now, actorId: f.reportedBy, why: { reason: 'fault_opened', source: `fault #${id}` } });
    await audit.record(trx, { actorId: f.reportedBy, action: 'fault.opened', entity: 'fault', entityId: id, after: { pointId, gearId: f.gearId ?? null, severity: f.severity, description: f.description } }, now);
    await deps.notifier?.faultOpened(trx, { faultId: id, pointId, gearId: f.gearId ?? null, severity: f.severity, description: f.description, reportedBy: f.reportedBy });
    return id;
  }

  return {
    open,
    async list(q: FaultListQuery) {
      const pathGearIds = q.pointId !== undefined ? (await rig.linksOf([q.pointId])).map((l) => l.gearId) : undefined;
      return faults.page({ ...q, pathGearIds });
    },
    async get(id: number) {
      const f = await faults.byId(id);
      if (!f) throw notFound('That fault');
      return f;
    },
    /**
     * A fault is recorded even when its photos cannot be kept (a full or unwritable upload disk):
     * the answer lists them in `photosNotStored` with a warning, so the reporter can add them later.
     * A photo of the wrong type still refuses the whole report (415) before anything is written.
     */
    async report(input: CreateFault, photos: UploadedFile[], actorId: number) {
      docs.checkFiles(photos);
      const { id, notStored } = await writeTransaction(db, async (trx) => {
        const faultId = await open(trx, { ...input, reportedBy: actorId });
        const kept = photos.length ? await docs.store(trx, { type: 'fault', id: faultId }, photos, 'photo', actorId) : { notStored: [] };
        return { id: faultId, notStored: kept.notStored };
      });
      await deps.events?.faultOpened?.(id);
      const fault = await this.get(id);
      if (!notStored.length) return fault;
      const n = notStored.length;
      return {
        ...fault,
        photosNotStored: notStored,
        warnings: [{ code: 'photos_not_stored', message: `The fault is recorded, but ${n === 1 ? 'one photo' : `${n} photos`} could not be stored (${notStored[0].reason}). Add ${n === 1 ? 'it' : 'them'} again later.` }],
      };
    },
    /**
     * Resolving never reopens a point by itself: the clearance was voided when the fault opened,
     * and the point waits for a rigger to clear it again.
     */
    async resolve(id: number, r: ResolveFault, actorId: number) {
      const fault = await this.get(id);
      if (fault.status === 'resolved') throw conflict('already_resolved', 'This fault is already resolved.');
      await writeTransaction(db, async (trx) => {
        const now = clock.now();
        if (r.resolution === 'replaced' && fault.gearId !== null) {
          if (r.replacementGearId === undefined) throw new HttpError(400, 'invalid_request', 'Pick the stock item that replaces it.', { source: 'body', fields: { replacementGearId: 'Pick the replacement' } });
          const replacement = await rig.gearById(r.replacementGearId, trx);
          if (!replacement) throw new HttpError(400, 'invalid_request', 'That replacement does not exist.', { source: 'body', fields: { replacementGearId: 'Unknown gear item' } });
          if (replacement.pointId !== null) throw conflict('gear_in_use', `${replacement.serial} already hangs on ${replacement.pointLabel}.`, { gearIds: [replacement.id] });
          if (replacement.status !== 'in_service') throw conflict('gear_unfit', `${replacement.serial} is ${replacement.status.replace('_', ' ')}; pick an item in service.`);
          const holder = await rig.pointOfGear(fault.gearId, trx);
          if (holder) {
            await rig.swapGearInPath(fault.gearId, replacement.id, trx);
            await voidClearance(trx, { rig, audit }, { pointId: holder, at: now, actorId, why: { reason: 'gear_replaced', source: `${fault.gearSerial ?? `gear #${fault.gearId}`} replaced by ${replacement.serial} resolving fault #${id}` } });
          }
          await rig.updateGear(fault.gearId, { status: r.oldGearStatus ?? 'quarantined', statusReason: `Replaced after fault #${id}: ${r.note}` }, now, trx);
        }
        if (r.resolution === 'retired' && fault.gearId !== null) {
          await rig.updateGear(fault.gearId, { status: 'retired', statusReason: `Retired after fault #${id}: ${r.note}` }, now, trx);
        }
        await faults.resolve(id, { resolution: r.resolution, note: r.note, by: actorId }, now, trx);
        await audit.record(trx, { actorId, action: 'fault.resolved', entity: 'fault', entityId: id, before: { status: 'open' }, after: r }, now);
      });
      return this.get(id);
    },
  };
}
export type FaultsService = ReturnType<typeof faultsService>;
