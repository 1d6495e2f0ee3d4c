import { writeTransaction, type Db } from '../../db/knex';
import type { Clock } from '../../clock';
import { HttpError, conflict, notFound } from '../../http/errors';
import type { AuditRepository } from '../audit/audit.repository';
import type { StudioRepository } from '../studio/studio.repository';
import type { RigRepository } from '../rig/rig.repository';
import { loadSnapshots, type SnapshotBundle } from '../rig/point-snapshots';
import { hangingOf, loadRecorded } from '../sessions/session-rig';
import type { SessionChangeKind } from '../sessions/sessions.service';
import type { SessionRecord, SessionsRepository } from '../sessions/sessions.repository';
import type { StudentsRepository } from '../students/students.repository';
import { outboxRepository } from '../outbox/outbox.repository';
import { studentMessage, type StudentMailKind } from '../../mail/templates/student';
import { choosePoint, pointRefusal, studentMayCancel, waitlistOrder, waiverMissingWarning, waiverRefusal, waiverStateAt } from '../../../shared/places';
import type { BookingResult, CheckIn, CreateBooking, SessionBooking } from '../../../shared/schemas/places';
import type { Policy } from '../../../shared/schemas/policy';
import { UNDO_WINDOW_MS } from '../../../shared/schedule/undo';
import { HOLDS_PLACE, type PlaceRecord, type PlacesRepository } from './places.repository';
import { summarise, unfitReasons, type PlacesSummary } from './session-places';

/** Who acts on a place: a member of staff (`userId`), or a student on their own place (`studentId`, i17b's routes). */
export interface PlaceActor {
  userId: number | null;
  /** Set when a student acts on their own booking: the cut-off applies and another's place is "not found". */
  asStudentId?: number;
}

/** Check-in opens this long before the class starts (the class's day, in practice). */
export const CHECK_IN_OPENS_MS = 12 * 3_600_000;

const sameInstant = (a: string | Date, b: string | Date) => new Date(a).getTime() === new Date(b).getTime();

/** A booking as the desk reads it: the stored place, with what the caller worked out about it. */
function wireOf(p: PlaceRecord, found: Pick<SessionBooking, 'waiverOk' | 'position' | 'withoutFitPlace'>): SessionBooking {
  return { id: p.id, studentId: p.studentId, name: p.studentName, email: p.studentEmail, pointId: p.pointId, pointLabel: p.pointLabel, status: p.status, ...found, checkedInAt: p.checkedInAt };
}

export function placesService(deps: { db: Db; repo: PlacesRepository; students: StudentsRepository; sessions: SessionsRepository; rig: RigRepository; studio: StudioRepository; audit: AuditRepository; clock: Clock; undoWindowMs?: number }) {
  const { db, repo, students, sessions, rig, studio, audit, clock } = deps;
  const outbox = outboxRepository(db);
  const undoWindowMs = deps.undoWindowMs ?? UNDO_WINDOW_MS;

  async function sessionOrThrow(id: number, trx: Db = db): Promise<SessionRecord> {
    const s = await sessions.byId(id, trx);
    if (!s) throw notFound('That class');
    return s;
  }

  /** The class's places as the rig answers them now. */
  async function stateOf(s: SessionRecord, policy: Policy, now: Date, trx: Db = db): Promise<{ summary: PlacesSummary; places: PlaceRecord[] }> {
    const bundles = new Map<number, SnapshotBundle>(s.pointIds.length ? (await loadSnapshots(db, rig, { ids: s.pointIds }, trx)).map((b) => [b.point.id, b]) : []);
    const recorded = await loadRecorded(rig, [s], trx);
    const hung = hangingOf(s, bundles, recorded);
    const unfit = unfitReasons(s, hung, policy, now, new Date(s.endsAt));
    const places = await repo.forSession(s.id, trx);
    const labels = new Map([...bundles.values()].map((b) => [b.point.id, b.point.label]));
    return { summary: summarise({ cls: s, capacity: s.capacity, cancelled: s.cancelled, labels, unfit, places }), places };
  }

  /** Queues one message to a student, at most once per key. */
  async function tell(trx: Db, kind: StudentMailKind, key: string, to: { name: string; email: string }, s: { id: number; className: string; roomName: string; startsAt: string; endsAt: string }, extra: { waitlistPosition?: number | null; previous?: { startsAt: string; endsAt: string; roomName: string }; reason?: string | null; notBefore?: Date } = {}) {
    const { name: studioName, policy } = await studio.get(trx);
    const mail = studentMessage({ kind, studioName, timeZone: policy.timeZone, studentName: to.name, className: s.className, roomName: s.roomName, startsAt: s.startsAt, endsAt: s.endsAt, ...extra });
    return outbox.insert(trx, { kind, uniqueKey: key, to: [to.email], ...mail, sessionId: s.id, ...(extra.notBefore ? { notBefore: extra.notBefore } : {}) }, clock.now());
  }

  const positionOf = (places: PlaceRecord[], id: number) => waitlistOrder(places.filter((p) => p.status === 'waitlisted')).findIndex((p) => p.id === id) + 1;

  /**
   * Gives freed places to the waitlist, first waitlisted first, while the class has places left;
   * each student promoted is e-mailed once (`waitlist_place_offered`, keyed by their place).
   */
  async function promote(s: SessionRecord, policy: Policy, now: Date, actorId: number | null, trx: Db): Promise<number[]> {
    const promoted: number[] = [];
    if (s.cancelled || new Date(s.startsAt) <= now) return promoted;
    for (;;) {
      const { summary, places } = await stateOf(s, policy, now, trx);
      const [next] = waitlistOrder(places.filter((p) => p.status === 'waitlisted'));
      if (!next || summary.placesLeft <= 0) break;
      const pointId = choosePoint(summary.points, s.performersPerPoint, summary.capacity);
      if (pointId === null) break;
      await repo.update(next.id, { status: 'booked', pointId }, now, trx);
      await tell(trx, 'waitlist_place_offered', `waitlist_place_offered:${next.id}`, { name: next.studentName, email: next.studentEmail }, s);
      await audit.record(trx, { actorId, action: 'place.promoted', entity: 'place', entityId: next.id, before: { status: 'waitlisted' }, after: { status: 'booked', pointId, sessionId: s.id, studentId: next.studentId } }, now);
      promoted.push(next.id);
    }
    return promoted;
  }

  async function placeOrThrow(id: number, actor: PlaceActor, trx: Db): Promise<PlaceRecord> {
    const p = await repo.byId(id, trx);
    // A student asking about another's place learns nothing about it.
    if (!p || (actor.asStudentId !== undefined && p.studentId !== actor.asStudentId)) throw notFound('That booking');
    return p;
  }

  async function bookingWire(p: PlaceRecord, trx: Db = db): Promise<SessionBooking> {
    const latest = (await students.latestAcceptances([p.studentId], trx)).get(p.studentId) ?? null;
    const places = await repo.forSession(p.sessionId, trx);
    return wireOf(p, { waiverOk: waiverStateAt(latest, clock.now()) === 'valid', position: p.status === 'waitlisted' ? positionOf(places, p.id) : null, withoutFitPlace: false });
  }

  return {
    stateOf,

    /** `GET /api/sessions/:id/bookings`: booked (by point), then the waitlist in order, then the cancelled. */
    async listForSession(sessionId: number): Promise<SessionBooking[]> {
      const s = await sessionOrThrow(sessionId);
      const { policy } = await studio.get();
      const now = clock.now();
      const { summary, places } = await stateOf(s, policy, now);
      const waivers = await students.latestAcceptances(places.map((p) => p.studentId));
      const without = new Set(summary.withoutFitPlace.map((w) => w.bookingId));
      const waitlist = waitlistOrder(places.filter((p) => p.status === 'waitlisted'));
      const rank = (p: PlaceRecord) => (p.status === 'waitlisted' ? 1 : p.status === 'cancelled' ? 2 : 0);
      const at = new Date(s.startsAt) > now ? new Date(s.startsAt) : now;
      return [...places]
        .sort((a, b) => rank(a) - rank(b) || (a.status === 'waitlisted' ? waitlist.indexOf(a) - waitlist.indexOf(b) : (a.pointLabel ?? '~').localeCompare(b.pointLabel ?? '~') || a.id - b.id))
        .map((p) => wireOf(p, { waiverOk: waiverStateAt(waivers.get(p.studentId) ?? null, at) === 'valid', position: p.status === 'waitlisted' ? waitlist.indexOf(p) + 1 : null, withoutFitPlace: without.has(p.id) }));
    },

    /**
     * Books a student into a class (PRODUCT.md §11): on the point the desk names, or on a free place
     * of a point that can take the class; a full class waitlists (or, with `waitlist: false`, is
     * refused with `session_full`). Without a valid waiver at the class the booking stands, with
     * the warning `waiver_missing`. The student is e-mailed once.
     */
    async book(sessionId: number, body: CreateBooking, actor: PlaceActor): Promise<BookingResult> {
      const { policy } = await studio.get();
      return writeTransaction(db, async (trx) => {
        const now = clock.now();
        const s = await sessionOrThrow(sessionId, trx);
        const student = await students.byId(body.studentId, trx);
        if (!student || student.mergedIntoId !== null) throw new HttpError(400, 'invalid_request', 'That student does not exist.', { source: 'body', fields: { studentId: 'Pick a student' } });
        if (s.cancelled) throw conflict('session_cancelled', 'This class is cancelled, so no one can be booked into it.');
        if (new Date(s.startsAt) <= now) throw conflict('session_started', 'This class has already started, so no one can be booked into it.');
        const existing = await repo.liveFor(s.id, student.id, trx);
        if (existing) throw conflict('already_booked', `${student.name} is already ${existing.status === 'waitlisted' ? 'on the waitlist for' : 'booked into'} this class.`, { bookingId: existing.id, status: existing.status });
        const { summary, places } = await stateOf(s, policy, now, trx);
        let pointId: number | null = null;
        if (body.pointId !== undefined) {
          const point = summary.points.find((p) => p.pointId === body.pointId);
          const refusal = pointRefusal(point, s.performersPerPoint);
          const reasons = point && !point.usable ? summary.pointStudents.find((p) => p.pointId === point.pointId)!.reasons : refusal ? [refusal] : [];
          if (refusal) throw conflict('point_unavailable', refusal.message, { pointId: body.pointId, reasons });
          if (summary.placesLeft <= 0) throw conflict('session_full', 'This class is full: every place is taken.', { capacity: summary.capacity });
          pointId = body.pointId;
        } else if (summary.placesLeft > 0) {
          pointId = choosePoint(summary.points, s.performersPerPoint, summary.capacity);
        }
        if (pointId === null && body.waitlist === false) throw conflict('session_full', 'This class is full: every place is taken.', { capacity: summary.capacity, waitlisted: summary.waitlisted });
        const status = pointId === null ? 'waitlisted' : 'booked';
        const id = await repo.insert({ sessionId: s.id, studentId: student.id, pointId, status, bookedBy: actor.userId }, now, trx);
        const latest = (await students.latestAcceptances([student.id], trx)).get(student.id) ?? null;
        const warnings = waiverStateAt(latest, new Date(s.startsAt)) === 'valid' ? [] : [waiverMissingWarning(student.name)];
        const position = status === 'waitlisted' ? waitlistOrder([...places.filter((p) => p.status === 'waitlisted'), { id, waitlistedAt: now.toISOString() }]).length : undefined;
        await tell(trx, 'booking_confirmed', `booking_confirmed:${id}`, student, s, { waitlistPosition: position ?? null });
        await audit.record(trx, { actorId: actor.userId, action: status === 'booked' ? 'place.booked' : 'place.waitlisted', entity: 'place', entityId: id, after: { sessionId: s.id, studentId: student.id, pointId, status, byStudent: actor.asStudentId !== undefined } }, now);
        return { id, sessionId: s.id, studentId: student.id, status, pointId, ...(position ? { position } : {}), warnings };
      });
    },

    /**
     * Cancels a place: the desk any time before the class ends; a student on their own place up to
     * the policy's cut-off before it starts. A freed place goes to the first waitlisted student.
     */
    async cancel(placeId: number, actor: PlaceActor) {
      const { policy } = await studio.get();
      const id = await writeTransaction(db, async (trx) => {
        const now = clock.now();
        const p = await placeOrThrow(placeId, actor, trx);
        if (p.status === 'cancelled') throw conflict('already_cancelled', 'This booking is already cancelled.');
        if (p.status === 'attended' || p.status === 'no_show') throw conflict('already_checked_in', 'This student has been checked in, so the booking is part of the record.');
        const s = await sessionOrThrow(p.sessionId, trx);
        if (new Date(s.endsAt) <= now) throw conflict('session_over', 'This class is over, so its bookings are part of the record.');
        if (actor.asStudentId !== undefined && !studentMayCancel(new Date(s.startsAt), now, policy.studentCancelCutoffHours)) {
          throw conflict('cancel_cutoff_passed', `Places can be cancelled online up to ${policy.studentCancelCutoffHours} hours before class. Please contact the studio.`, { cutoffHours: policy.studentCancelCutoffHours });
        }
        await repo.update(p.id, { status: 'cancelled', cancelledAt: now.toISOString() }, now, trx);
        await audit.record(trx, { actorId: actor.userId, action: 'place.cancelled', entity: 'place', entityId: p.id, before: { status: p.status, pointId: p.pointId }, after: { status: 'cancelled', sessionId: s.id, studentId: p.studentId, byStudent: actor.asStudentId !== undefined } }, now);
        if (p.status === 'booked') await promote(s, policy, now, actor.userId, trx);
        return p.id;
      });
      return bookingWire((await repo.byId(id))!);
    },

    /** Marks a booked student attended or no-show; attended is refused until their waiver is valid. */
    async checkIn(placeId: number, body: CheckIn, actorId: number) {
      const id = await writeTransaction(db, async (trx) => {
        const now = clock.now();
        const p = await placeOrThrow(placeId, { userId: actorId }, trx);
        const s = await sessionOrThrow(p.sessionId, trx);
        if (s.cancelled) throw conflict('session_cancelled', 'This class is cancelled.');
        if (p.status === 'waitlisted' || p.status === 'cancelled') throw conflict('not_booked', `${p.studentName} is ${p.status === 'waitlisted' ? 'on the waitlist' : 'cancelled'}, not booked into this class.`);
        if (now.getTime() < new Date(s.startsAt).getTime() - CHECK_IN_OPENS_MS) throw conflict('check_in_not_open', 'Check-in opens on the day of the class.');
        if (body.outcome === 'attended') {
          const latest = (await students.latestAcceptances([p.studentId], trx)).get(p.studentId) ?? null;
          const state = waiverStateAt(latest, now);
          if (state !== 'valid') throw conflict('waiver_missing', waiverRefusal(state, p.studentName), { studentId: p.studentId, waiver: state });
        }
        await repo.update(p.id, { status: body.outcome, checkedInAt: now.toISOString() }, now, trx);
        await audit.record(trx, { actorId, action: 'place.checked_in', entity: 'place', entityId: p.id, before: { status: p.status }, after: { status: body.outcome, sessionId: s.id, studentId: p.studentId } }, now);
        return p.id;
      });
      return bookingWire((await repo.byId(id))!);
    },

    /** The desk moves one booked student to a free place on another point of the class that can take it. */
    async move(placeId: number, pointId: number, actorId: number) {
      const { policy } = await studio.get();
      const id = await writeTransaction(db, async (trx) => {
        const now = clock.now();
        const p = await placeOrThrow(placeId, { userId: actorId }, trx);
        if (p.status !== 'booked') throw conflict('not_booked', `Only a booked student can be moved; ${p.studentName} is ${p.status.replace('_', ' ')}.`);
        const s = await sessionOrThrow(p.sessionId, trx);
        if (s.cancelled) throw conflict('session_cancelled', 'This class is cancelled.');
        if (new Date(s.endsAt) <= now) throw conflict('session_over', 'This class is over.');
        if (p.pointId === pointId) throw conflict('same_point', `${p.studentName} is already on that point.`);
        const { summary } = await stateOf(s, policy, now, trx);
        const point = summary.points.find((x) => x.pointId === pointId);
        const refusal = pointRefusal(point, s.performersPerPoint);
        if (refusal) {
          const reasons = point && !point.usable ? summary.pointStudents.find((x) => x.pointId === pointId)!.reasons : [refusal];
          throw conflict('point_unavailable', refusal.message, { pointId, reasons });
        }
        await repo.update(p.id, { pointId }, now, trx);
        await audit.record(trx, { actorId, action: 'place.moved', entity: 'place', entityId: p.id, before: { pointId: p.pointId }, after: { pointId, sessionId: s.id, studentId: p.studentId } }, now);
        return p.id;
      });
      return bookingWire((await repo.byId(id))!);
    },

    /**
     * Told by the sessions service inside each change's transaction (with the instructor's notice):
     * students move with their point when points are swapped (a removed point's students go to the
     * point put in its place, in order; any left over to a free place, else without one — listed,
     * never dropped); students are e-mailed when their class moves or is cancelled.
     */
    async sessionChanged(trx: Db, change: { kind: SessionChangeKind; sessionId: number; before: SessionRecord; after: SessionRecord; at: Date }) {
      const { before, after, at } = change;
      const removed = before.pointIds.filter((id) => !after.pointIds.includes(id));
      const added = after.pointIds.filter((id) => !before.pointIds.includes(id));
      if (removed.length) {
        for (const [i, from] of removed.entries()) {
          if (i < added.length) await repo.movePoint(after.id, from, added[i], at, trx);
        }
        const left = (await repo.forSession(after.id, trx)).filter((p) => HOLDS_PLACE.includes(p.status) && p.pointId !== null && removed.includes(p.pointId));
        if (left.length) {
          const { policy } = await studio.get(trx);
          for (const p of left) {
            const { summary } = await stateOf(after, policy, at, trx);
            const to = choosePoint(summary.points, after.performersPerPoint, Number.MAX_SAFE_INTEGER);
            await repo.update(p.id, { pointId: to }, at, trx);
          }
        }
        await audit.record(trx, { actorId: null, action: 'places.followed_points', entity: 'session', entityId: after.id, before: { pointIds: before.pointIds }, after: { pointIds: after.pointIds } }, at);
      }
      // More points can mean more places: they go to the waitlist in order, as a cancellation's do.
      if (change.kind !== 'cancelled' && (added.length || removed.length)) await promote(after, (await studio.get(trx)).policy, at, null, trx);
      if (change.kind !== 'moved' && change.kind !== 'room_changed' && change.kind !== 'cancelled') return;
      const live = (await repo.forSession(after.id, trx)).filter((p) => p.status === 'booked' || p.status === 'waitlisted');
      if (change.kind === 'cancelled') {
        for (const p of live) await tell(trx, 'class_cancelled_student', `class_cancelled_student:${after.id}:${p.studentId}`, { name: p.studentName, email: p.studentEmail }, after, { reason: after.cancelReason });
        return;
      }
      // A move waits out the desk's undo window like the instructor's notice: a later move within it
      // replaces the waiting message (told from the first time), a move back sends nothing.
      let previous = { startsAt: before.startsAt, endsAt: before.endsAt, roomId: before.roomId, roomName: before.roomName };
      const prefix = `class_moved_student:${after.id}:`;
      const waiting = await outbox.waitingWithPrefix(prefix, at, trx);
      if (waiting.length) {
        const m = waiting[0].uniqueKey.match(/:from:([^/]+)\/([^/]+)\/r(\d+)$/);
        await outbox.skipWaiting(waiting.map((w) => w.id), 'Not sent: the class was moved again within the undo window.', trx);
        if (m) previous = { startsAt: m[1], endsAt: m[2], roomId: Number(m[3]), roomName: (await rig.roomById(Number(m[3]), trx))?.name ?? before.roomName };
      }
      if (sameInstant(previous.startsAt, after.startsAt) && sameInstant(previous.endsAt, after.endsAt) && previous.roomId === after.roomId) return;
      const notBefore = change.kind === 'moved' && undoWindowMs > 0 ? new Date(at.getTime() + undoWindowMs) : undefined;
      for (const p of live) {
        const key = `${prefix}${p.studentId}:${at.toISOString()}:from:${new Date(previous.startsAt).toISOString()}/${new Date(previous.endsAt).toISOString()}/r${previous.roomId}`;
        await tell(trx, 'class_moved_student', key, { name: p.studentName, email: p.studentEmail }, after, { previous, notBefore });
      }
    },
  };
}
export type PlacesService = ReturnType<typeof placesService>;
