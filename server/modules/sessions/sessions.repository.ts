import type { Knex } from 'knex';
import type { Db } from '../../db/knex';

export interface SessionRecord {
  id: number;
  classTypeId: number;
  className: string;
  apparatus: string;
  capacity: number;
  instructorId: number;
  instructorName: string;
  roomId: number;
  roomName: string;
  startsAt: string;
  endsAt: string;
  seriesId: number | null;
  cancelled: boolean;
  cancelReason: string | null;
  pointIds: number[];
  /** The class's load profile figures (null: the policy's). */
  performersPerPoint: number;
  dynamicFactor: number | null;
  bodyMassKg: number | null;
  /** The apparatus recorded per point at booking (PRODUCT.md §4.7). */
  recordedApparatus: Array<{ pointId: number; gearId: number }>;
}

export interface ApparatusChoice {
  pointId: number;
  gearId: number;
}

interface Row {
  id: number;
  class_type_id: number;
  class_name: string;
  apparatus: string;
  capacity: number;
  instructor_id: number;
  instructor_name: string;
  room_id: number;
  room_name: string;
  starts_at: string;
  ends_at: string;
  series_id: number | null;
  cancelled: number | boolean;
  cancel_reason: string | null;
  performers_per_point: number;
  dynamic_factor: number | null;
  body_mass_kg: number | null;
}

/** No class lasts longer; overlap searches start this far back so they can use the start-time index. */
export const MAX_SESSION_MS = 8 * 3600_000;

function base(db: Db) {
  return db('sessions')
    .join('class_types', 'class_types.id', 'sessions.class_type_id')
    .join('rooms', 'rooms.id', 'sessions.room_id')
    .join('users', 'users.id', 'sessions.instructor_id')
    .select('sessions.*', 'class_types.name as class_name', 'class_types.apparatus', 'class_types.capacity', 'class_types.performers_per_point', 'class_types.dynamic_factor', 'class_types.body_mass_kg', 'rooms.name as room_name', 'users.name as instructor_name');
}

const APPARATUS_KINDS = ['fabric', 'hoop', 'trapeze', 'hammock', 'straps', 'rope'];

/** The apparatus mounted on points (by point id), for the given points or the given items. */
async function mountedApparatus(trx: Db, by: { pointIds?: number[]; gearIds?: number[] }): Promise<Map<number, { gearId: number; kind: string }>> {
  const q = trx('load_path_links').join('gear_items', 'gear_items.id', 'load_path_links.gear_id').whereIn('gear_items.kind', APPARATUS_KINDS).select('load_path_links.point_id', 'gear_items.id', 'gear_items.kind');
  if (by.pointIds) {
    if (!by.pointIds.length) return new Map();
    q.whereIn('load_path_links.point_id', [...new Set(by.pointIds)]);
  }
  if (by.gearIds) q.whereIn('gear_items.id', by.gearIds);
  const rows = (await q) as Array<{ point_id: number; id: number; kind: string }>;
  return new Map(rows.map((r) => [r.point_id, { gearId: r.id, kind: r.kind }]));
}

export function sessionsRepository(db: Db) {
  async function withPoints(rows: Row[], trx: Db): Promise<SessionRecord[]> {
    const links = rows.length ? ((await trx('session_points').whereIn('session_id', rows.map((r) => r.id)).orderBy('point_id').select('session_id', 'point_id')) as Array<{ session_id: number; point_id: number }>) : [];
    const byId = new Map<number, number[]>();
    for (const l of links) {
      const ids = byId.get(l.session_id);
      if (ids) ids.push(l.point_id);
      else byId.set(l.session_id, [l.point_id]);
    }
    const hung = rows.length ? ((await trx('session_apparatus').whereIn('session_id', rows.map((r) => r.id)).orderBy('point_id').select('session_id', 'point_id', 'gear_id')) as Array<{ session_id: number; point_id: number; gear_id: number }>) : [];
    const hungById = new Map<number, ApparatusChoice[]>();
    for (const h of hung) {
      const choice = { pointId: h.point_id, gearId: h.gear_id };
      const list = hungById.get(h.session_id);
      if (list) list.push(choice);
      else hungById.set(h.session_id, [choice]);
    }
    return rows.map((r) => ({
      id: r.id,
      classTypeId: r.class_type_id,
      className: r.class_name,
      apparatus: r.apparatus,
      capacity: r.capacity,
      instructorId: r.instructor_id,
      instructorName: r.instructor_name,
      roomId: r.room_id,
      roomName: r.room_name,
      startsAt: r.starts_at,
      endsAt: r.ends_at,
      seriesId: r.series_id,
      cancelled: Boolean(r.cancelled),
      cancelReason: r.cancel_reason,
      pointIds: byId.get(r.id) ?? [],
      performersPerPoint: r.performers_per_point,
      dynamicFactor: r.dynamic_factor,
      bodyMassKg: r.body_mass_kg,
      recordedApparatus: hungById.get(r.id) ?? [],
    }));
  }

  return {
    async list(q: { from: Date; to: Date; roomId?: number; instructorId?: number }, trx: Db = db) {
      const sel = base(trx)
        .where('sessions.starts_at', '<', q.to.toISOString())
        .where('sessions.starts_at', '>', new Date(q.from.getTime() - MAX_SESSION_MS).toISOString())
        .where('sessions.ends_at', '>', q.from.toISOString())
        .orderBy('sessions.starts_at');
      if (q.roomId) sel.where('sessions.room_id', q.roomId);
      if (q.instructorId) sel.where('sessions.instructor_id', q.instructorId);
      return withPoints((await sel) as Row[], trx);
    },
    async byId(id: number, trx: Db = db) {
      const row = (await base(trx).where('sessions.id', id).first()) as Row | undefined;
      return row ? (await withPoints([row], trx))[0] : null;
    },
    async bySeriesFrom(seriesId: number, fromStartsAt: string, trx: Db) {
      return withPoints((await base(trx).where('sessions.series_id', seriesId).where('sessions.starts_at', '>=', fromStartsAt).where('sessions.cancelled', false).orderBy('sessions.starts_at')) as Row[], trx);
    },
    /** Points among `pointIds` already in a live session overlapping [start, end). */
    async pointsBusy(pointIds: number[], start: Date, end: Date, excludeSessionIds: number[], trx: Db): Promise<Set<number>> {
      if (!pointIds.length) return new Set();
      const q = trx('session_points')
        .whereIn('point_id', pointIds)
        .where('cancelled', false)
        .where('starts_at', '<', end.toISOString())
        .where('starts_at', '>', new Date(start.getTime() - MAX_SESSION_MS).toISOString())
        .where('ends_at', '>', start.toISOString())
        .distinct('point_id');
      if (excludeSessionIds.length) q.whereNotIn('session_id', excludeSessionIds);
      return new Set(((await q) as Array<{ point_id: number }>).map((r) => r.point_id));
    },
    /** The instructor's first live session overlapping [start, end), if any: the clash named in words. */
    async instructorClash(instructorId: number, start: Date, end: Date, excludeSessionIds: number[], trx: Db): Promise<{ className: string; instructorName: string; roomName: string; startsAt: string; endsAt: string } | null> {
      const q = base(trx)
        .where({ 'sessions.instructor_id': instructorId, 'sessions.cancelled': false })
        .where('sessions.starts_at', '<', end.toISOString())
        .where('sessions.starts_at', '>', new Date(start.getTime() - MAX_SESSION_MS).toISOString())
        .where('sessions.ends_at', '>', start.toISOString())
        .orderBy('sessions.starts_at');
      if (excludeSessionIds.length) q.whereNotIn('sessions.id', excludeSessionIds);
      const row = (await q.first()) as Row | undefined;
      return row ? { className: row.class_name, instructorName: row.instructor_name, roomName: row.room_name, startsAt: row.starts_at, endsAt: row.ends_at } : null;
    },
    async insertSeries(rrule: string, at: Date, trx: Db) {
      const [row] = await trx('series').insert({ rrule, created_at: at.toISOString() }).returning('id');
      return (row as { id: number }).id;
    },
    async insert(s: { classTypeId: number; instructorId: number; roomId: number; startsAt: Date; endsAt: Date; seriesId: number | null; pointIds: number[]; apparatus: ApparatusChoice[] }, at: Date, trx: Db) {
      const [row] = await trx('sessions')
        .insert({
          class_type_id: s.classTypeId,
          instructor_id: s.instructorId,
          room_id: s.roomId,
          starts_at: s.startsAt.toISOString(),
          ends_at: s.endsAt.toISOString(),
          series_id: s.seriesId,
          occurrence_start: s.seriesId ? s.startsAt.toISOString() : null,
          cancelled: false,
          at_risk: false,
          created_at: at.toISOString(),
          updated_at: at.toISOString(),
        })
        .returning('id');
      const id = (row as { id: number }).id;
      await trx('session_points').insert(s.pointIds.map((p) => ({ session_id: id, point_id: p, starts_at: s.startsAt.toISOString(), ends_at: s.endsAt.toISOString(), cancelled: false })));
      if (s.apparatus.length) await trx('session_apparatus').insert(s.apparatus.map((a) => ({ session_id: id, point_id: a.pointId, gear_id: a.gearId, starts_at: s.startsAt.toISOString(), ends_at: s.endsAt.toISOString(), cancelled: false })));
      return id;
    },
    async update(id: number, patch: { startsAt?: Date; endsAt?: Date; instructorId?: number; roomId?: number; cancelled?: boolean; cancelReason?: string }, at: Date, trx: Db) {
      const row: Record<string, unknown> = { updated_at: at.toISOString() };
      const sp: Record<string, unknown> = {};
      if (patch.startsAt) row.starts_at = sp.starts_at = patch.startsAt.toISOString();
      if (patch.endsAt) row.ends_at = sp.ends_at = patch.endsAt.toISOString();
      if (patch.instructorId !== undefined) row.instructor_id = patch.instructorId;
      if (patch.roomId !== undefined) row.room_id = patch.roomId;
      if (patch.cancelled !== undefined) row.cancelled = sp.cancelled = patch.cancelled;
      if (patch.cancelReason !== undefined) row.cancel_reason = patch.cancelReason;
      await trx('sessions').where({ id }).update(row);
      if (Object.keys(sp).length) {
        await trx('session_points').where({ session_id: id }).update(sp);
        await trx('session_apparatus').where({ session_id: id }).update(sp);
      }
    },
    /** The kept result of an earlier request with this key, if any. */
    async idempotentResult(route: string, key: string, trx: Db) {
      const row = (await trx('idempotency_keys').where({ route, key }).first('actor_id', 'request_hash', 'result_json')) as { actor_id: number; request_hash: string; result_json: string } | undefined;
      return row ? { actorId: row.actor_id, requestHash: row.request_hash, result: JSON.parse(row.result_json) as unknown } : null;
    },
    async keepIdempotentResult(r: { route: string; key: string; actorId: number; requestHash: string; result: unknown }, at: Date, trx: Db) {
      await trx('idempotency_keys').insert({ route: r.route, key: r.key, actor_id: r.actorId, request_hash: r.requestHash, result_json: JSON.stringify(r.result), created_at: at.toISOString() });
    },
    async replacePoints(id: number, pointIds: number[], apparatus: ApparatusChoice[], startsAt: string, endsAt: string, trx: Db) {
      await trx('session_points').where({ session_id: id }).delete();
      await trx('session_points').insert(pointIds.map((p) => ({ session_id: id, point_id: p, starts_at: startsAt, ends_at: endsAt, cancelled: false })));
      await trx('session_apparatus').where({ session_id: id }).delete();
      if (apparatus.length) await trx('session_apparatus').insert(apparatus.map((a) => ({ session_id: id, point_id: a.pointId, gear_id: a.gearId, starts_at: startsAt, ends_at: endsAt, cancelled: false })));
    },
    /**
     * Of `gearIds`, the items (with the points) that hang for another live class overlapping [start, end): recorded for
     * it (unless its point now has an item of the class's kind mounted, which it uses instead), or
     * mounted on its point with the class of the item's kind.
     */
    async apparatusBusy(gearIds: number[], start: Date, end: Date, excludeSessionIds: number[], trx: Db): Promise<Map<number, Set<number>>> {
      // Item → the points it hangs on for those classes.
      const busy = new Map<number, Set<number>>();
      const add = (gearId: number, pointId: number) => busy.set(gearId, (busy.get(gearId) ?? new Set()).add(pointId));
      if (!gearIds.length) return busy;
      const overlapping = (q: Knex.QueryBuilder, table: string) =>
        q
          .where(`${table}.cancelled`, false)
          .where(`${table}.starts_at`, '<', end.toISOString())
          .where(`${table}.starts_at`, '>', new Date(start.getTime() - MAX_SESSION_MS).toISOString())
          .where(`${table}.ends_at`, '>', start.toISOString());
      const recordedQ = overlapping(
        trx('session_apparatus')
          .join('sessions', 'sessions.id', 'session_apparatus.session_id')
          .join('class_types', 'class_types.id', 'sessions.class_type_id')
          .whereIn('session_apparatus.gear_id', gearIds)
          .select('session_apparatus.session_id', 'session_apparatus.point_id', 'session_apparatus.gear_id', 'class_types.apparatus'),
        'session_apparatus',
      );
      if (excludeSessionIds.length) recordedQ.whereNotIn('session_apparatus.session_id', excludeSessionIds);
      const recorded = (await recordedQ) as Array<{ session_id: number; point_id: number; gear_id: number; apparatus: string }>;
      const mountedOn = await mountedApparatus(trx, { pointIds: recorded.map((r) => r.point_id) });
      for (const r of recorded) {
        const m = mountedOn.get(r.point_id);
        if (!(m && m.kind === r.apparatus && m.gearId !== r.gear_id)) add(r.gear_id, r.point_id);
      }
      const mounted = await mountedApparatus(trx, { gearIds });
      if (mounted.size) {
        const onPointsQ = overlapping(
          trx('session_points')
            .join('sessions', 'sessions.id', 'session_points.session_id')
            .join('class_types', 'class_types.id', 'sessions.class_type_id')
            .whereIn('session_points.point_id', [...mounted.keys()])
            .select('session_points.session_id', 'session_points.point_id', 'class_types.apparatus'),
          'session_points',
        );
        if (excludeSessionIds.length) onPointsQ.whereNotIn('session_points.session_id', excludeSessionIds);
        for (const r of (await onPointsQ) as Array<{ session_id: number; point_id: number; apparatus: string }>) {
          const m = mounted.get(r.point_id)!;
          if (m.kind === r.apparatus) add(m.gearId, r.point_id);
        }
      }
      return busy;
    },
  };
}
export type SessionsRepository = ReturnType<typeof sessionsRepository>;
