import type { Db } from '../server/db/knex';
import { loadSnapshots } from '../server/modules/rig/point-snapshots';
import { rigRepository } from '../server/modules/rig/rig.repository';
import { studioRepository } from '../server/modules/studio/studio.repository';
import { recordAtStart, type OpenFault, type PointSnapshot } from '../shared/clearance';

/**
 * The records a running server would have kept as each past demo class started (PRODUCT.md §10).
 * The demo's history is invented at the first start, so each record is worked out from that
 * history as it stood at the class's start: the clearance and voids before it, the faults open
 * then, gear taken out of service only later counted as in service. (A live server never does
 * this: it keeps a class's record within a worker cycle of its start, from the records as they are.)
 */
export async function seedRecords(trx: Db, now: Date): Promise<void> {
  if (await trx('session_records').first('id')) return;
  const { policy } = await studioRepository(trx).get(trx);
  const rows = (await trx('session_points').join('sessions', 'sessions.id', 'session_points.session_id').where('sessions.starts_at', '<=', now.toISOString()).select('session_points.session_id', 'session_points.point_id', 'sessions.starts_at')) as Array<{ session_id: number; point_id: number; starts_at: string }>;
  if (!rows.length) return;
  const bundles = new Map((await loadSnapshots(trx, rigRepository(trx), {}, trx)).map((b) => [b.point.id, b]));
  const clearances = (await trx('inspections').leftJoin('clearance_voids', 'clearance_voids.inspection_id', 'inspections.id').where({ 'inspections.kind': 'periodic', 'inspections.cleared': true }).whereNotNull('inspections.point_id').orderBy([{ column: 'inspections.inspected_at' }, { column: 'inspections.id' }]).select('inspections.point_id', 'inspections.inspected_at', 'inspections.clearance_end', 'clearance_voids.at as voided_at')) as Array<{ point_id: number; inspected_at: string; clearance_end: string | null; voided_at: string | null }>;
  const faults = (await trx('faults').select('id', 'point_id', 'gear_id', 'severity', 'description', 'reported_at', 'resolved_at')) as Array<{ id: number; point_id: number | null; gear_id: number | null; severity: OpenFault['severity']; description: string; reported_at: string; resolved_at: string | null }>;
  const statusSince = new Map(((await trx('gear_items').whereNot('status', 'in_service').select('id', 'updated_at')) as Array<{ id: number; updated_at: string }>).map((g) => [g.id, g.updated_at]));

  const inserts = [];
  for (const r of rows) {
    const b = bundles.get(r.point_id);
    if (!b) continue;
    const start = r.starts_at;
    const inPath = new Set(b.snapshot.links.map((l) => l.gear.id));
    const clearance = clearances.filter((c) => c.point_id === r.point_id && c.inspected_at <= start).pop();
    const asAtStart: PointSnapshot = {
      ...b.snapshot,
      links: b.snapshot.links.map((l) => ({ ...l, gear: { ...l.gear, status: (statusSince.get(l.gear.id) ?? '') > start ? 'in_service' : l.gear.status } })),
      lastClearance: clearance ? { at: new Date(clearance.inspected_at), voidedAt: clearance.voided_at && clearance.voided_at <= start ? new Date(clearance.voided_at) : null, until: clearance.clearance_end ? new Date(clearance.clearance_end) : null } : null,
      openFaults: faults
        .filter((f) => f.reported_at <= start && (!f.resolved_at || f.resolved_at > start) && (f.point_id === r.point_id || (f.gear_id !== null && inPath.has(f.gear_id))))
        .map((f) => ({ id: f.id, pointId: f.point_id, gearId: f.gear_id, severity: f.severity, description: f.description })),
    };
    const rec = recordAtStart(asAtStart, policy, new Date(start));
    inserts.push({
      session_id: r.session_id,
      point_id: r.point_id,
      point_label: b.point.label,
      starts_at: start,
      status: rec.status,
      cleared_until: rec.clearedUntil?.toISOString() ?? null,
      reasons_json: JSON.stringify(rec.reasons),
      apparatus_json: rec.apparatus ? JSON.stringify(rec.apparatus) : null,
      recorded_at: new Date(Date.parse(start) + 5_000).toISOString(),
    });
  }
  for (let i = 0; i < inserts.length; i += 100) await trx('session_records').insert(inserts.slice(i, i + 100));
}
