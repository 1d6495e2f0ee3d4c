import { checkLoadPath } from '../rigging';
import type { LoadProfile } from '../rigging/types';
import type { Policy } from '../schemas/policy';
import type { ApparatusKind } from '../schemas/vocabulary';
import { addStudioDays, pointStatusAt, pointStatusOver, splitPath } from './status';
import { noApparatusReason } from './apparatus';
import { snapshotMemo } from './memo';
import type { PointSnapshot, Reason } from './types';
import { reasonCodes } from './types';

export interface BookingSession extends ClassOnPoint {
  startsAt: Date;
  endsAt: Date;
}

export interface BookingInput {
  point: PointSnapshot;
  policy: Policy;
  now: Date;
  session: BookingSession;
  /** The caller knows the calendar: whether the point is in an overlapping session. */
  pointBookedElsewhere: boolean;
}

export interface BookingCheck {
  /** Every reason the point cannot take the session; empty when it can. */
  reasons: Reason[];
  /** Bookable, but someone has work to do first (`inspection_due`). */
  warnings: Reason[];
}

function addOnce(list: Reason[], reason: Reason): void {
  if (!list.some((r) => r.code === reason.code && r.message === reason.message)) list.push(reason);
}

function performers(n: number): string {
  return n === 1 ? '1 performer' : `${n} performers`;
}

/** What a class asks of each of its points: its apparatus kind, performers per point, load profile. */
export interface ClassOnPoint {
  apparatus: ApparatusKind;
  performersPerPoint: number;
  profile: LoadProfile;
}

const fitMemo = snapshotMemo<Map<string, Reason[]>>();

/**
 * The booking rules of §4.4 that ask whether the point, as it hangs for the class, can take the
 * class at all: `apparatus_not_allowed`, `too_many_performers`, `load_check_failed`. They do not
 * depend on the time, and §4.6 asks them again of every booked class whenever the rig or the
 * policy changes.
 */
export function classFitReasons(point: PointSnapshot, policy: Policy, cls: ClassOnPoint): Reason[] {
  const key = `${cls.apparatus}|${cls.performersPerPoint}|${cls.profile.performers}|${cls.profile.bodyMassKg}|${cls.profile.dynamicFactor}|${policy.requiredFactor}|${policy.units}`;
  const byClass = fitMemo(point, policy, () => new Map());
  let found = byClass.get(key);
  if (!found) byClass.set(key, (found = classFitUncached(point, policy, cls)));
  return found;
}

function classFitUncached(point: PointSnapshot, policy: Policy, session: ClassOnPoint): Reason[] {
  const reasons: Reason[] = [];
  if (!point.apparatus.includes(session.apparatus)) {
    const allowed = point.apparatus.length > 0 ? point.apparatus.join(', ') : 'none';
    addOnce(reasons, {
      code: reasonCodes.apparatusNotAllowed,
      message: `Point ${point.label} does not allow ${session.apparatus} (allowed: ${allowed})`,
    });
  }

  if (session.performersPerPoint > point.maxPerformers) {
    addOnce(reasons, {
      code: reasonCodes.tooManyPerformers,
      message: `The class puts ${performers(session.performersPerPoint)} on point ${point.label}, which takes at most ${point.maxPerformers}`,
    });
  }

  // Without fixed rigging there is nothing to compute; `no_load_path` already says so.
  if (splitPath(point.links).fixed.length > 0) {
    const check = checkLoadPath({
      links: point.links,
      structuralRatingKn: point.structuralRatingKn,
      profile: session.profile,
      requiredFactor: policy.requiredFactor,
      displayUnit: policy.units,
    });
    if (!check.pass) {
      const found = check.violations.map((v) => v.message).join('; ');
      addOnce(reasons, {
        code: reasonCodes.loadCheckFailed,
        message: `Load check fails for ${performers(session.profile.performers)} on point ${point.label}: ${found}`,
      });
    }
  }
  return reasons;
}

/** PRODUCT.md §4.4: why a point cannot take a session, all reasons at once, plus warnings. */
export function bookingReasons({ point, policy, now, session, pointBookedElsewhere }: BookingInput): BookingCheck {
  const reasons: Reason[] = [];

  // Blocked now for any reason, a lapsed clearance included: a rigger has to clear it first.
  for (const reason of pointStatusAt(point, policy, now).reasons) addOnce(reasons, reason);

  // Reasons known now that will hold during the session; a session already under way counts from now.
  const from = session.startsAt.getTime() > now.getTime() ? session.startsAt : now;
  const over = pointStatusOver(point, policy, from, session.endsAt);
  for (const reason of over.blockedReasons) addOnce(reasons, reason);

  for (const reason of classFitReasons(point, policy, session)) addOnce(reasons, reason);

  if (pointBookedElsewhere) {
    addOnce(reasons, {
      code: reasonCodes.pointDoubleBooked,
      message: `Point ${point.label} is already booked for an overlapping session`,
    });
  }

  return { reasons, warnings: over.dueBeforeEnd };
}

/** Session-wide reason of §4.4: the instructor teaches an overlapping session. */
export function instructorReasons(instructorBusy: boolean): Reason[] {
  return instructorBusy
    ? [{ code: reasonCodes.instructorDoubleBooked, message: 'The instructor teaches an overlapping session' }]
    : [];
}

/** A session-wide list must say which point each reason is about, once. */
function namingPoint(label: string, message: string): string {
  const escaped = label.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
  return new RegExp(`\\bpoint ${escaped}(?![\\w-])`, 'i').test(message) ? message : `Point ${label}: ${message}`;
}

export interface SessionRiskInput {
  /** Each booked point as it hangs for the class (see `hangFor`). */
  points: PointSnapshot[];
  policy: Policy;
  now: Date;
  startsAt: Date;
  endsAt: Date;
  cancelled?: boolean;
  /** The class: §4.6 re-checks its fit on every point as the point now hangs. */
  cls: ClassOnPoint;
  /** Points with no item of the class's kind to hang (`no_apparatus_available`). */
  withoutApparatus?: number[];
}

export interface SessionRiskReason extends Reason {
  pointId: number;
}

export interface SessionRisk {
  atRisk: boolean;
  reasons: SessionRiskReason[];
}

/**
 * PRODUCT.md §4.4 and §4.6: whether a booked, future, not cancelled session is at risk. An
 * inspection running out is the rigger's planned work, so it counts only once the session is
 * inside the warning window; anything else that blocks the point, now or (gear reaching its
 * service life) before the session ends, counts at once, and so does every booking rule about the
 * class on the point as it now hangs (apparatus allowed, performers, load check). Double booking
 * is not asked again: the calendar never holds one.
 */
export function sessionRisk({ points, policy, now, startsAt, endsAt, cancelled = false, cls, withoutApparatus = [] }: SessionRiskInput): SessionRisk {
  if (cancelled || startsAt.getTime() <= now.getTime()) return { atRisk: false, reasons: [] };

  const inWindow = startsAt.getTime() <= addStudioDays(now, policy.warningDays, policy.timeZone).getTime();
  const reasons: SessionRiskReason[] = [];
  for (const point of points) {
    const over = pointStatusOver(point, policy, now, endsAt);
    const counted: Reason[] = [];
    for (const reason of over.blockedReasons) {
      // A point that was never cleared is an inspection not yet done, like one that ran out.
      if (reason.code !== reasonCodes.inspectionLapsed || inWindow) counted.push(reason);
    }
    if (inWindow) counted.push(...over.dueBeforeEnd);
    counted.push(...classFitReasons(point, policy, cls));
    if (withoutApparatus.includes(point.id)) counted.push(noApparatusReason(point, cls.apparatus));
    for (const reason of counted) {
      reasons.push({ pointId: point.id, code: reason.code, message: namingPoint(point.label, reason.message) });
    }
  }
  return { atRisk: reasons.length > 0, reasons };
}
