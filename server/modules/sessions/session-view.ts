import type { ApparatusBundle, SnapshotBundle } from '../rig/point-snapshots';
import { apparatusWire, changeoversOf, classOnPoint, hangingOf, riskOf } from './session-rig';
import { statusWire } from '../rig/rig.service';
import { placesFromRecords, pointStatusAt, pointStatusOver, type ValidityTracker } from '../../../shared/clearance';
import type { Policy } from '../../../shared/schemas/policy';
import type { SessionRecord } from './sessions.repository';
import type { SessionPointRecord } from './session-records';
import type { PlaceRecord } from '../places/places.repository';
import { summarise, unfitReasons } from '../places/session-places';

/** What one view needs besides the session, loaded once for every session of a request. */
export interface ViewContext {
  bundles: Map<number, SnapshotBundle>;
  recorded: Map<number, ApparatusBundle>;
  policy: Policy;
  now: Date;
  track?: ValidityTracker;
  /** The kept records of the sessions that have started (PRODUCT.md §10). */
  kept?: Map<number, SessionPointRecord[]>;
  /**
   * The live places of each session (PRODUCT.md §11), when the view carries its places figures:
   * capacity, places left, booked, waitlisted, without a fit place (and, with `pointStudents`,
   * the students on each point).
   */
  live?: Map<number, PlaceRecord[]>;
  pointStudents?: boolean;
}

/**
 * The wire view: each point's status at the session's time as it hangs for the class, at risk,
 * changeovers, places. A class that has started shows what was kept at its start (PRODUCT.md §10),
 * never today's status: its points and what hung on them come from the record.
 *
 * The places figures are worked out here, from the points as they hang (the same `hung` as the
 * statuses), so a calendar range is one pass with everything loaded once; they answer as the rig
 * stands now (`unfitReasons`), also for a class under way, as the places service does.
 */
export function sessionView(s: SessionRecord, c: ViewContext) {
  const { policy, now } = c;
  const startsAt = new Date(s.startsAt);
  const endsAt = new Date(s.endsAt);
  const at = startsAt > now ? startsAt : now;
  const hung = hangingOf(s, c.bundles, c.recorded);
  c.track?.session({ startsAt, endsAt, points: hung.map((h) => h.hanging.snapshot) });
  const cls = classOnPoint(s, policy);
  const risk = riskOf(s, hung, policy, now, { startsAt, endsAt, cancelled: s.cancelled }, cls);
  const live = !s.cancelled && endsAt > now;
  const inspectionDue = live && hung.some((h) => pointStatusOver(h.hanging.snapshot, policy, at, endsAt).dueBeforeEnd.length > 0);
  const record = wireRecord(s);
  const placeFigures = c.live ? placesOf(s, c, hung, cls) : {};
  if (startsAt <= now) {
    const records = (c.kept?.get(s.id) ?? []).filter((r) => r.startsAt === s.startsAt);
    const points = records.map((r) => ({ pointId: r.pointId, label: r.label, status: r.status, clearedUntil: r.clearedUntil, reasons: r.reasons, apparatus: r.apparatus, recordedAt: r.recordedAt }));
    const hanging = records.map((r) => ({ pointId: r.pointId, gearId: r.apparatus?.gearId ?? null, kind: r.apparatus?.kind ?? null, serial: r.apparatus?.serial ?? null, mounted: r.apparatus !== null }));
    return { ...record, points, hanging, changeovers: [], atRisk: risk.atRisk, riskReasons: risk.reasons, inspectionDue, places: placesFromRecords(records, s.capacity, s.cancelled), recordedAtStart: true, ...placeFigures };
  }
  const points = hung.map((h) => ({ pointId: h.bundle.point.id, label: h.bundle.point.label, ...statusWire(pointStatusAt(h.hanging.snapshot, policy, at)) }));
  const placeCount = s.cancelled ? 0 : Math.min(s.capacity, points.filter((p) => p.status !== 'blocked').length);
  const changeovers = !s.cancelled ? changeoversOf(hung, startsAt, policy.timeZone, true) : [];
  return { ...record, points, hanging: apparatusWire(hung), changeovers, atRisk: risk.atRisk, riskReasons: risk.reasons, inspectionDue, places: placeCount, recordedAtStart: false, ...placeFigures };
}

/**
 * The session's own fields for the wire: all but the apparatus recorded at booking, which the view
 * answers as `hanging`. Copied field by field: an object rest that leaves a key out is a slow
 * runtime copy, and a range builds hundreds of these.
 */
function wireRecord(s: SessionRecord) {
  return {
    id: s.id,
    classTypeId: s.classTypeId,
    className: s.className,
    apparatus: s.apparatus,
    capacity: s.capacity,
    instructorId: s.instructorId,
    instructorName: s.instructorName,
    roomId: s.roomId,
    roomName: s.roomName,
    startsAt: s.startsAt,
    endsAt: s.endsAt,
    seriesId: s.seriesId,
    cancelled: s.cancelled,
    cancelReason: s.cancelReason,
    pointIds: s.pointIds,
    performersPerPoint: s.performersPerPoint,
    dynamicFactor: s.dynamicFactor,
    bodyMassKg: s.bodyMassKg,
  } satisfies Omit<SessionRecord, 'recordedApparatus'>;
}

/** The class's places as the rig answers them now: the places service's summary, from the points already hung. */
function placesOf(s: SessionRecord, c: ViewContext, hung: ReturnType<typeof hangingOf>, cls: ReturnType<typeof classOnPoint>) {
  const unfit = unfitReasons(s, hung, c.policy, c.now, new Date(s.endsAt), cls);
  const labels = new Map(hung.map((h) => [h.bundle.point.id, h.bundle.point.label]));
  const { capacity, placesLeft, booked, waitlisted, withoutFitPlace, pointStudents } = summarise({ cls: s, capacity: s.capacity, cancelled: s.cancelled, labels, unfit, places: c.live?.get(s.id) ?? [] });
  return c.pointStudents ? { capacity, placesLeft, booked, waitlisted, withoutFitPlace, pointStudents } : { capacity, placesLeft, booked, waitlisted, withoutFitPlace };
}
