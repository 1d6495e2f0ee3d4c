import type { Db } from '../../db/knex';
import type { CreateFault, Fault, FaultListQuery } from '../../../shared/schemas/safety';
import { cutPage, keyset, pageLimit, type Page } from '../../db/keyset';

interface Row {
  id: number;
  point_id: number | null;
  point_label: string | null;
  gear_id: number | null;
  gear_serial: string | null;
  gear_kind: string | null;
  severity: Fault['severity'];
  description: string;
  status: Fault['status'];
  reporter: string | null;
  reported_at: string;
  resolution: Fault['resolution'];
  resolution_note: string | null;
  resolver: string | null;
  resolved_at: string | null;
}

function select(db: Db) {
  return db('faults')
    .leftJoin('points', 'points.id', 'faults.point_id')
    .leftJoin('gear_items', 'gear_items.id', 'faults.gear_id')
    .leftJoin('users as rep', 'rep.id', 'faults.reported_by')
    .leftJoin('users as res', 'res.id', 'faults.resolved_by')
    .select(
      'faults.*',
      'points.label as point_label',
      'gear_items.serial as gear_serial',
      'gear_items.kind as gear_kind',
      'rep.name as reporter',
      'res.name as resolver',
    );
}

export function faultsRepository(db: Db) {
  async function photosOf(ids: number[]) {
    if (!ids.length) return new Map<number, Fault['photos']>();
    const rows = await db('documents').where('owner_type', 'fault').whereIn('owner_id', ids).orderBy('id').select('id', 'owner_id', 'original_name');
    const map = new Map<number, Fault['photos']>();
    for (const r of rows as Array<{ id: number; owner_id: number; original_name: string }>) {
      const list = map.get(r.owner_id) ?? [];
      list.push({ id: r.id, url: `/api/documents/${r.id}/file`, originalName: r.original_name });
      map.set(r.owner_id, list);
    }
    return map;
  }
  const toFault = (r: Row, photos: Fault['photos']): Fault => ({
    id: r.id,
    pointId: r.point_id,
    pointLabel: r.point_label,
    gearId: r.gear_id,
    gearSerial: r.gear_serial,
    gearKind: r.gear_kind,
    severity: r.severity,
    description: r.description,
    status: r.status,
    reportedBy: r.reporter,
    reportedAt: r.reported_at,
    resolution: r.resolution,
    resolutionNote: r.resolution_note,
    resolvedBy: r.resolver,
    resolvedAt: r.resolved_at,
    photos,
  });

  return {
    /** Open faults first, then newest reported first; keyset on [status, reportedAt, id] (PRODUCT.md §10). */
    async page(f: FaultListQuery & { pathGearIds?: number[] }, trx: Db = db): Promise<Page<Fault>> {
      const q = select(trx);
      if (f.status) q.where('faults.status', f.status);
      if (f.pointId !== undefined) {
        // A point's list includes the faults on the gear in its path.
        q.where((w) => {
          w.where('faults.point_id', f.pointId!);
          if (f.pathGearIds?.length) w.orWhereIn('faults.gear_id', f.pathGearIds);
        });
      }
      if (f.gearId !== undefined) q.where('faults.gear_id', f.gearId);
      // 'open' sorts before 'resolved'.
      const rows = (await keyset(q, [{ col: 'faults.status', dir: 'asc' }, { col: 'faults.reported_at', dir: 'desc' }, { col: 'faults.id', dir: 'desc' }], f.cursor).limit(pageLimit(f.limit))) as Row[];
      const page = cutPage(rows, f.limit, (r) => [r.status, r.reported_at, r.id]);
      const photos = await photosOf(page.rows.map((r) => r.id));
      return { items: page.rows.map((r) => toFault(r, photos.get(r.id) ?? [])), nextCursor: page.nextCursor };
    },
    async byId(id: number, trx: Db = db): Promise<Fault | null> {
      const r = (await select(trx).where('faults.id', id).first()) as Row | undefined;
      if (!r) return null;
      return toFault(r, (await photosOf([id])).get(id) ?? []);
    },
    async insert(f: CreateFault & { reportedBy: number; sourceInspectionId?: number }, at: Date, trx: Db): Promise<number> {
      const [row] = await trx('faults')
        .insert({
          point_id: f.pointId ?? null,
          gear_id: f.gearId ?? null,
          severity: f.severity,
          description: f.description,
          status: 'open',
          reported_by: f.reportedBy,
          reported_at: at.toISOString(),
          source_inspection_id: f.sourceInspectionId ?? null,
        })
        .returning('id');
      return (row as { id: number }).id;
    },
    async resolve(id: number, r: { resolution: string; note: string; by: number }, at: Date, trx: Db) {
      await trx('faults').where({ id }).update({ status: 'resolved', resolution: r.resolution, resolution_note: r.note, resolved_by: r.by, resolved_at: at.toISOString() });
    },
  };
}
export type FaultsRepository = ReturnType<typeof faultsRepository>;
