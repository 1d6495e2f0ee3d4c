import { TZDate } from '@date-fns/tz';
import { addDays, startOfDay } from 'date-fns';
import type { Db } from '../../db/knex';
import type { Clock } from '../../clock';
import type { StudioRepository } from '../studio/studio.repository';
import type { RigRepository } from '../rig/rig.repository';
import { freshSnapshots, type SnapshotSource } from '../rig/point-snapshots';
import { statusWire } from '../rig/rig.service';
import type { InspectionsRepository } from '../inspections/inspections.repository';
import { gearInspectionsNeeded, pointStatusAt, serviceLifeEnd, studioDay, type PointSnapshot } from '../../../shared/clearance';
import { apparatusWire, changeoversOf, hangingOf, loadRecorded, riskOf, type BookedClass } from '../sessions/session-rig';
import type { CurrentUser } from '../../http/auth';
import { deriveAt, noDerivedCache, type DerivedCache } from '../../db/derived-cache';
import { placesRepository } from '../places/places.repository';
import { studentsRepository } from '../students/students.repository';
import { summarise, unfitReasons } from '../places/session-places';
import { waiverStateAt } from '../../../shared/places';
import { unboundedWork, type HeavyWork } from '../../http/heavy-work';
import { todayRepository, type TodayRepository } from './today.repository';

/** The studio day [start, end) that contains `now`, in the studio's zone. */
export function studioDayRange(now: Date, timeZone: string) {
  const start = startOfDay(new TZDate(now.getTime(), timeZone));
  return { start: new Date(start.getTime()), end: new Date(addDays(start, 1).getTime()) };
}

export function todayService(deps: { db: Db; rig: RigRepository; studio: StudioRepository; inspections: InspectionsRepository; clock: Clock; derived?: DerivedCache; heavy?: HeavyWork; snapshots?: SnapshotSource; repo?: TodayRepository }) {
  const { db, rig, studio, inspections, clock } = deps;
  const repo = deps.repo ?? todayRepository(db);
  const snapshots = deps.snapshots ?? freshSnapshots(db, rig);
  const derived = deps.derived ?? noDerivedCache;
  const heavy = deps.heavy ?? unboundedWork;

  /** Worked out once per data version and kept while it holds (see server/db/derived-cache.ts). */
  async function compute(user: CurrentUser) {
    const { policy } = await studio.get();
    const now = clock.now();
    const { start, end } = studioDayRange(now, policy.timeZone);
    const sessions = await repo.sessionsOverlapping(start, end, user.role === 'instructor' ? user.id : undefined);
    const ids = sessions.map((s) => s.id);
    const bookedBySession = await repo.bookedPoints(ids);
    const hungBySession = await repo.recordedApparatus(ids);
    const classes = new Map<number, BookedClass>(
      sessions.map((s) => [
        s.id,
        {
          apparatus: s.apparatus,
          performersPerPoint: s.performers_per_point,
          dynamicFactor: s.dynamic_factor,
          bodyMassKg: s.body_mass_kg,
          pointIds: bookedBySession.get(s.id) ?? [],
          recordedApparatus: hungBySession.get(s.id) ?? [],
        },
      ]),
    );
    const bundles = await snapshots.load();
    const byId = new Map(bundles.map((b) => [b.point.id, b]));
    const recorded = await loadRecorded(rig, [...classes.values()], db);
    const preuse = await inspections.preuseOn(studioDay(now, policy.timeZone));
    // Each class's students (PRODUCT.md §11): who is on which point, whose waiver does not hold, who is without a fit place.
    const places = await placesRepository(db).liveForSessions(sessions.map((s) => s.id));
    const waivers = await studentsRepository(db).latestAcceptances([...places.values()].flat().map((p) => p.studentId));
    const pointView = (id: number, at: Date, snapshot: PointSnapshot = byId.get(id)!.snapshot) => {
      const b = byId.get(id)!;
      const due = !preuse.has(id);
      // `preuse_due` is the contract's word (PRODUCT.md §6.1); `preuseDue` is the client's.
      const status = pointStatusAt(snapshot, policy, at);
      // A point blocked by its gear is released by that item's own inspection, not the point's (§4.1).
      const gearToInspect = status.status === 'blocked' ? gearInspectionsNeeded(snapshot.links.map((l) => ({ gear: { ...l.gear, serviceLifeEndsOn: serviceLifeEnd(l.gear, policy.timeZone) } })), at) : [];
      return { pointId: id, label: b.point.label, roomName: b.point.roomName, ...statusWire(status), gearToInspect, preuseDue: due, preuse_due: due, lastPreuseAt: preuse.get(id) ?? null };
    };
    return deriveAt(policy, now, (track) => {
      // The studio day turns at midnight in the studio's zone: a new day, new sessions, pre-use due.
      track.instant(end);
      return {
        studioDay: studioDay(now, policy.timeZone),
        timeZone: policy.timeZone,
        sessions: sessions.map((s) => {
          const cls = classes.get(s.id)!;
          const startsAt = new Date(s.starts_at);
          const endsAt = new Date(s.ends_at);
          // Each point as it hangs for this class: its own apparatus, mounted or to be mounted (§4.7).
          const hung = hangingOf(cls, byId, recorded);
          track.session({ startsAt, endsAt, points: hung.map((h) => h.hanging.snapshot) });
          const risk = riskOf(cls, hung, policy, now, { startsAt, endsAt, cancelled: Boolean(s.cancelled) });
          const mine = places.get(s.id) ?? [];
          const labels = new Map(hung.map((h) => [h.bundle.point.id, h.bundle.point.label]));
          const seats = summarise({ cls, capacity: s.capacity, cancelled: Boolean(s.cancelled), labels, unfit: unfitReasons(cls, hung, policy, now, endsAt), places: mine });
          const waiverOk = (studentId: number) => {
            const w = waivers.get(studentId) ?? null;
            if (w) track.instant(new Date(w.validUntil));
            return waiverStateAt(w, startsAt > now ? startsAt : now) === 'valid';
          };
          return {
            id: s.id,
            className: s.class_name,
            apparatus: s.apparatus,
            roomId: s.room_id,
            roomName: s.room_name,
            instructorId: s.instructor_id,
            instructorName: s.instructor_name,
            startsAt: s.starts_at,
            endsAt: s.ends_at,
            cancelled: Boolean(s.cancelled),
            cancelReason: s.cancel_reason,
            atRisk: risk.atRisk,
            riskReasons: risk.reasons,
            // Each point's status at the session's start, or now once it has begun.
            points: hung.map((h) => pointView(h.bundle.point.id, startsAt > now ? startsAt : now, h.hanging.snapshot)),
            hanging: apparatusWire(hung),
            changeovers: !s.cancelled && startsAt > now ? changeoversOf(hung, startsAt, policy.timeZone, false) : [],
            capacity: seats.capacity,
            placesLeft: seats.placesLeft,
            booked: seats.booked,
            waitlisted: seats.waitlisted,
            withoutFitPlace: seats.withoutFitPlace,
            // The booked students (and those checked in), point by point; a student without a waiver is flagged before class.
            students: mine
              .filter((p) => p.status !== 'waitlisted')
              .map((p) => ({ bookingId: p.id, studentId: p.studentId, name: p.studentName, pointId: p.pointId, pointLabel: p.pointLabel, status: p.status, waiverOk: waiverOk(p.studentId), withoutFitPlace: seats.withoutFitPlace.some((w) => w.bookingId === p.id) })),
          };
        }),
        points: bundles.map((b) => {
          track.snapshot(b.snapshot);
          return pointView(b.point.id, now);
        }),
      };
    });
  }

  return {
    /** The signed-in instructor's sessions today (everyone's for the other roles), and every point's status now. */
    today: (user: CurrentUser) => derived.get(`today|${user.role === 'instructor' ? `instructor:${user.id}` : 'studio'}`, () => heavy.run(() => compute(user))),
  };
}
export type TodayService = ReturnType<typeof todayService>;
