import { TZDate } from '@date-fns/tz';
import { addStudioDays, clearedUntil, formatStudioDay, gearName, pointStatusAt, reasonCodes, serviceLifeEnd, studioDay } from '../../shared/clearance';
import type { GearKind } from '../../shared/schemas/vocabulary';
import type { MailCycleContext } from './context';
import { auditRepository, formatHead } from '../modules/audit/audit.repository';
import { digestIsEmpty, digestMessage, type DigestInput, type DigestSection } from './templates/digest';
import { writeTransaction } from '../db/knex';

/** The digest goes out once per studio day, at the first cycle at or after this hour, studio time. */
export const DIGEST_HOUR = 7;

export const digestKey = (userId: number, day: string) => `digest:${userId}:${day}`;

/**
 * PRODUCT.md §5: the daily digest to every active rigger who has not opted out. A day with nothing
 * due records a `skipped` row instead of a message: a daily mail that says nothing teaches people to
 * stop reading it, and at-risk alerts cover anything urgent.
 */
export async function scheduleDigests(ctx: MailCycleContext): Promise<{ queued: number; skipped: number }> {
  const tz = ctx.policy.timeZone;
  if (new TZDate(ctx.now.getTime(), tz).getHours() < DIGEST_HOUR) return { queued: 0, skipped: 0 };
  const day = studioDay(ctx.now, tz);
  const riggers = (await ctx.data.activeStaff(['rigger'])).filter((u) => !u.digestOptOut);
  if (!riggers.length) return { queued: 0, skipped: 0 };
  const existing = await ctx.outbox.existingKeys(riggers.map((u) => digestKey(u.id, day)));
  const pending = riggers.filter((u) => !existing.has(digestKey(u.id, day)));
  if (!pending.length) return { queued: 0, skipped: 0 };

  const content = await digestContent(ctx);
  const empty = digestIsEmpty(content);
  let queued = 0;
  let skipped = 0;
  await writeTransaction(ctx.db, async (trx) => {
    // The audit chain's head as this digest is written (PRODUCT.md §10): kept in the riggers'
    // mailboxes, it lets GET /api/audit/verify?head= prove later that no entry up to it was removed or rewritten.
    const chainHead = formatHead(await auditRepository(ctx.db).head(trx));
    for (const u of pending) {
      const mail = digestMessage({ ...content, chainHead, studioName: ctx.studioName, timeZone: tz, appUrl: ctx.appUrl, recipientName: u.name, dayLabel: formatStudioDay(ctx.now, tz), warningDays: ctx.policy.warningDays });
      const added = await ctx.outbox.insert(
        trx,
        { kind: 'digest', uniqueKey: digestKey(u.id, day), to: [u.email], ...mail, ...(empty ? { state: 'skipped' as const, note: 'Nothing due: no digest sent.' } : {}) },
        ctx.now,
      );
      if (added) {
        if (empty) skipped += 1;
        else queued += 1;
      }
    }
  });
  return { queued, skipped };
}

async function digestContent(ctx: MailCycleContext): Promise<Pick<DigestInput, DigestSection>> {
  const { now, policy } = ctx;
  const tz = policy.timeZone;
  const windowEnd = addStudioDays(now, policy.warningDays, tz);
  const bundles = await ctx.snapshots();

  const statuses = [...bundles.values()].map((b) => ({ b, st: pointStatusAt(b.snapshot, policy, now) }));
  const expiringPoints = statuses
    .filter(({ st }) => st.status === 'expiring' && st.clearedUntil)
    .map(({ b, st }) => ({ label: b.point.label, roomName: b.point.roomName, clearedUntil: st.clearedUntil! }))
    .sort((a, b) => a.clearedUntil.getTime() - b.clearedUntil.getTime());

  // Every future booking, however far ahead: studios plan terms, and the rigger plans around them.
  const sessions = await ctx.data.futureSessions(now, null);
  const pointIds = await ctx.data.pointIdsOf(sessions.map((s) => s.id));
  const sessionsPastClearance: DigestInput['sessionsPastClearance'] = [];
  for (const s of sessions) {
    const endsAt = new Date(s.endsAt);
    for (const id of pointIds.get(s.id) ?? []) {
      const b = bundles.get(id);
      if (!b) continue;
      const until = clearedUntil(b.snapshot, policy);
      if (until === null || until.getTime() < endsAt.getTime()) {
        sessionsPastClearance.push({ className: s.className, roomName: s.roomName, startsAt: new Date(s.startsAt), endsAt, pointLabel: b.point.label, clearedUntil: until });
      }
    }
  }

  const gearServiceLife = (await ctx.data.gearWithServiceLife())
    .map((g) => ({ g, end: serviceLifeEnd(g, tz) }))
    .filter((x): x is { g: (typeof x)['g']; end: Date } => x.end !== null && x.end.getTime() <= windowEnd.getTime())
    .sort((a, b) => a.end.getTime() - b.end.getTime())
    .map(({ g, end }) => ({ name: gearName(g), pointLabel: g.pointLabel, lifeEnd: end, past: end.getTime() <= now.getTime() }));

  // Work waiting on a rigger now: points whose clearance was voided (a path, rating or gear change, a fault) and every open fault.
  const awaitingClearance = statuses
    .filter(({ st }) => st.reasons.some((r) => r.code === reasonCodes.awaitingClearance))
    .map(({ b }) => ({ label: b.point.label, roomName: b.point.roomName, voidedAt: b.snapshot.lastClearance?.voidedAt ?? null }))
    .sort((a, b) => (a.voidedAt?.getTime() ?? 0) - (b.voidedAt?.getTime() ?? 0) || a.label.localeCompare(b.label, undefined, { numeric: true }));
  const openFaults = (await ctx.data.openFaults()).map((f) => ({
    on: f.gear ? `${capitalised(gearName({ kind: f.gear.kind as GearKind, serial: f.gear.serial }))} (${f.gear.pointLabel ? `on ${f.gear.pointLabel}` : 'in stock'})` : `Point ${f.pointLabel ?? '?'}${f.roomName ? ` (${f.roomName})` : ''}`,
    severity: f.severity,
    description: f.description,
    reportedAt: f.reportedAt,
  }));

  return { expiringPoints, sessionsPastClearance, gearServiceLife, awaitingClearance, openFaults };
}

const capitalised = (t: string) => t.charAt(0).toUpperCase() + t.slice(1);
