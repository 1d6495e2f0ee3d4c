import { pointStatusAt } from '../../shared/clearance';
import type { MailCycleContext } from './context';
import type { MailSession } from './mail-data.repository';
import { reminderMessage } from './templates/reminder';
import type { MailPoint } from './templates/points';
import { writeTransaction } from '../db/knex';
import { changeoversOf, type HungPoint } from '../modules/sessions/session-rig';

const HOUR = 3_600_000;

export const reminderKey = (sessionId: number, startsAt: string, leadHours: number) => `reminder:${sessionId}:${startsAt}:${leadHours}`;

/**
 * PRODUCT.md §5 reminders. For each future session, the lead times whose moment (start − L) has
 * passed and that have no row yet are "missing". Normally that is one lead at a time, and it is
 * queued. When several are missing at once (the session was booked or moved after some moments had
 * passed, or the server was down through them) only the smallest lead, the latest moment, is queued
 * and the others get `skipped` rows, so one reminder goes out in their place and none of them later.
 * A lead that already has a row, in any state, is never queued again.
 */
export async function scheduleReminders(ctx: MailCycleContext): Promise<{ queued: number; skipped: number }> {
  const leads = [...new Set(ctx.policy.reminderLeadHours)].sort((a, b) => a - b);
  if (!leads.length) return { queued: 0, skipped: 0 };
  const now = ctx.now.getTime();
  const horizon = new Date(now + leads[leads.length - 1] * HOUR);
  const sessions = (await ctx.data.sessionsStartingIn(ctx.now, horizon)).filter((s) => s.instructor.active);

  const plans = sessions
    .map((s) => ({ s, passed: leads.filter((l) => new Date(s.startsAt).getTime() - l * HOUR <= now) }))
    .filter((p) => p.passed.length > 0);
  if (!plans.length) return { queued: 0, skipped: 0 };
  const existing = await ctx.outbox.existingKeys(plans.flatMap((p) => p.passed.map((l) => reminderKey(p.s.id, p.s.startsAt, l))));

  const due = plans
    .map((p) => ({ ...p, missing: p.passed.filter((l) => !existing.has(reminderKey(p.s.id, p.s.startsAt, l))) }))
    .filter((p) => p.missing.length > 0);
  if (!due.length) return { queued: 0, skipped: 0 };

  const pointIds = await ctx.data.pointIdsOf(due.map((p) => p.s.id));
  let queued = 0;
  let skipped = 0;
  for (const { s, missing } of due) {
    const [send, ...replaced] = missing;
    const mail = await reminderFor(ctx, s, pointIds.get(s.id) ?? []);
    await writeTransaction(ctx.db, async (trx) => {
      const ref = { sessionId: s.id, sessionStartsAt: s.startsAt };
      if (await ctx.outbox.insert(trx, { kind: 'reminder', uniqueKey: reminderKey(s.id, s.startsAt, send), to: [s.instructor.email], ...mail, ...ref }, ctx.now)) queued += 1;
      for (const l of replaced) {
        const note = `Not sent: its moment had passed when the session was booked or moved; the ${send} h reminder went in its place.`;
        if (await ctx.outbox.insert(trx, { kind: 'reminder', uniqueKey: reminderKey(s.id, s.startsAt, l), to: [s.instructor.email], ...mail, ...ref, state: 'skipped', note }, ctx.now)) skipped += 1;
      }
    });
  }
  return { queued, skipped };
}

/**
 * The reminder's text for the session as it stands at `ctx.now`: the class, room and each point's
 * status at the start. Written when the reminder is queued, and again when it is sent.
 */
export async function reminderFor(ctx: MailCycleContext, s: MailSession, pointIds: number[]) {
  const hung = await ctx.hanging(s, pointIds);
  return reminderMessage({
    studioName: ctx.studioName,
    timeZone: ctx.policy.timeZone,
    appUrl: ctx.appUrl,
    now: ctx.now,
    className: s.className,
    roomName: s.roomName,
    instructorName: s.instructor.name,
    startsAt: new Date(s.startsAt),
    endsAt: new Date(s.endsAt),
    points: pointsAtStart(ctx, s, hung),
    changeovers: changeoversOf(hung, new Date(s.startsAt), ctx.policy.timeZone, false).map((c) => c.message),
  });
}

/** Each point as it hangs for the class, at the start (with its own apparatus, §4.7). */
function pointsAtStart(ctx: MailCycleContext, s: MailSession, hung: HungPoint[]): MailPoint[] {
  const startsAt = new Date(s.startsAt);
  return hung.map(({ bundle, hanging }) => {
    const st = pointStatusAt(hanging.snapshot, ctx.policy, startsAt);
    return { label: bundle.point.label, status: st.status, reasons: st.reasons.map((r) => r.message), clearedUntil: st.clearedUntil };
  });
}
