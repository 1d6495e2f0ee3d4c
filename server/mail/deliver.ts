import { createHash } from 'node:crypto';
import type { Mailer } from './transport';
import type { MailCycleContext } from './context';
import type { OutboxMessage } from '../modules/outbox/outbox.repository';
import type { MailSession } from './mail-data.repository';
import type { Clock } from '../clock';
import { reminderFor } from './reminders';
import { atRiskFor, atRiskGroupFor, causeInKey } from './at-risk';

/**
 * How long a claimed row stays ours by default (OUTBOX_LEASE_SECONDS); nodemailer gives up on a
 * send well within it (10 + 10 + 20 s).
 */
export const LEASE_MS = 5 * 60_000;
const BATCH = 25;
/** nodemailer's codes for a server that cannot be reached or spoken to, as opposed to one message refused. */
const SERVER_DOWN = new Set(['ECONNECTION', 'ECONNREFUSED', 'ETIMEDOUT', 'ESOCKET', 'EDNS', 'ETLS', 'EAUTH', 'EPROTOCOL']);

/** Why a reminder or an at-risk alert should no longer go out, if it should not. */
function staleBecause(m: OutboxMessage, s: MailSession | undefined, now: Date): string | null {
  if (!s) return 'Not sent: the session no longer exists.';
  if (s.cancelled) return 'Not sent: the session was cancelled.';
  if (m.sessionStartsAt && s.startsAt !== m.sessionStartsAt) return 'Not sent: the session moved.';
  if (new Date(s.startsAt).getTime() <= now.getTime()) return 'Not sent: the session had begun.';
  if (m.kind === 'at_risk' && !s.atRisk) return 'Not sent: the session is no longer at risk.';
  if (m.kind === 'reminder' && !s.instructor.active) return 'Not sent: the instructor’s account is no longer active.';
  return null;
}

/** A reminder or an at-risk alert as things stand now; null when the alert is no longer at risk. */
async function writtenAfresh(ctx: MailCycleContext, m: OutboxMessage, s: MailSession, pointIds: number[], alertRecipients: () => Promise<string[]>) {
  if (m.kind === 'reminder') return { to: [s.instructor.email], ...(await reminderFor(ctx, s, pointIds)) };
  const mail = await atRiskFor(ctx, s, pointIds);
  return mail && { to: await alertRecipients(), ...mail };
}

/**
 * The Message-ID a row goes out with, the same at every attempt: the row's id and a digest of its
 * unique key (a key may hold characters a Message-ID may not), at the app's host name (without the
 * port, so a restart on another port keeps it). A message sent again after a crash is therefore
 * recognisably the same message to the receiving server and to a mail client.
 */
export function outboxMessageId(m: Pick<OutboxMessage, 'id' | 'uniqueKey'>, appUrl: string): string {
  const key = createHash('sha256').update(m.uniqueKey).digest('hex').slice(0, 16);
  return `<outbox.${m.id}.${key}@${new URL(appUrl).hostname}>`;
}

export interface DeliverySummary {
  sent: number;
  retrying: number;
  failed: number;
  dropped: number;
}

export interface DeliverOptions {
  /** Set while the server shuts down: the rest of the batch is handed back untried. */
  stopping?: () => boolean;
  /** How long a claimed row stays ours (default LEASE_MS). */
  leaseMs?: number;
}

/**
 * Sends what is due, one message at a time. Each row is claimed (state `sending` with a lease)
 * before the SMTP call and marked sent right after it. A crash between the server accepting a
 * message and `markSent` leaves the row `sending`; once the lease runs out it is sent again, so such
 * a message may arrive twice (at-least-once), under the same Message-ID. The window is one local
 * SQLite write long, and no transaction is held open across the SMTP call.
 */
export async function deliverDue(ctx: MailCycleContext, mailer: Mailer, clock: Clock, options: DeliverOptions = {}): Promise<DeliverySummary> {
  const { stopping = () => false, leaseMs = LEASE_MS } = options;
  const summary: DeliverySummary = { sent: 0, retrying: 0, failed: 0, dropped: 0 };
  const claimed = await ctx.outbox.claimDue(ctx.now, BATCH, leaseMs);
  if (!claimed.length) return summary;
  const watched = claimed.filter((m) => (m.kind === 'reminder' || m.kind === 'at_risk') && m.sessionId !== null);
  const sessionIds = [...new Set(watched.map((m) => m.sessionId!))];
  const sessions = await ctx.data.sessionsByIds(sessionIds);
  const pointIds = await ctx.data.pointIdsOf(sessionIds);
  let staff: Promise<string[]> | undefined;
  const alertRecipients = () => (staff ??= ctx.data.activeStaff(['reception', 'rigger']).then((list) => list.map((u) => u.email)));

  const groups = new Map<string, ReturnType<typeof atRiskGroupFor>>();

  for (const [index, m] of claimed.entries()) {
    if (stopping()) {
      // Shutting down: hand the rest back untried rather than hold the server up.
      await ctx.outbox.release(claimed.slice(index).map((r) => r.id));
      break;
    }
    let mail = { to: m.to, subject: m.subject, text: m.text, html: m.html };
    const cause = m.kind === 'at_risk' ? causeInKey(m.uniqueKey) : null;
    if (cause) {
      // An alert for one cause across classes: written afresh for every class still at risk for it,
      // so one class cancelled or fixed meanwhile does not drop the alert for the others.
      const key = cause.join('+');
      if (!groups.has(key)) groups.set(key, atRiskGroupFor(ctx, cause));
      const fresh = await groups.get(key)!;
      const to = fresh ? await alertRecipients() : [];
      if (!fresh || !to.length) {
        await ctx.outbox.markSkipped(m.id, fresh ? 'Not sent: there is no active reception or rigger account.' : 'Not sent: no class is at risk for this any more.');
        summary.dropped += 1;
        continue;
      }
      if (fresh.subject !== mail.subject || fresh.text !== mail.text || fresh.html !== mail.html || to.join() !== mail.to.join()) {
        await ctx.outbox.rewrite(m.id, { to, ...fresh });
        mail = { to, ...fresh };
      }
    } else if (watched.includes(m)) {
      const session = sessions.get(m.sessionId!);
      const why = staleBecause(m, session, clock.now());
      if (why) {
        await ctx.outbox.markSkipped(m.id, why);
        summary.dropped += 1;
        continue;
      }
      // Written afresh: a message that waited (an SMTP server down, a busy cycle) must not tell
      // of points, a room or people as they were when it was queued.
      const fresh = await writtenAfresh(ctx, m, session!, pointIds.get(session!.id) ?? [], alertRecipients);
      if (!fresh || !fresh.to.length) {
        await ctx.outbox.markSkipped(m.id, fresh ? 'Not sent: there is no active reception or rigger account.' : 'Not sent: the session is no longer at risk.');
        summary.dropped += 1;
        continue;
      }
      if (fresh.subject !== mail.subject || fresh.text !== mail.text || fresh.html !== mail.html || fresh.to.join() !== mail.to.join()) {
        await ctx.outbox.rewrite(m.id, fresh);
        mail = fresh;
      }
    }
    let error: { message: string; serverDown: boolean } | null = null;
    try {
      await mailer.send({ messageId: outboxMessageId(m, ctx.appUrl), kind: m.kind, ...mail });
    } catch (err) {
      const code = (err as { code?: unknown } | null)?.code;
      error = { message: err instanceof Error ? err.message : String(err), serverDown: typeof code === 'string' && SERVER_DOWN.has(code) };
    }
    if (error === null) {
      await ctx.outbox.markSent(m.id, clock.now());
      summary.sent += 1;
      continue;
    }
    if ((await ctx.outbox.markFailed(m, m.attempts + 1, error.message, clock.now())) === 'failed') summary.failed += 1;
    else summary.retrying += 1;
    if (error.serverDown) {
      // The server cannot be reached: the rest wait for the next cycle untried, costing no attempt.
      await ctx.outbox.release(claimed.slice(index + 1).map((r) => r.id));
      break;
    }
  }
  return summary;
}
