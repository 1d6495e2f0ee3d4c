import type { Db } from '../../db/knex';
import { valueTaken } from '../../db/queries';
import type { ApparatusKind, BridleLeg, Gate, GearEventKind, GearKind, GearStatus, LoadingMode, Material, Structure } from '../../../shared/schemas/vocabulary';
import type { CreateGear, CreatePoint, GearListQuery, LoadPathBody, UpdateGear, UpdatePoint } from '../../../shared/schemas/rig';

export interface PointRow {
  id: number;
  room_id: number;
  room_name?: string;
  label: string;
  structure: Structure;
  structural_rating_kn: number;
  apparatus_json: string;
  max_performers: number;
  in_service: number | boolean;
  notes: string | null;
  last_cleared_at: string | null;
  clearance_voided_at: string | null;
}

export interface GearRow {
  id: number;
  kind: GearKind;
  material: Material;
  gate: Gate;
  serial: string;
  maker: string | null;
  model: string | null;
  major_kn: number;
  minor_kn: number | null;
  gate_open_kn: number | null;
  wll_kn: number | null;
  multi_directional: number | boolean;
  manufactured_on: string | null;
  in_service_on: string | null;
  service_life_years: number | null;
  status: GearStatus;
  status_reason: string | null;
  inspected_until: string | null;
  notes: string | null;
  point_id?: number | null;
  point_label?: string | null;
}

export interface LinkRow {
  id: number;
  point_id: number;
  position: number;
  gear_id: number;
  mode: LoadingMode;
  three_way: number | boolean;
  basket_over_half: number | boolean;
  leg: BridleLeg | null;
  included_angle_deg: number | null;
}

export interface PointRecord {
  id: number;
  roomId: number;
  roomName: string;
  label: string;
  structure: Structure;
  structuralRatingKn: number;
  apparatus: ApparatusKind[];
  maxPerformers: number;
  inService: boolean;
  notes: string | null;
  lastClearedAt: string | null;
  clearanceVoidedAt: string | null;
}

export interface GearRecord {
  id: number;
  kind: GearKind;
  material: Material;
  gate: Gate;
  serial: string;
  maker: string | null;
  model: string | null;
  majorKn: number;
  minorKn: number | null;
  gateOpenKn: number | null;
  wllKn: number | null;
  multiDirectional: boolean;
  manufacturedOn: string | null;
  inServiceOn: string | null;
  serviceLifeYears: number | null;
  status: GearStatus;
  statusReason: string | null;
  inspectedUntil: string | null;
  notes: string | null;
  pointId: number | null;
  pointLabel: string | null;
}

export interface LinkRecord {
  pointId: number;
  position: number;
  gearId: number;
  mode: LoadingMode;
  threeWay: boolean;
  basketOverHalf: boolean;
  leg: BridleLeg | null;
  includedAngleDeg: number | null;
}

/** Why a clearance was voided, kept with the void (PRODUCT.md §4.1's causes). */
export interface VoidCause {
  reason: 'fault_opened' | 'fixed_links_changed' | 'gear_ratings_changed' | 'structural_rating_changed' | 'gear_replaced' | 'rig_changed';
  /** What did it, in words: "fault #12", "load path saved by user #3". */
  source: string;
}

/** A point's clearance derived from the rows: its latest clearance and the void of it, if any. */
export interface ClearanceState {
  inspectionId: number;
  at: string;
  /** The point's own end, kept when the rigger signed (null for clearances kept before ends were). */
  until: string | null;
  voidedAt: string | null;
}

interface LatestClearanceRow {
  point_id: number;
  inspection_id: number;
  inspected_at: string;
  clearance_end: string | null;
  voided_at: string | null;
}

/**
 * One query whatever the number of points: for each point the clearance (an inspection that
 * cleared it; only periodic point inspections ever do) with no later one, and the void of it.
 * Each point's newest clearance is one seek down the (point_id, cleared, inspected_at) index (the
 * row id, the tie-break, ends every index entry), so the cost follows the points asked for, not
 * the inspections kept: grouping all of them read 20,000 index entries for 60 points.
 */
async function latestClearances(trx: Db, pointIds: number[] | 'all'): Promise<LatestClearanceRow[]> {
  const newest = trx('inspections as n')
    .select('n.id')
    .whereRaw('?? = ??', ['n.point_id', 'p.id'])
    .where('n.cleared', true)
    .orderBy([{ column: 'n.inspected_at', order: 'desc' }, { column: 'n.id', order: 'desc' }])
    .limit(1);
  const q = trx('points as p')
    .join('inspections as i', (j) => j.on('i.id', '=', trx.raw('(?)', [newest])))
    .leftJoin('clearance_voids as v', 'v.inspection_id', 'i.id')
    .orderBy('i.id')
    .select('i.point_id', 'i.id as inspection_id', 'i.inspected_at', 'i.clearance_end', 'v.at as voided_at');
  if (pointIds !== 'all') q.whereIn('p.id', pointIds);
  return (await q) as LatestClearanceRow[];
}

export const toPoint = (r: PointRow): PointRecord => ({
  id: r.id,
  roomId: r.room_id,
  roomName: r.room_name ?? '',
  label: r.label,
  structure: r.structure,
  structuralRatingKn: r.structural_rating_kn,
  apparatus: JSON.parse(r.apparatus_json) as ApparatusKind[],
  maxPerformers: r.max_performers,
  inService: Boolean(r.in_service),
  notes: r.notes,
  lastClearedAt: r.last_cleared_at,
  clearanceVoidedAt: r.clearance_voided_at,
});

export const toGear = (r: GearRow): GearRecord => ({
  id: r.id,
  kind: r.kind,
  material: r.material,
  gate: r.gate,
  serial: r.serial,
  maker: r.maker,
  model: r.model,
  majorKn: r.major_kn,
  minorKn: r.minor_kn,
  gateOpenKn: r.gate_open_kn,
  wllKn: r.wll_kn,
  multiDirectional: Boolean(r.multi_directional),
  manufacturedOn: r.manufactured_on,
  inServiceOn: r.in_service_on,
  serviceLifeYears: r.service_life_years,
  status: r.status,
  statusReason: r.status_reason,
  inspectedUntil: r.inspected_until,
  notes: r.notes,
  pointId: r.point_id ?? null,
  pointLabel: r.point_label ?? null,
});

export const toLink = (r: LinkRow): LinkRecord => ({
  pointId: r.point_id,
  position: r.position,
  gearId: r.gear_id,
  mode: r.mode,
  threeWay: Boolean(r.three_way),
  basketOverHalf: Boolean(r.basket_over_half),
  leg: r.leg,
  includedAngleDeg: r.included_angle_deg,
});

const gearColumns = (db: Db) => [
  'gear_items.*',
  'load_path_links.point_id as point_id',
  db.ref('points.label').as('point_label'),
];

function gearSelect(db: Db) {
  return db('gear_items')
    .leftJoin('load_path_links', 'load_path_links.gear_id', 'gear_items.id')
    .leftJoin('points', 'points.id', 'load_path_links.point_id')
    .select(gearColumns(db));
}

export function rigRepository(db: Db) {
  return {
    // ---- rooms
    async listRooms() {
      return db('rooms')
        .leftJoin('points', 'points.room_id', 'rooms.id')
        .groupBy('rooms.id')
        .orderBy('rooms.name')
        .select('rooms.id', 'rooms.name', db.raw('count(points.id) as "pointCount"'))
        .then((rows: Array<{ id: number; name: string; pointCount: number }>) => rows.map((r) => ({ ...r, pointCount: Number(r.pointCount) })));
    },
    async roomById(id: number, trx: Db = db) {
      return (await trx('rooms').where({ id }).first('id', 'name')) as { id: number; name: string } | undefined;
    },
    roomNameTaken: (name: string) => valueTaken(db, 'rooms', 'name', name),
    async insertRoom(name: string, at: Date, trx: Db = db) {
      const [row] = await trx('rooms').insert({ name, created_at: at.toISOString() }).returning(['id', 'name']);
      return row as { id: number; name: string };
    },

    // ---- points
    async listPoints(filter: { roomId?: number; ids?: number[] } = {}, trx: Db = db): Promise<PointRecord[]> {
      const q = trx<PointRow>('points').join('rooms', 'rooms.id', 'points.room_id').select('points.*', 'rooms.name as room_name').orderBy([{ column: 'rooms.name' }, { column: 'points.label' }]);
      if (filter.roomId) q.where('points.room_id', filter.roomId);
      if (filter.ids) q.whereIn('points.id', filter.ids);
      return (await q).map(toPoint);
    },
    async pointById(id: number, trx: Db = db): Promise<PointRecord | null> {
      const row = await trx<PointRow>('points').join('rooms', 'rooms.id', 'points.room_id').where('points.id', id).first('points.*', 'rooms.name as room_name');
      return row ? toPoint(row) : null;
    },
    pointLabelTaken: (label: string, exceptId?: number) => valueTaken(db, 'points', 'label', label, exceptId),
    async insertPoint(p: CreatePoint, at: Date, trx: Db = db): Promise<number> {
      const now = at.toISOString();
      const [row] = await trx('points')
        .insert({
          room_id: p.roomId,
          label: p.label,
          structure: p.structure,
          structural_rating_kn: p.structuralRatingKn,
          apparatus_json: JSON.stringify(p.apparatus),
          max_performers: p.maxPerformers,
          in_service: p.inService ?? true,
          notes: p.notes ?? null,
          created_at: now,
          updated_at: now,
        })
        .returning('id');
      return (row as { id: number }).id;
    },
    async updatePoint(id: number, p: UpdatePoint & { clearanceVoidedAt?: string | null; lastClearedAt?: string | null }, at: Date, trx: Db = db) {
      const row: Record<string, unknown> = { updated_at: at.toISOString() };
      if (p.roomId !== undefined) row.room_id = p.roomId;
      if (p.label !== undefined) row.label = p.label;
      if (p.structure !== undefined) row.structure = p.structure;
      if (p.structuralRatingKn !== undefined) row.structural_rating_kn = p.structuralRatingKn;
      if (p.apparatus !== undefined) row.apparatus_json = JSON.stringify(p.apparatus);
      if (p.maxPerformers !== undefined) row.max_performers = p.maxPerformers;
      if (p.inService !== undefined) row.in_service = p.inService;
      if (p.notes !== undefined) row.notes = p.notes;
      if (p.clearanceVoidedAt !== undefined) row.clearance_voided_at = p.clearanceVoidedAt;
      if (p.lastClearedAt !== undefined) row.last_cleared_at = p.lastClearedAt;
      await trx('points').where({ id }).update(row);
    },
    /**
     * Voids the point's clearance, if it has a live one: a `clearance_voids` row for its latest
     * clearance (the record the status is derived from), and the cache columns on the point.
     */
    async voidClearance(pointId: number, at: Date, trx: Db = db, why: VoidCause = { reason: 'rig_changed', source: '' }): Promise<{ inspectionId: number } | null> {
      const [latest] = await latestClearances(trx, [pointId]);
      let written: { inspectionId: number } | null = null;
      if (latest && latest.voided_at === null) {
        await trx('clearance_voids').insert({ point_id: pointId, inspection_id: latest.inspection_id, at: at.toISOString(), reason: why.reason, source: why.source.slice(0, 200) }).onConflict('inspection_id').ignore();
        written = { inspectionId: latest.inspection_id };
      }
      await trx('points').where({ id: pointId }).whereNotNull('last_cleared_at').whereNull('clearance_voided_at').update({ clearance_voided_at: at.toISOString() });
      return written;
    },
    /** Each point's clearance as the append-only rows say: its latest clearance and any void of it. */
    async clearanceStates(pointIds: number[] | 'all', trx: Db = db): Promise<Map<number, ClearanceState>> {
      const rows = await latestClearances(trx, pointIds);
      return new Map(rows.map((r) => [r.point_id, { inspectionId: r.inspection_id, at: r.inspected_at, until: r.clearance_end, voidedAt: r.voided_at }]));
    },

    // ---- gear
    async listGear(f: GearListQuery, now: Date): Promise<GearRecord[]> {
      const q = gearSelect(db).orderBy('gear_items.serial');
      if (f.q) q.where((w) => w.whereLike('gear_items.serial', `%${f.q}%`).orWhereLike('gear_items.maker', `%${f.q}%`).orWhereLike('gear_items.model', `%${f.q}%`).orWhereLike('gear_items.kind', `%${f.q}%`));
      if (f.kind) q.where('gear_items.kind', f.kind);
      if (f.status) q.where('gear_items.status', f.status);
      if (f.mounted === 'yes') q.whereNotNull('load_path_links.point_id');
      if (f.mounted === 'no') q.whereNull('load_path_links.point_id');
      if (f.inspectionDueDays !== undefined) {
        const by = new Date(now.getTime() + f.inspectionDueDays * 86_400_000).toISOString();
        q.where((w) => w.whereNull('gear_items.inspected_until').orWhere('gear_items.inspected_until', '<=', by));
      }
      const rows = (await q).map((r: GearRow) => toGear(r));
      return rows;
    },
    /** Whether a class that is not cancelled is under way on the point at `at`. */
    async classUnderWayOn(pointId: number, at: Date, trx: Db = db): Promise<boolean> {
      const row = await trx('session_points').where({ point_id: pointId, cancelled: false }).where('starts_at', '<=', at.toISOString()).where('ends_at', '>', at.toISOString()).first('session_id');
      return row !== undefined;
    },

    async gearById(id: number, trx: Db = db): Promise<GearRecord | null> {
      const row = await gearSelect(trx).where('gear_items.id', id).first();
      return row ? toGear(row as GearRow) : null;
    },
    async gearByIds(ids: number[], trx: Db = db): Promise<GearRecord[]> {
      if (!ids.length) return [];
      return (await gearSelect(trx).whereIn('gear_items.id', ids)).map((r: GearRow) => toGear(r));
    },
    serialTaken: (serial: string, exceptId?: number) => valueTaken(db, 'gear_items', 'serial', serial, exceptId),
    async insertGear(g: CreateGear, at: Date, trx: Db = db): Promise<number> {
      const now = at.toISOString();
      const [row] = await trx('gear_items')
        .insert({ ...gearColumnsOf(g), status: 'in_service', created_at: now, updated_at: now })
        .returning('id');
      return (row as { id: number }).id;
    },
    async updateGear(id: number, g: UpdateGear & { status?: GearStatus; statusReason?: string | null; inspectedUntil?: string | null }, at: Date, trx: Db = db) {
      const row: Record<string, unknown> = { ...gearColumnsOf(g), updated_at: at.toISOString() };
      if (g.status !== undefined) row.status = g.status;
      if (g.statusReason !== undefined) row.status_reason = g.statusReason;
      if (g.inspectedUntil !== undefined) row.inspected_until = g.inspectedUntil;
      await trx('gear_items').where({ id }).update(row);
    },
    async insertGearEvent(e: { gearId: number; kind: GearEventKind; note: string; by: number }, at: Date, trx: Db = db) {
      const [row] = await trx('gear_events').insert({ gear_id: e.gearId, kind: e.kind, note: e.note, recorded_by: e.by, recorded_at: at.toISOString() }).returning('id');
      return (row as { id: number }).id;
    },
    async gearEvents(gearId: number) {
      const rows = await db('gear_events').leftJoin('users', 'users.id', 'gear_events.recorded_by').where('gear_events.gear_id', gearId).orderBy('gear_events.recorded_at', 'desc').select('gear_events.*', 'users.name as by_name');
      return rows.map((r: { id: number; gear_id: number; kind: GearEventKind; note: string; recorded_at: string; by_name: string | null }) => ({ id: r.id, gearId: r.gear_id, kind: r.kind, note: r.note, recordedAt: r.recorded_at, recordedBy: r.by_name }));
    },

    // ---- load paths
    async linksOf(pointIds: number[] | 'all', trx: Db = db): Promise<LinkRecord[]> {
      const q = trx<LinkRow>('load_path_links').orderBy([{ column: 'point_id' }, { column: 'position' }]);
      if (pointIds !== 'all') q.whereIn('point_id', pointIds);
      return (await q).map(toLink);
    },
    /** Links with their gear in one query (for status snapshots): each link knows its point. */
    async linksWithGear(pointIds: number[] | 'all', trx: Db = db): Promise<Array<LinkRecord & { gear: GearRecord }>> {
      const q = trx('load_path_links')
        .join('gear_items', 'gear_items.id', 'load_path_links.gear_id')
        .join('points', 'points.id', 'load_path_links.point_id')
        .orderBy([{ column: 'load_path_links.point_id' }, { column: 'load_path_links.position' }])
        .select(
          'gear_items.*',
          'load_path_links.point_id as point_id',
          'points.label as point_label',
          'load_path_links.position as link_position',
          'load_path_links.mode as link_mode',
          'load_path_links.three_way as link_three_way',
          'load_path_links.basket_over_half as link_basket_over_half',
          'load_path_links.leg as link_leg',
          'load_path_links.included_angle_deg as link_included_angle_deg',
        );
      if (pointIds !== 'all') q.whereIn('load_path_links.point_id', pointIds);
      const rows = (await q) as Array<GearRow & { point_id: number; link_position: number; link_mode: LoadingMode; link_three_way: number | boolean; link_basket_over_half: number | boolean; link_leg: BridleLeg | null; link_included_angle_deg: number | null }>;
      return rows.map((r) => ({
        ...toLink({ id: 0, point_id: r.point_id, position: r.link_position, gear_id: r.id, mode: r.link_mode, three_way: r.link_three_way, basket_over_half: r.link_basket_over_half, leg: r.link_leg, included_angle_deg: r.link_included_angle_deg }),
        gear: toGear(r),
      }));
    },
    async replaceLinks(pointId: number, links: LoadPathBody['links'], trx: Db) {
      await trx('load_path_links').where({ point_id: pointId }).delete();
      if (!links.length) return;
      await trx('load_path_links').insert(
        links.map((l, i) => ({
          point_id: pointId,
          position: i,
          gear_id: l.gearId,
          mode: l.mode,
          three_way: l.threeWay,
          basket_over_half: l.basketOverHalf,
          leg: l.leg ?? null,
          included_angle_deg: l.includedAngleDeg ?? null,
        })),
      );
    },
    async swapGearInPath(oldGearId: number, newGearId: number, trx: Db) {
      await trx('load_path_links').where({ gear_id: oldGearId }).update({ gear_id: newGearId });
    },
    /** Ids of the items of an apparatus kind not retired and hanging on no point (the gear room). */
    async unmountedOfKind(kind: string, trx: Db = db): Promise<number[]> {
      const rows = (await trx('gear_items').leftJoin('load_path_links', 'load_path_links.gear_id', 'gear_items.id').where('gear_items.kind', kind).whereNot('gear_items.status', 'retired').whereNull('load_path_links.id').select('gear_items.id')) as Array<{ id: number }>;
      return rows.map((r) => r.id);
    },
    /** Mounts `gearId` as the point's apparatus: replaces the apparatus link, or hangs it below the last link. */
    async setApparatusLink(pointId: number, currentGearId: number | null, gearId: number, trx: Db) {
      if (currentGearId !== null) {
        await trx('load_path_links').where({ point_id: pointId, gear_id: currentGearId }).update({ gear_id: gearId });
        return;
      }
      const last = (await trx('load_path_links').where({ point_id: pointId }).max('position as position').first()) as { position: number | null } | undefined;
      await trx('load_path_links').insert({ point_id: pointId, position: (last?.position ?? -1) + 1, gear_id: gearId, mode: 'major', three_way: false, basket_over_half: false, leg: null, included_angle_deg: null });
    },
    /** Takes an apparatus off the point it hangs on (the last link; nothing else moves). */
    async removeLink(gearId: number, trx: Db) {
      await trx('load_path_links').where({ gear_id: gearId }).delete();
    },
    async pointOfGear(gearId: number, trx: Db = db): Promise<number | null> {
      const row = await trx('load_path_links').where({ gear_id: gearId }).first('point_id');
      return row ? (row.point_id as number) : null;
    },
  };
}
export type RigRepository = ReturnType<typeof rigRepository>;

function gearColumnsOf(g: UpdateGear): Record<string, unknown> {
  const map: Array<[keyof UpdateGear, string]> = [
    ['kind', 'kind'],
    ['material', 'material'],
    ['gate', 'gate'],
    ['serial', 'serial'],
    ['maker', 'maker'],
    ['model', 'model'],
    ['majorKn', 'major_kn'],
    ['minorKn', 'minor_kn'],
    ['gateOpenKn', 'gate_open_kn'],
    ['wllKn', 'wll_kn'],
    ['multiDirectional', 'multi_directional'],
    ['manufacturedOn', 'manufactured_on'],
    ['inServiceOn', 'in_service_on'],
    ['serviceLifeYears', 'service_life_years'],
    ['notes', 'notes'],
  ];
  const row: Record<string, unknown> = {};
  for (const [k, col] of map) if (g[k] !== undefined) row[col] = g[k];
  return row;
}
