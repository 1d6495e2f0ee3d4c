import { classFitReasons, noApparatusReason, pointStatusAt, pointStatusOver, type ClassOnPoint, type Reason } from '../../../shared/clearance';
import { sessionCapacity, type PointPlaces } from '../../../shared/places';
import type { Policy } from '../../../shared/schemas/policy';
import type { ApparatusKind } from '../../../shared/schemas/vocabulary';
import { classOnPoint, type BookedClass, type HungPoint } from '../sessions/session-rig';
import { HOLDS_PLACE, type PlaceRecord } from './places.repository';

/*
 * A class's places as the rig answers them now (PRODUCT.md §11): which of its points can take the
 * class, how many students it takes, and who is without a fit place. Shared by the places service,
 * the session view, Today and the at-risk alert, so all of them tell the same story.
 */

/**
 * Why a booked point cannot take the class's students now, per point (empty: it can): blocked now
 * for any reason (a fault, a lapsed clearance, retired or quarantined gear, a rule), blocked during
 * the class for a reason known now (gear reaching its service life), or failing the class on it as
 * it hangs (§4.6: load check, apparatus kind, performers), or with no apparatus to hang. A clearance
 * merely running out before the class is not a reason here: the rigger has until then.
 */
export function unfitReasons(c: BookedClass, hung: HungPoint[], policy: Policy, now: Date, endsAt: Date, cls: ClassOnPoint = classOnPoint(c, policy)): Map<number, Reason[]> {
  const out = new Map<number, Reason[]>();
  for (const id of c.pointIds) out.set(id, [{ code: 'point_missing', message: 'This point is no longer in the register.' }]);
  for (const h of hung) {
    const snap = h.hanging.snapshot;
    const reasons: Reason[] = [];
    const nowStatus = pointStatusAt(snap, policy, now);
    if (nowStatus.status === 'blocked') reasons.push(...nowStatus.reasons);
    if (endsAt > now) reasons.push(...pointStatusOver(snap, policy, now, endsAt).blockedReasons);
    reasons.push(...classFitReasons(snap, policy, cls));
    if (h.hanging.apparatus === null) reasons.push(noApparatusReason(h.bundle.point, c.apparatus as ApparatusKind));
    const seen = new Set<string>();
    out.set(
      h.bundle.point.id,
      reasons.filter((r) => (seen.has(r.message) ? false : (seen.add(r.message), true))),
    );
  }
  return out;
}

export interface PlacesSummary {
  capacity: number;
  placesLeft: number;
  booked: number;
  waitlisted: number;
  withoutFitPlace: Array<{ bookingId: number; studentId: number; name: string; pointId: number | null }>;
  /** Each point of the class with its places, whether it can take the class and who is on it. */
  pointStudents: Array<{ pointId: number; label: string; places: number; usable: boolean; reasons: Reason[]; students: Array<{ bookingId: number; studentId: number; name: string; status: PlaceRecord['status'] }> }>;
  /** The points as placing sees them. */
  points: PointPlaces[];
}

/**
 * The places of a class: capacity (the lesser of the class's capacity and performersPerPoint × the
 * points that can take it), how many are booked and waitlisted, places left, and every booked
 * student whose point cannot take the class or who has no point — "without a fit place".
 */
export function summarise(a: { cls: BookedClass; capacity: number; cancelled: boolean; labels: Map<number, string>; unfit: Map<number, Reason[]>; places: PlaceRecord[] }): PlacesSummary {
  const { cls } = a;
  const live = a.places.filter((p) => p.status !== 'cancelled');
  const holding = live.filter((p) => HOLDS_PLACE.includes(p.status));
  const points: PointPlaces[] = cls.pointIds.map((pointId) => ({
    pointId,
    label: a.labels.get(pointId) ?? `#${pointId}`,
    usable: (a.unfit.get(pointId) ?? []).length === 0,
    taken: holding.filter((p) => p.pointId === pointId).length,
  }));
  const capacity = sessionCapacity({ classCapacity: a.capacity, performersPerPoint: cls.performersPerPoint, usablePoints: points.filter((p) => p.usable).length, cancelled: a.cancelled });
  const usableIds = new Set(points.filter((p) => p.usable).map((p) => p.pointId));
  const withoutFitPlace = holding
    .filter((p) => p.status === 'booked' && (p.pointId === null || !usableIds.has(p.pointId)))
    .map((p) => ({ bookingId: p.id, studentId: p.studentId, name: p.studentName, pointId: p.pointId }));
  return {
    capacity,
    // Students without a fit place still count: the places left are kept for them to be moved to.
    placesLeft: Math.max(0, capacity - holding.length),
    booked: holding.length,
    waitlisted: live.filter((p) => p.status === 'waitlisted').length,
    withoutFitPlace,
    pointStudents: points.map((p) => ({
      pointId: p.pointId,
      label: p.label,
      places: cls.performersPerPoint,
      usable: p.usable,
      reasons: a.unfit.get(p.pointId) ?? [],
      students: holding.filter((h) => h.pointId === p.pointId).map((h) => ({ bookingId: h.id, studentId: h.studentId, name: h.studentName, status: h.status })),
    })),
    points,
  };
}
