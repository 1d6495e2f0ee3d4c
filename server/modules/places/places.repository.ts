import type { Db } from '../../db/knex';
import type { PlaceStatus } from '../../../shared/schemas/vocabulary';

/** One student's place in one class (PRODUCT.md §11), with the names the lists show. */
export interface PlaceRecord {
  id: number;
  sessionId: number;
  studentId: number;
  studentName: string;
  studentEmail: string;
  pointId: number | null;
  pointLabel: string | null;
  status: PlaceStatus;
  waitlistedAt: string | null;
  bookedBy: number | null;
  cancelledAt: string | null;
  checkedInAt: string | null;
  createdAt: string;
  updatedAt: string;
}

interface Row {
  id: number;
  session_id: number;
  student_id: number;
  student_name: string;
  student_email: string;
  point_id: number | null;
  point_label: string | null;
  status: PlaceStatus;
  waitlisted_at: string | null;
  booked_by: number | null;
  cancelled_at: string | null;
  checked_in_at: string | null;
  created_at: string;
  updated_at: string;
}
const toPlace = (r: Row): PlaceRecord => ({
  id: r.id,
  sessionId: r.session_id,
  studentId: r.student_id,
  studentName: r.student_name,
  studentEmail: r.student_email,
  pointId: r.point_id,
  pointLabel: r.point_label,
  status: r.status,
  waitlistedAt: r.waitlisted_at,
  bookedBy: r.booked_by,
  cancelledAt: r.cancelled_at,
  checkedInAt: r.checked_in_at,
  createdAt: r.created_at,
  updatedAt: r.updated_at,
});

/** Statuses that hold a place on a point (a student who came or did not still had the place). */
export const HOLDS_PLACE: PlaceStatus[] = ['booked', 'attended', 'no_show'];
/** Statuses of a live booking (anything but cancelled). */
export const LIVE: PlaceStatus[] = ['booked', 'waitlisted', 'attended', 'no_show'];

export interface PlaceCounts {
  booked: number;
  waitlisted: number;
}

export function placesRepository(db: Db) {
  const base = (trx: Db) =>
    trx('places')
      .join('students', 'students.id', 'places.student_id')
      .leftJoin('points', 'points.id', 'places.point_id')
      .select('places.*', 'students.name as student_name', 'students.email as student_email', 'points.label as point_label');

  return {
    async byId(id: number, trx: Db = db): Promise<PlaceRecord | null> {
      const r = await base(trx).where('places.id', id).first();
      return r ? toPlace(r) : null;
    },
    /** Every place of a class, oldest first. */
    async forSession(sessionId: number, trx: Db = db): Promise<PlaceRecord[]> {
      return ((await base(trx).where('places.session_id', sessionId).orderBy('places.id')) as Row[]).map(toPlace);
    },
    /** The live places of these classes (not cancelled), by class. */
    async liveForSessions(sessionIds: number[], trx: Db = db): Promise<Map<number, PlaceRecord[]>> {
      const out = new Map<number, PlaceRecord[]>();
      if (!sessionIds.length) return out;
      const rows = ((await base(trx).whereIn('places.session_id', [...new Set(sessionIds)]).whereIn('places.status', LIVE).orderBy('places.id')) as Row[]).map(toPlace);
      for (const r of rows) out.set(r.sessionId, [...(out.get(r.sessionId) ?? []), r]);
      return out;
    },
    /** The student's live place in the class, if any. */
    async liveFor(sessionId: number, studentId: number, trx: Db = db): Promise<PlaceRecord | null> {
      const r = await base(trx).where({ 'places.session_id': sessionId, 'places.student_id': studentId }).whereIn('places.status', LIVE).first();
      return r ? toPlace(r) : null;
    },
    /** A student's places with their classes, newest class first. */
    async forStudent(studentId: number, trx: Db = db) {
      const rows = await trx('places')
        .join('sessions', 'sessions.id', 'places.session_id')
        .join('class_types', 'class_types.id', 'sessions.class_type_id')
        .leftJoin('points', 'points.id', 'places.point_id')
        .where('places.student_id', studentId)
        .orderBy('sessions.starts_at', 'desc')
        .orderBy('places.id', 'desc')
        .select('places.*', 'points.label as point_label', 'sessions.starts_at', 'sessions.ends_at', 'sessions.cancelled as session_cancelled', 'class_types.name as class_name', 'class_types.apparatus');
      return rows.map((r: Row & { starts_at: string; ends_at: string; session_cancelled: number | boolean; class_name: string; apparatus: string }) => ({
        ...toPlace({ ...r, student_name: '', student_email: '' }),
        startsAt: r.starts_at,
        endsAt: r.ends_at,
        sessionCancelled: Boolean(r.session_cancelled),
        className: r.class_name,
        apparatus: r.apparatus,
      }));
    },
    async insert(p: { sessionId: number; studentId: number; pointId: number | null; status: PlaceStatus; bookedBy: number | null }, at: Date, trx: Db = db): Promise<number> {
      const now = at.toISOString();
      const [row] = await trx('places')
        .insert({
          session_id: p.sessionId,
          student_id: p.studentId,
          point_id: p.pointId,
          status: p.status,
          waitlisted_at: p.status === 'waitlisted' ? now : null,
          booked_by: p.bookedBy,
          created_at: now,
          updated_at: now,
        })
        .returning('id');
      return (row as { id: number }).id;
    },
    async update(id: number, patch: { status?: PlaceStatus; pointId?: number | null; cancelledAt?: string | null; checkedInAt?: string | null; studentId?: number }, at: Date, trx: Db = db): Promise<void> {
      const set: Record<string, unknown> = { updated_at: at.toISOString() };
      if (patch.status !== undefined) set.status = patch.status;
      if (patch.pointId !== undefined) set.point_id = patch.pointId;
      if (patch.cancelledAt !== undefined) set.cancelled_at = patch.cancelledAt;
      if (patch.checkedInAt !== undefined) set.checked_in_at = patch.checkedInAt;
      if (patch.studentId !== undefined) set.student_id = patch.studentId;
      await trx('places').where({ id }).update(set);
    },
    /** Places held on a point in these classes move to another point (a swap moves students with their point). */
    async movePoint(sessionId: number, fromPointId: number, toPointId: number | null, at: Date, trx: Db = db): Promise<number> {
      return trx('places').where({ session_id: sessionId, point_id: fromPointId }).whereIn('status', HOLDS_PLACE).update({ point_id: toPointId, updated_at: at.toISOString() });
    },
    /** Booked and waitlisted counts per class. */
    async counts(sessionIds: number[], trx: Db = db): Promise<Map<number, PlaceCounts>> {
      const out = new Map<number, PlaceCounts>();
      if (!sessionIds.length) return out;
      const rows = (await trx('places').whereIn('session_id', [...new Set(sessionIds)]).whereIn('status', LIVE).groupBy('session_id', 'status').select('session_id', 'status').count({ n: '*' })) as Array<{ session_id: number; status: PlaceStatus; n: number }>;
      for (const r of rows) {
        const c = out.get(r.session_id) ?? { booked: 0, waitlisted: 0 };
        if (r.status === 'waitlisted') c.waitlisted += Number(r.n);
        else c.booked += Number(r.n);
        out.set(r.session_id, c);
      }
      return out;
    },
    /** Classes attended by a student. */
    async attendedCount(studentId: number, trx: Db = db): Promise<number> {
      const [row] = (await trx('places').where({ student_id: studentId, status: 'attended' }).count({ n: '*' })) as Array<{ n: number }>;
      return Number(row?.n ?? 0);
    },
  };
}
export type PlacesRepository = ReturnType<typeof placesRepository>;
