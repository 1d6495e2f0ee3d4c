import { riskOf } from '../modules/sessions/session-rig';
import type { MailCycleContext } from './context';
import type { MailSession } from './mail-data.repository';
import { atRiskMessage } from './templates/at-risk';
import { writeTransaction } from '../db/knex';

export const atRiskKeyPrefix = (sessionId: number, startsAt: string) => `at_risk:${sessionId}:${startsAt}:`;

/**
 * PRODUCT.md §4.4 and §5: a booked, future, not cancelled session that turns at risk alerts
 * reception and riggers once. `sessions.at_risk` holds the last state seen, so only the change from
 * false to true alerts; back to false clears it, and a later relapse alerts again (its key counts
 * the earlier alerts for the same session and start).
 */
export async function detectAtRisk(ctx: MailCycleContext): Promise<{ alerts: number; cleared: number }> {
  const sessions = await ctx.data.sessionsToWatch(ctx.now);
  if (!sessions.length) return { alerts: 0, cleared: 0 };
  const pointIds = await ctx.data.pointIdsOf(sessions.map((s) => s.id));
  let alerts = 0;
  let cleared = 0;

  for (const s of sessions) {
    const trouble = await troubleOf(ctx, s, pointIds.get(s.id) ?? []);
    if (!trouble) {
      if (s.atRisk && (await ctx.data.setAtRiskIf(s.id, true, false))) cleared += 1;
      continue;
    }
    if (s.atRisk) continue;
    const mail = alertMessage(ctx, s, trouble);
    await writeTransaction(ctx.db, async (trx) => {
      // The flag flips only if nobody flipped it since we read it, so two workers cannot both alert.
      if (!(await ctx.data.setAtRiskIf(s.id, false, true, trx))) return;
      const prefix = atRiskKeyPrefix(s.id, s.startsAt);
      const n = (await ctx.outbox.countWithPrefix(prefix, trx)) + 1;
      const to = (await ctx.data.activeStaff(['reception', 'rigger'], trx)).map((u) => u.email);
      const added = await ctx.outbox.insert(
        trx,
        {
          kind: 'at_risk',
          uniqueKey: `${prefix}${n}`,
          to,
          ...mail,
          sessionId: s.id,
          sessionStartsAt: s.startsAt,
          // Recorded even with nobody to tell, so the count of alerts stays right.
          ...(to.length ? {} : { state: 'skipped' as const, note: 'Nobody to tell: there is no active reception or rigger account.' }),
        },
        ctx.now,
      );
      if (added && to.length) alerts += 1;
    });
  }
  return { alerts, cleared };
}

/** The points in trouble for a session at `ctx.now`, each with its reasons; null when it is not at risk. */
async function troubleOf(ctx: MailCycleContext, s: MailSession, pointIds: number[]) {
  // Each point as it hangs for the class now: §4.6 re-checks the class on it (load, kind, performers).
  const hung = await ctx.hanging(s, pointIds);
  const risk = riskOf({ ...s, pointIds, recordedApparatus: [] }, hung, ctx.policy, ctx.now, { startsAt: new Date(s.startsAt), endsAt: new Date(s.endsAt), cancelled: s.cancelled });
  if (!risk.atRisk) return null;
  return hung
    .map(({ bundle }) => ({ label: bundle.point.label, reasons: risk.reasons.filter((r) => r.pointId === bundle.point.id).map((r) => r.message) }))
    .filter((p) => p.reasons.length > 0);
}

function alertMessage(ctx: MailCycleContext, s: MailSession, points: Array<{ label: string; reasons: string[] }>) {
  return atRiskMessage({
    studioName: ctx.studioName,
    timeZone: ctx.policy.timeZone,
    appUrl: ctx.appUrl,
    className: s.className,
    roomName: s.roomName,
    instructorName: s.instructor.name,
    startsAt: new Date(s.startsAt),
    endsAt: new Date(s.endsAt),
    points,
  });
}

/**
 * The alert for a session as it stands at `ctx.now`, or null when it is not at risk. Written when
 * the alert is raised, and again when it is sent.
 */
export async function atRiskFor(ctx: MailCycleContext, s: MailSession, pointIds: number[]) {
  const trouble = await troubleOf(ctx, s, pointIds);
  return trouble && alertMessage(ctx, s, trouble);
}
