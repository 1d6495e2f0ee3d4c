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
}

/** No class lasts longer; overlap searches start this far back so they can use the start-time index. */
export const MAX_SESSION_MS = 8 * 3600_000;

function base(db: Db) {
  return db('sessions')
    .join('class_types', 'class_types.id', 'sessions.class_type_id')
    .join('rooms', 'rooms.id', 'sessions.room_id')
    .join('users', 'users.id', 'sessions.instructor_id')
    .select('sessions.*', 'class_types.name as class_name', 'class_types.apparatus', 'class_types.capacity', 'rooms.name as room_name', 'users.name as instructor_name');
}

export function sessionsRepository(db: Db) {
  async function withPoints(rows: Row[], trx: Db): Promise<SessionRecord[]> {
    const links = rows.length ? ((await trx('session_points').whereIn('session_id', rows.map((r) => r.id)).orderBy('point_id').select('session_id', 'point_id')) as Array<{ session_id: number; point_id: number }>) : [];
    const byId = new Map<number, number[]>();
    for (const l of links) byId.set(l.session_id, [...(byId.get(l.session_id) ?? []), l.point_id]);
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
    async instructorBusy(instructorId: number, start: Date, end: Date, excludeSessionIds: number[], trx: Db): Promise<boolean> {
      const q = trx('sessions')
        .where({ instructor_id: instructorId, cancelled: false })
        .where('starts_at', '<', end.toISOString())
        .where('starts_at', '>', new Date(start.getTime() - MAX_SESSION_MS).toISOString())
        .where('ends_at', '>', start.toISOString());
      if (excludeSessionIds.length) q.whereNotIn('id', excludeSessionIds);
      return Boolean(await q.first('id'));
    },
    async insertSeries(rrule: string, at: Date, trx: Db) {
      const [row] = await trx('series').insert({ rrule, created_at: at.toISOString() }).returning('id');
      return (row as { id: number }).id;
    },
    async insert(s: { classTypeId: number; instructorId: number; roomId: number; startsAt: Date; endsAt: Date; seriesId: number | null; pointIds: number[] }, at: Date, trx: Db) {
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
      if (Object.keys(sp).length) await trx('session_points').where({ session_id: id }).update(sp);
    },
    async replacePoints(id: number, pointIds: number[], startsAt: string, endsAt: string, trx: Db) {
      await trx('session_points').where({ session_id: id }).delete();
      await trx('session_points').insert(pointIds.map((p) => ({ session_id: id, point_id: p, starts_at: startsAt, ends_at: endsAt, cancelled: false })));
    },
  };
}
export type SessionsRepository = ReturnType<typeof sessionsRepository>;
