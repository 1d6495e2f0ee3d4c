import type { Db } from '../../db/knex';
import type { Inspection, InspectionLogQuery } from '../../../shared/schemas/safety';

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
  items: Array<{ key: string; label: string; result: Inspection['result']; note: string; gearId?: number }>;
}

export function inspectionsRepository(db: Db) {
  return {
    /** Inspections are append-only (the database refuses updates and deletes). */
    async insert(i: NewInspection, at: Date, trx: Db): Promise<number> {
      const [row] = await trx('inspections')
        .insert({ kind: i.kind, point_id: i.pointId, gear_id: i.gearId, inspector_id: i.inspectorId, inspected_at: at.toISOString(), studio_day: i.studioDay, result: i.result, notes: i.notes, cleared: i.cleared, cleared_until: i.clearedUntil })
        .returning('id');
      const id = (row as { id: number }).id;
      if (i.items.length) {
        await trx('inspection_items').insert(i.items.map((it) => ({ inspection_id: id, key: it.key, label: it.label, result: it.result, note: it.note, gear_id: it.gearId ?? null })));
      }
      return id;
    },
    async list(q: InspectionLogQuery & { limit?: number }, trx: Db = db): Promise<Inspection[]> {
      const sel = trx('inspections')
        .leftJoin('points', 'points.id', 'inspections.point_id')
        .leftJoin('gear_items', 'gear_items.id', 'inspections.gear_id')
        .leftJoin('users', 'users.id', 'inspections.inspector_id')
        .select('inspections.*', 'points.label as point_label', 'gear_items.serial as gear_serial', 'users.name as inspector')
        .orderBy('inspections.inspected_at', 'desc')
        .limit(q.limit ?? 5000);
      if (q.from) sel.where('inspections.inspected_at', '>=', new Date(q.from).toISOString());
      if (q.to) sel.where('inspections.inspected_at', '<', new Date(q.to).toISOString());
      if (q.pointId) sel.where('inspections.point_id', q.pointId);
      if (q.gearId) {
        // A gear item's history includes the point inspections that covered it.
        sel.where((w) => w.where('inspections.gear_id', q.gearId!).orWhereIn('inspections.id', trx('inspection_items').where('gear_id', q.gearId!).select('inspection_id')));
      }
      if (q.kind) sel.where('inspections.kind', q.kind);
      const rows = (await sel) as Row[];
      const items = rows.length
        ? ((await trx('inspection_items').whereIn('inspection_id', rows.map((r) => r.id)).orderBy('id')) as Array<{ inspection_id: number; key: string; label: string; result: Inspection['result']; note: string }>)
        : [];
      const byInspection = new Map<number, Inspection['items']>();
      for (const it of items) {
        const list = byInspection.get(it.inspection_id) ?? [];
        list.push({ key: it.key, label: it.label, result: it.result, note: it.note });
        byInspection.set(it.inspection_id, list);
      }
      return rows.map((r) => ({
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
        cleared: Boolean(r.cleared),
        clearedUntil: r.cleared_until,
        items: byInspection.get(r.id) ?? [],
      }));
    },
    /** The latest pre-use check of each point on a studio day. */
    async preuseOn(studioDay: string, trx: Db = db): Promise<Map<number, string>> {
      const rows = (await trx('inspections').where({ kind: 'pre_use', studio_day: studioDay }).groupBy('point_id').select('point_id', trx.raw('max(inspected_at) as at'))) as Array<{ point_id: number; at: string }>;
      return new Map(rows.map((r) => [r.point_id, r.at]));
    },
  };
}
export type InspectionsRepository = ReturnType<typeof inspectionsRepository>;
