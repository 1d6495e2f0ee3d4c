import { checkLoadPath, type LoadProfile } from '../rigging';
import { requiredFactorReasonOf, type Policy } from '../schemas/policy';
import type { ApparatusKind } from '../schemas/vocabulary';
import { pointStatusAt, splitPath } from './status';
import type { PointSnapshot, PointStatus, Reason } from './types';

/** A class type's load profile: its own figures where set, else the policy's (PRODUCT.md §3). */
export function profileFor(
  c: { name: string; apparatus: ApparatusKind; performersPerPoint: number; bodyMassKg: number | null; dynamicFactor: number | null },
  policy: Policy,
): LoadProfile & { name: string } {
  return {
    name: c.name,
    performers: c.performersPerPoint,
    bodyMassKg: c.bodyMassKg ?? policy.bodyMassKg,
    dynamicFactor: c.dynamicFactor ?? policy.dynamicFactors[c.apparatus],
  };
}

export interface EffectPoint {
  snapshot: PointSnapshot;
  roomName: string;
}

export interface EffectSession {
  id: number;
  startsAt: Date;
  cancelled: boolean;
  classType: Parameters<typeof profileFor>[0];
  /** Each booked point as it hangs for this class (the caller knows which apparatus that is). */
  points: PointSnapshot[];
}

export interface PointStatusChange {
  pointId: number;
  label: string;
  roomName: string;
  before: PointStatus;
  after: PointStatus;
}

export interface SessionLoadCheckChange {
  sessionId: number;
  className: string;
  startsAt: Date;
  pointId: number;
  label: string;
  achievedFactor: number | null;
  requiredFactor: number;
  violations: Reason[];
}

export interface PolicyEffects {
  points: PointStatusChange[];
  sessions: SessionLoadCheckChange[];
  checked: { points: number; sessions: number };
}

/**
 * What changing the policy from `before` to `after` does at `now`, before it is saved (PRODUCT.md
 * §4.9): each point whose status or clearance end changes, and each booked, future class whose
 * load check passes under `before` and fails under `after` on a point as it hangs for that class.
 */
export function policyChangeEffects(input: { points: EffectPoint[]; sessions: EffectSession[]; before: Policy; after: Policy; now: Date }): PolicyEffects {
  const { before, after, now } = input;
  const points: PointStatusChange[] = [];
  for (const { snapshot, roomName } of input.points) {
    const was = pointStatusAt(snapshot, before, now);
    const will = pointStatusAt(snapshot, after, now);
    if (was.status !== will.status || (was.clearedUntil?.getTime() ?? null) !== (will.clearedUntil?.getTime() ?? null)) {
      points.push({ pointId: snapshot.id, label: snapshot.label, roomName, before: was, after: will });
    }
  }

  const sessions: SessionLoadCheckChange[] = [];
  let sessionsChecked = 0;
  for (const session of input.sessions) {
    if (session.cancelled || session.startsAt.getTime() <= now.getTime()) continue;
    sessionsChecked += 1;
    for (const point of session.points) {
      if (splitPath(point.links).fixed.length === 0) continue;
      const check = (policy: Policy) =>
        checkLoadPath({
          links: point.links,
          structuralRatingKn: point.structuralRatingKn,
          profile: profileFor(session.classType, policy),
          requiredFactor: policy.requiredFactor,
          requiredFactorReason: requiredFactorReasonOf(policy),
          displayUnit: policy.units,
        });
      if (!check(before).pass) continue;
      const next = check(after);
      if (next.pass) continue;
      sessions.push({
        sessionId: session.id,
        className: session.classType.name,
        startsAt: session.startsAt,
        pointId: point.id,
        label: point.label,
        achievedFactor: next.achievedFactor,
        requiredFactor: next.requiredFactor,
        violations: next.violations.map((v) => ({ code: v.code, message: v.message })),
      });
    }
  }
  return { points, sessions, checked: { points: input.points.length, sessions: sessionsChecked } };
}
