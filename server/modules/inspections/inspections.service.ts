import type { Writable } from 'node:stream';
import { readTransaction, writeTransaction, type Db } from '../../db/knex';
import type { Clock } from '../../clock';
import { conflict, HttpError, notFound } from '../../http/errors';
import type { AuditRepository } from '../audit/audit.repository';
import type { StudioRepository } from '../studio/studio.repository';
import type { RigRepository } from '../rig/rig.repository';
import { loadSnapshots } from '../rig/point-snapshots';
import { statusWire } from '../rig/rig.service';
import type { FaultsService } from '../faults/faults.service';
import { addStudioDays, clearedUntil, inspectionChecklist, pointStatusAt, policyClearanceEnd, preuseChecklist, studioDay, formatStudioDateTime } from '../../../shared/clearance';
import type { PointSnapshot } from '../../../shared/clearance';
import { statusWhenSigned } from '../../../shared/records/inspection-record';
import { intervalClassOfKind } from '../../../shared/schemas/vocabulary';
import type { ClearanceBody, GearInspectionBody, InspectionLogFilters, InspectionLogQuery, PreuseBody } from '../../../shared/schemas/safety';
import type { InspectionsRepository } from './inspections.repository';
import { streamCsv, streamPrintable } from './inspection-export';
import type { SessionRecords } from '../sessions/session-records';

type Items = Array<{ key: string; result: string; note?: string }>;

/** Every checklist key exactly once, nothing else; otherwise 400 and nothing is recorded. */
function matchItems(expected: Array<{ key: string }>, got: Items) {
  const want = new Set(expected.map((i) => i.key));
  const seen = new Set<string>();
  const unknown: string[] = [];
  const duplicate: string[] = [];
  for (const i of got) {
    if (!want.has(i.key)) unknown.push(i.key);
    else if (seen.has(i.key)) duplicate.push(i.key);
    seen.add(i.key);
  }
  const missing = [...want].filter((k) => !seen.has(k));
  if (missing.length || unknown.length || duplicate.length) {
    const parts = [missing.length ? `missing ${missing.join(', ')}` : '', unknown.length ? `unknown ${unknown.join(', ')}` : '', duplicate.length ? `repeated ${duplicate.join(', ')}` : ''].filter(Boolean);
    throw new HttpError(400, 'checklist_mismatch', `The inspection does not match the checklist: ${parts.join('; ')}. Nothing was recorded.`, { missing, unknown, duplicate });
  }
}

export function inspectionsService(deps: { db: Db; repo: InspectionsRepository; rig: RigRepository; studio: StudioRepository; audit: AuditRepository; faults: FaultsService; clock: Clock; records: SessionRecords }) {
  const { db, repo, rig, studio, audit, faults, clock } = deps;

  async function pointBundle(id: number, trx: Db = db) {
    const [b] = await loadSnapshots(db, rig, { ids: [id] }, trx);
    if (!b) throw notFound('That rigging point');
    return b;
  }

  return {
    async checklist(pointId: number) {
      const b = await pointBundle(pointId);
      return { items: inspectionChecklist(b.point, b.snapshot.links) };
    },

    /** PRODUCT.md §6.1: record the inspection; it clears only when nothing fails and no fault is open. */
    async clear(pointId: number, body: ClearanceBody, actorId: number) {
      const { policy } = await studio.get();
      const result = await writeTransaction(db, async (trx) => {
        const now = clock.now();
        const b = await pointBundle(pointId, trx);
        const checklist = inspectionChecklist(b.point, b.snapshot.links);
        matchItems(checklist, body.items);
        const byKey = new Map(checklist.map((c) => [c.key, c]));
        const failed = body.items.filter((i) => i.result === 'fail');
        const cleared = failed.length === 0 && b.snapshot.openFaults.length === 0 && b.snapshot.links.length > 0;
        // PRODUCT.md §4.9: the point's own end is worked out now, as the rigger signs, and kept with
        // the clearance; a later policy may shorten it but never lengthen it.
        const signedEnd = cleared ? policyClearanceEnd(now, b.snapshot.links, policy) : null;
        let until: Date | null = null;
        let signedSnapshot: PointSnapshot = b.snapshot;
        if (cleared) {
          // Renew every item in the path; the point's clearance is then capped by the apparatus's.
          for (const l of b.links) {
            const days = policy.intervalDays[intervalClassOfKind[l.gear.kind]];
            await rig.updateGear(l.gearId, { inspectedUntil: addStudioDays(now, days, policy.timeZone).toISOString() }, now, trx);
          }
          // The cache columns; the status is derived from the inspection row below (and checked against these).
          await rig.updatePoint(pointId, { lastClearedAt: now.toISOString(), clearanceVoidedAt: null }, now, trx);
          // The point as it stands once this clearance is on record (its row, written below with this
          // status, is what the status is derived from).
          const renewed = (await pointBundle(pointId, trx)).snapshot;
          signedSnapshot = { ...renewed, lastClearance: { at: now, voidedAt: null, until: signedEnd } };
          until = clearedUntil(signedSnapshot, policy);
        }
        // Kept with the row: the log never re-reads a past inspection with today's status (§10).
        const atSigning = statusWhenSigned(pointStatusAt(signedSnapshot, policy, now), failed.map((f) => byKey.get(f.key)!.label));
        const inspectionId = await repo.insert(
          {
            kind: 'periodic',
            pointId,
            gearId: null,
            inspectorId: actorId,
            studioDay: studioDay(now, policy.timeZone),
            result: failed.length ? 'fail' : body.items.some((i) => i.result === 'attention') ? 'attention' : 'pass',
            notes: body.notes ?? '',
            cleared,
            // What the rigger is told (capped by the apparatus), and the point's own end the status is kept to.
            clearedUntil: until?.toISOString() ?? null,
            clearanceEnd: signedEnd?.toISOString() ?? null,
            pointStatus: atSigning,
            items: body.items.map((i) => ({ key: i.key, label: byKey.get(i.key)!.label, result: i.result, note: i.note ?? '', gearId: byKey.get(i.key)!.gearId })),
          },
          now,
          trx,
        );
        const faultIds: number[] = [];
        for (const f of failed) {
          const item = byKey.get(f.key)!;
          faultIds.push(
            await faults.open(trx, {
              pointId: item.gearId ? undefined : pointId,
              gearId: item.gearId,
              severity: 'high',
              description: `Failed inspection: ${item.label}${f.note ? ` — ${f.note}` : ''}`,
              reportedBy: actorId,
              sourceInspectionId: inspectionId,
            }),
          );
        }
        await audit.record(trx, { actorId, action: cleared ? 'point.cleared' : 'point.inspected', entity: 'point', entityId: pointId, after: { inspectionId, cleared, clearedUntil: until?.toISOString() ?? null, keptUntil: signedEnd?.toISOString() ?? null, failed: failed.map((f) => f.key) } }, now);
        const status = pointStatusAt((await pointBundle(pointId, trx)).snapshot, policy, now);
        // A signed clearance is not a cleared point: any rule still blocking it (quarantined or
        // retired gear, a rule violation) wins, and the answer says so (PRODUCT.md §4.1, §8).
        const clearedNow = cleared && status.status !== 'blocked';
        const reasons = cleared
          ? status.reasons
          : [
              ...failed.map((f) => ({ code: 'item_failed', message: `Failed: ${byKey.get(f.key)!.label}` })),
              ...b.snapshot.openFaults.map((f) => ({ code: 'fault_open', message: `Open fault: ${f.description}` })),
              ...(b.snapshot.links.length ? [] : [{ code: 'no_load_path', message: 'The point has no load path to clear.' }]),
            ];
        return { inspectionId, cleared: clearedNow, clearanceSigned: cleared, clearedUntil: clearedNow ? (until?.toISOString() ?? null) : null, reasons, faultIds, status: statusWire(status) };
      });
      return result;
    },

    /** An item inspected on its own (an apparatus in the gear room, or after an incident). */
    async inspectGear(gearId: number, body: GearInspectionBody, actorId: number) {
      const { policy } = await studio.get();
      const gear = await rig.gearById(gearId);
      if (!gear) throw notFound('That gear item');
      if (gear.status === 'retired') throw conflict('gear_retired', 'A retired item is not inspected back into use.');
      const id = await writeTransaction(db, async (trx) => {
        const now = clock.now();
        const passed = body.result !== 'fail';
        if (passed) {
          const days = policy.intervalDays[intervalClassOfKind[gear.kind]];
          const patch: Parameters<RigRepository['updateGear']>[1] = { inspectedUntil: addStudioDays(now, days, policy.timeZone).toISOString() };
          // Only an after-incident inspection returns a quarantined item to service.
          if (body.kind === 'after_incident' && gear.status === 'quarantined') Object.assign(patch, { status: 'in_service', statusReason: null });
          await rig.updateGear(gearId, patch, now, trx);
        }
        const inspectionId = await repo.insert(
          { kind: body.kind, pointId: null, gearId, inspectorId: actorId, studioDay: studioDay(now, policy.timeZone), result: body.result, notes: body.note ?? '', cleared: false, clearedUntil: null, pointStatus: null, items: [] },
          now,
          trx,
        );
        if (!passed) await faults.open(trx, { gearId, severity: 'high', description: `Failed ${body.kind.replace('_', '-')} inspection${body.note ? `: ${body.note}` : ''}`, reportedBy: actorId, sourceInspectionId: inspectionId });
        await audit.record(trx, { actorId, action: 'gear.inspected', entity: 'gear', entityId: gearId, after: { inspectionId, ...body } }, now);
        return inspectionId;
      });
      const inspection = await repo.byId(id);
      return { ...inspection, id, gear: await rig.gearById(gearId) };
    },

    async preuseChecklist(pointId: number) {
      const b = await pointBundle(pointId);
      return { items: preuseChecklist(b.snapshot.links) };
    },

    /** PRODUCT.md §4.5: valid for the studio day; a failed item opens a fault at once. */
    async preuse(pointId: number, body: PreuseBody, actorId: number) {
      const { policy } = await studio.get();
      const out = await writeTransaction(db, async (trx) => {
        const now = clock.now();
        const b = await pointBundle(pointId, trx);
        const list = preuseChecklist(b.snapshot.links);
        matchItems(list, body.items);
        const labels = new Map<string, string>(list.map((i) => [i.key, i.label]));
        const notApplicable = body.items.filter((i) => i.result === 'not_applicable' && !list.find((l) => l.key === i.key)?.notApplicable);
        if (notApplicable.length) throw new HttpError(400, 'invalid_request', 'Only the rows that offer it can be answered “not applicable”.', { source: 'body', fields: { items: `Not applicable is not offered for: ${notApplicable.map((i) => labels.get(i.key)).join('; ')}` } });
        const failed = body.items.filter((i) => i.result === 'fail');
        const atSigning = statusWhenSigned(pointStatusAt(b.snapshot, policy, now), failed.map((f) => labels.get(f.key)!));
        const inspectionId = await repo.insert(
          {
            kind: 'pre_use',
            pointId,
            gearId: null,
            inspectorId: actorId,
            studioDay: studioDay(now, policy.timeZone),
            result: failed.length ? 'fail' : 'pass',
            notes: '',
            cleared: false,
            clearedUntil: null,
            pointStatus: atSigning,
            items: body.items.map((i) => (i.result === 'not_applicable' ? { key: i.key, label: labels.get(i.key)!, result: 'pass' as const, note: 'Not applicable' } : { key: i.key, label: labels.get(i.key)!, result: i.result, note: i.note ?? '' })),
          },
          now,
          trx,
        );
        const faultIds: number[] = [];
        for (const f of failed) {
          faultIds.push(await faults.open(trx, { pointId, severity: 'high', description: `Pre-use check failed: ${labels.get(f.key)}${f.note ? ` — ${f.note}` : ''}`, reportedBy: actorId, sourceInspectionId: inspectionId }));
        }
        await audit.record(trx, { actorId, action: 'point.preuse_checked', entity: 'point', entityId: pointId, after: { inspectionId, failed: failed.map((f) => f.key) } }, now);
        const status = pointStatusAt((await pointBundle(pointId, trx)).snapshot, policy, now);
        return { inspectionId, passed: failed.length === 0, faultIds, status: statusWire(status) };
      });
      return out;
    },

    log: (q: InspectionLogQuery) => repo.page(q),

    /**
     * The complete log for a range (PRODUCT.md §10), streamed to `out` as CSV or printable HTML.
     * The chain head and the last inspection are read together first, so the foot vouches for
     * exactly the rows above it.
     */
    async export(f: InspectionLogFilters, format: 'csv' | 'html', out: Writable): Promise<number> {
      const { name, policy } = await studio.get();
      // The printable log carries the classes held in the range: any started class's missing record is kept first.
      if (format === 'html') await deps.records.keepInRange(f.from, f.to, clock.now());
      const { head, upToId, heldUpToId } = await readTransaction(db, async (trx) => ({ head: await audit.head(trx), upToId: await repo.maxId(trx), heldUpToId: await deps.records.maxId(trx) }));
      const points = f.pointId ? await rig.pointById(f.pointId) : null;
      const gear = f.gearId ? await rig.gearById(f.gearId) : null;
      const day = (iso: string) => formatStudioDateTime(new Date(iso), policy.timeZone);
      const scope = [
        f.kind ? `${f.kind.replace('_', '-')} inspections` : 'Every inspection',
        points ? `of point ${points.label}` : f.pointId ? `of point #${f.pointId}` : '',
        gear ? `covering gear ${gear.serial}` : f.gearId ? `covering gear #${f.gearId}` : '',
        f.from ? `from ${day(f.from)}` : '',
        f.to ? `before ${day(f.to)}` : '',
      ].filter(Boolean).join(' ');
      const meta = { studioName: name, timeZone: policy.timeZone, exportedAt: clock.now(), head, scope };
      const batches = repo.batches(f, upToId);
      if (format === 'csv') return streamCsv(out, batches, meta);
      const heldScope = [
        'Classes',
        points ? `on point ${points.label}` : f.pointId ? `on point #${f.pointId}` : '',
        gear ? `that hung gear ${gear.serial}` : f.gearId ? `that hung gear #${f.gearId}` : '',
        f.from ? `starting from ${day(f.from)}` : '',
        f.to ? `before ${day(f.to)}` : '',
      ].filter(Boolean).join(' ');
      const held = { batches: deps.records.heldBatches(f, heldUpToId), scope: f.kind ? `${heldScope} (the kind filter is for inspections only)` : heldScope };
      return streamPrintable(out, batches, meta, held);
    },
  };
}
export type InspectionsService = ReturnType<typeof inspectionsService>;
