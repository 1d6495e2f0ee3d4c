import type { Db } from '../../db/knex';
import type { Inspection, InspectionLogFilters, InspectionLogQuery } from '../../../shared/schemas/safety';
import type { Page } from '../../../shared/schemas/page';
import type { Reason } from '../../../shared/clearance/types';
import { inspectionOutcome, type RecordedPointStatus } from '../../../shared/records/inspection-record';
import { cutPage, keyset, pageLimit, type SortColumn } from '../../db/keyset';

interface Row {
  id: number;
  kind: Inspection['kind'];
  point_id: number | null;
  point_label: string | null;
  gear_id: number | null;
  gear_serial: string | null;
  inspector: string | null;
  inspected_at: string;
  result: Inspection['result'];
  notes: string;
  cleared: number | boolean;
  cleared_until: string | null;
  point_status: RecordedPointStatus | null;
  point_reasons_json: string | null;
}

export interface NewInspection {
  kind: Inspection['kind'];
  pointId: number | null;
  gearId: number | null;
  inspectorId: number;
  studioDay: string;
  result: Inspection['result'];
  notes: string;
  cleared: boolean;
  clearedUntil: string | null;
  /** PRODUCT.md §4.9: the point's own clearance end kept with a clearance (before the apparatus cap). */
  clearanceEnd?: string | null;
  /** The point's status as the rules saw it when signed (PRODUCT.md §10); null for gear on its own. */
  pointStatus: { status: RecordedPointStatus; reasons: Reason[] } | null;
  items: Array<{ key: string; label: string; result: Inspection['result']; note: string; gearId?: number }>;
}

const SORT: SortColumn[] = [
  { col: 'inspections.inspected_at', dir: 'desc' },
  { col: 'inspections.id', dir: 'desc' },
];

function filtered(trx: Db, q: InspectionLogFilters) {
  const sel = trx('inspections')
    .leftJoin('points', 'points.id', 'inspections.point_id')
    .leftJoin('gear_items', 'gear_items.id', 'inspections.gear_id')
    .leftJoin('users', 'users.id', 'inspections.inspector_id')
    .select('inspections.*', 'points.label as point_label', 'gear_items.serial as gear_serial', 'users.name as inspector');
  if (q.from) sel.where('inspections.inspected_at', '>=', new Date(q.from).toISOString());
  if (q.to) sel.where('inspections.inspected_at', '<', new Date(q.to).toISOString());
  if (q.pointId) sel.where('inspections.point_id', q.pointId);
  if (q.gearId) {
    // A gear item's history includes the point inspections that covered it.
    sel.where((w) => w.where('inspections.gear_id', q.gearId!).orWhereIn('inspections.id', trx('inspection_items').where('gear_id', q.gearId!).select('inspection_id')));
  }
  if (q.kind) sel.where('inspections.kind', q.kind);
  return sel;
}

const parseReasons = (json: string | null): Reason[] | null => {
  if (!json) return null;
  try {
    const v = JSON.parse(json) as unknown;
    return Array.isArray(v) ? (v as Reason[]) : null;
  } catch {
    return null;
  }
};

/** Items, photos and the recorded outcome for a batch of rows, in three queries whatever the batch. */
async function hydrate(rows: Row[], trx: Db): Promise<Inspection[]> {
  if (!rows.length) return [];
  const ids = rows.map((r) => r.id);
  const items = (await trx('inspection_items').whereIn('inspection_id', ids).orderBy('id')) as Array<{ inspection_id: number; key: string; label: string; result: Inspection['result']; note: string }>;
  const byInspection = new Map<number, Inspection['items']>();
  for (const it of items) {
    const list = byInspection.get(it.inspection_id) ?? [];
    list.push({ key: it.key, label: it.label, result: it.result, note: it.note });
    byInspection.set(it.inspection_id, list);
  }
  // Photos kept with the inspection itself, and those of the faults it opened.
  const photoRows = (await trx('documents')
    .leftJoin('faults', (j) => j.on('faults.id', '=', 'documents.owner_id').andOnVal('documents.owner_type', '=', 'fault'))
    .where((w) => w.where('documents.owner_type', 'inspection').whereIn('documents.owner_id', ids))
    .orWhere((w) => w.where('documents.owner_type', 'fault').whereIn('faults.source_inspection_id', ids))
    .orderBy('documents.id')
    .select('documents.id', 'documents.original_name', 'documents.owner_type', 'documents.owner_id', 'faults.source_inspection_id')) as Array<{ id: number; original_name: string; owner_type: string; owner_id: number; source_inspection_id: number | null }>;
  const photos = new Map<number, Inspection['photos']>();
  for (const p of photoRows) {
    const of = p.owner_type === 'inspection' ? p.owner_id : p.source_inspection_id!;
    const list = photos.get(of) ?? [];
    list.push({ id: p.id, name: p.original_name, url: `/api/documents/${p.id}/file` });
    photos.set(of, list);
  }
  return rows.map((r) => {
    const its = byInspection.get(r.id) ?? [];
    const outcome = inspectionOutcome({
      kind: r.kind,
      pointId: r.point_id,
      clearanceSigned: Boolean(r.cleared),
      pointStatus: r.point_status,
      pointReasons: parseReasons(r.point_reasons_json),
      failedItems: its.filter((i) => i.result === 'fail').map((i) => i.label),
    });
    return {
      id: r.id,
      kind: r.kind,
      pointId: r.point_id,
      pointLabel: r.point_label,
      gearId: r.gear_id,
      gearSerial: r.gear_serial,
      inspector: r.inspector,
      inspectedAt: r.inspected_at,
      result: r.result,
      notes: r.notes,
      cleared: outcome.cleared,
      clearanceSigned: Boolean(r.cleared),
      clearedUntil: r.cleared_until,
      pointStatus: r.point_id === null ? null : { status: outcome.status, recorded: outcome.recorded, reasons: outcome.reasons },
      items: its,
      photos: photos.get(r.id) ?? [],
    };
  });
}

export function inspectionsRepository(db: Db) {
  return {
    /** Inspections are append-only (the database refuses updates and deletes). */
    async insert(i: NewInspection, at: Date, trx: Db): Promise<number> {
      const [row] = await trx('inspections')
        .insert({
          kind: i.kind,
          point_id: i.pointId,
          gear_id: i.gearId,
          inspector_id: i.inspectorId,
          inspected_at: at.toISOString(),
          studio_day: i.studioDay,
          result: i.result,
          notes: i.notes,
          cleared: i.cleared,
          cleared_until: i.clearedUntil,
          clearance_end: i.clearanceEnd ?? null,
          point_status: i.pointStatus?.status ?? null,
          point_reasons_json: i.pointStatus ? JSON.stringify(i.pointStatus.reasons.map((r) => ({ code: r.code, message: r.message }))) : null,
        })
        .returning('id');
      const id = (row as { id: number }).id;
      if (i.items.length) {
        await trx('inspection_items').insert(i.items.map((it) => ({ inspection_id: id, key: it.key, label: it.label, result: it.result, note: it.note, gear_id: it.gearId ?? null })));
      }
      return id;
    },
    /** One page of the log, newest first (PRODUCT.md §10: `{ items, nextCursor }`, keyset on [inspectedAt, id]). */
    async page(q: InspectionLogQuery, trx: Db = db): Promise<Page<Inspection>> {
      const rows = (await keyset(filtered(trx, q), SORT, q.cursor).limit(pageLimit(q.limit))) as Row[];
      const page = cutPage(rows, q.limit, (r) => [r.inspected_at, r.id]);
      return { items: await hydrate(page.rows, trx), nextCursor: page.nextCursor };
    },

    /** One inspection as the log shows it. */
    async byId(id: number, trx: Db = db): Promise<Inspection | null> {
      const rows = (await filtered(trx, {}).where('inspections.id', id)) as Row[];
      return rows.length ? (await hydrate(rows, trx))[0] : null;
    },

    /**
     * Every matching inspection, newest first, in batches read one after another (the export):
     * memory holds one batch whatever the range. Only rows up to `upToId` are read, so rows added
     * while the export runs do not slip in after the chain head was taken.
     */
    async *batches(f: InspectionLogFilters, upToId: number, batchSize = 500, trx: Db = db): AsyncGenerator<Inspection[]> {
      let after: Array<string | number> | undefined;
      for (;;) {
        const rows = (await keyset(filtered(trx, f).where('inspections.id', '<=', upToId), SORT, after).limit(batchSize)) as Row[];
        if (!rows.length) return;
        yield await hydrate(rows, trx);
        if (rows.length < batchSize) return;
        const last = rows[rows.length - 1];
        after = [last.inspected_at, last.id];
      }
    },

    async maxId(trx: Db = db): Promise<number> {
      const row = (await trx('inspections').max({ id: 'id' }).first()) as { id: number | null } | undefined;
      return Number(row?.id ?? 0);
    },

    /** The latest pre-use check of each point on a studio day. */
    async preuseOn(studioDay: string, trx: Db = db): Promise<Map<number, string>> {
      const rows = (await trx('inspections').where({ kind: 'pre_use', studio_day: studioDay }).groupBy('point_id').select('point_id', trx.raw('max(inspected_at) as at'))) as Array<{ point_id: number; at: string }>;
      return new Map(rows.map((r) => [r.point_id, r.at]));
    },

    /** Every inspection that cleared a point, as stored (the audit verify matches each to its audit entry). */
    async clearancesOnRecord(trx: Db = db): Promise<Array<{ id: number; pointId: number; inspectedAt: string }>> {
      const rows = (await trx('inspections').where('cleared', true).whereNotNull('point_id').select('id', 'point_id', 'inspected_at')) as Array<{ id: number; point_id: number; inspected_at: string }>;
      return rows.map((r) => ({ id: r.id, pointId: r.point_id, inspectedAt: r.inspected_at }));
    },
  };
}
export type InspectionsRepository = ReturnType<typeof inspectionsRepository>;
