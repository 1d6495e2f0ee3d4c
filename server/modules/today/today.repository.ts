import type { Db } from '../../db/knex';

/** A class of the studio day as Today shows it: the session with its type's load figures, room and instructor. */
export interface TodaySessionRow {
  id: number;
  starts_at: string;
  ends_at: string;
  cancelled: number | boolean;
  cancel_reason: string | null;
  class_name: string;
  apparatus: string;
  capacity: number;
  performers_per_point: number;
  dynamic_factor: number | null;
  body_mass_kg: number | null;
  room_name: string;
  room_id: number;
  instructor_id: number;
  instructor_name: string;
}

/** The reads behind Today (the points themselves come from the rig's snapshots). */
export function todayRepository(db: Db) {
  return {
    /** Every class overlapping [start, end), in start order; only one instructor's when `instructorId` is given. */
    async sessionsOverlapping(start: Date, end: Date, instructorId?: number): Promise<TodaySessionRow[]> {
      const q = db('sessions')
        .join('class_types', 'class_types.id', 'sessions.class_type_id')
        .join('rooms', 'rooms.id', 'sessions.room_id')
        .join('users', 'users.id', 'sessions.instructor_id')
        .where('sessions.starts_at', '<', end.toISOString())
        .where('sessions.ends_at', '>', start.toISOString())
        .orderBy('sessions.starts_at')
        .select('sessions.*', 'class_types.name as class_name', 'class_types.apparatus', 'class_types.capacity', 'class_types.performers_per_point', 'class_types.dynamic_factor', 'class_types.body_mass_kg', 'rooms.name as room_name', 'users.name as instructor_name');
      if (instructorId !== undefined) q.where('sessions.instructor_id', instructorId);
      return (await q) as TodaySessionRow[];
    },
    /** Each session's booked points. */
    async bookedPoints(sessionIds: number[]): Promise<Map<number, number[]>> {
      const out = new Map<number, number[]>();
      if (!sessionIds.length) return out;
      const rows = (await db('session_points').whereIn('session_id', sessionIds).select('session_id', 'point_id')) as Array<{ session_id: number; point_id: number }>;
      for (const r of rows) {
        const list = out.get(r.session_id);
        if (list) list.push(r.point_id);
        else out.set(r.session_id, [r.point_id]);
      }
      return out;
    },
    /** Each session's apparatus recorded per point (PRODUCT.md §4.7). */
    async recordedApparatus(sessionIds: number[]): Promise<Map<number, Array<{ pointId: number; gearId: number }>>> {
      const out = new Map<number, Array<{ pointId: number; gearId: number }>>();
      if (!sessionIds.length) return out;
      const rows = (await db('session_apparatus').whereIn('session_id', sessionIds).select('session_id', 'point_id', 'gear_id')) as Array<{ session_id: number; point_id: number; gear_id: number }>;
      for (const r of rows) {
        const choice = { pointId: r.point_id, gearId: r.gear_id };
        const list = out.get(r.session_id);
        if (list) list.push(choice);
        else out.set(r.session_id, [choice]);
      }
      return out;
    },
  };
}
export type TodayRepository = ReturnType<typeof todayRepository>;
