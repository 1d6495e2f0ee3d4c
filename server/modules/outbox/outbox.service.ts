import { createHash } from 'node:crypto';
import { writeTransaction, type Db } from '../../db/knex';
import type { Clock } from '../../clock';
import type { StudioRepository } from '../studio/studio.repository';
import type { AuditRepository } from '../audit/audit.repository';
import { conflict, notFound } from '../../http/errors';
import { rigRepository } from '../rig/rig.repository';
import { loadSnapshots } from '../rig/point-snapshots';
import { pointStatusAt } from '../../../shared/clearance';
import { mailDataRepository } from '../../mail/mail-data.repository';
import { sessionChangeMessage, type SessionChangeKind } from '../../mail/templates/session-change';
import type { MailPoint } from '../../mail/templates/points';
import { outboxRepository, type NewOutboxRow, type OutboxKind, type OutboxState } from './outbox.repository';

/** A message to send: a new outbox row without the worker's own bookkeeping (`state`, `note`). */
export type EnqueueInput = Omit<NewOutboxRow, 'state' | 'note'>;

/**
 * What changed about a session, told to its instructor. `before` is the session as it was (the
 * sessions service's SessionRecord fits); the session as it is now is read through the caller's
 * transaction, so call this after the change is written and inside the same transaction.
 */
export interface SessionChange {
  kind: SessionChangeKind;
  sessionId: number;
  before: { startsAt: Date | string; endsAt: Date | string; instructorId: number; pointIds: number[]; roomId?: number; roomName?: string };
  /** When the change was made (default: the clock's now); part of the message's unique key. */
  at?: Date;
  /** `cancelled`: the reason given, when it is not yet on the session's row. */
  reason?: string | null;
}

export function outboxService(deps: { db: Db; clock: Clock; studio: StudioRepository; appUrl: string; audit?: AuditRepository }) {
  const { db, clock, studio, appUrl } = deps;
  const repo = outboxRepository(db);
  const data = mailDataRepository(db);
  const rig = rigRepository(db);

  async function enqueue(trx: Db, m: EnqueueInput): Promise<boolean> {
    return repo.insert(trx, m, clock.now());
  }

  async function pointsAt(trx: Db, pointIds: number[], t: Date): Promise<MailPoint[]> {
    if (!pointIds.length) return [];
    const { policy } = await studio.get(trx);
    const bundles = await loadSnapshots(db, rig, { ids: pointIds }, trx);
    return bundles.map((b) => {
      const s = pointStatusAt(b.snapshot, policy, t);
      return { label: b.point.label, status: s.status, reasons: s.reasons.map((r) => r.message), clearedUntil: s.clearedUntil };
    });
  }

  /**
   * Tells the instructor about a move (in time or to another room), a points swap, a cancellation or a change of instructor
   * (both the new and the previous one). Writes in the caller's transaction, so the message exists
   * exactly when the change does. Returns how many messages were queued.
   */
  async function notifySessionChange(trx: Db, change: SessionChange): Promise<number> {
    const at = change.at ?? clock.now();
    const session = await data.sessionById(change.sessionId, trx);
    if (!session) return 0;
    const { name: studioName, policy } = await studio.get(trx);
    const startsAt = new Date(session.startsAt);
    const endsAt = new Date(session.endsAt);
    const pointIds = (await data.pointIdsOf([session.id], trx)).get(session.id) ?? [];
    const statusTime = startsAt > at ? startsAt : at;

    const recipients: Array<{ id: number; name: string; email: string; assignment?: 'assigned' | 'unassigned' }> = [];
    if (session.instructor.active) recipients.push({ ...session.instructor, assignment: change.kind === 'instructor_changed' ? 'assigned' : undefined });
    if (change.kind === 'instructor_changed' && change.before.instructorId !== session.instructor.id) {
      const previous = await data.userById(change.before.instructorId, trx);
      if (previous?.active) recipients.push({ id: previous.id, name: previous.name, email: previous.email, assignment: 'unassigned' });
    }
    if (!recipients.length) return 0;

    const points = change.kind === 'cancelled' ? [] : await pointsAt(trx, pointIds, statusTime);
    const previousPointLabels = change.kind === 'points_swapped' || change.kind === 'room_changed' ? await data.pointLabels(change.before.pointIds, trx) : undefined;
    const previousRoomName =
      change.kind === 'room_changed' ? (change.before.roomName ?? (change.before.roomId ? (await rig.roomById(change.before.roomId, trx))?.name : undefined)) : undefined;
    // The key names the change and the state it led to, so two different changes in the same
    // millisecond (a test clock) both go out, while a replay of the same one cannot.
    const state = createHash('sha256')
      .update(JSON.stringify([session.startsAt, session.endsAt, session.instructor.id, pointIds, session.cancelled]))
      .digest('hex')
      .slice(0, 12);

    let queued = 0;
    for (const r of recipients) {
      const mail = sessionChangeMessage({
        kind: change.kind,
        studioName,
        timeZone: policy.timeZone,
        appUrl,
        recipientName: r.name,
        className: session.className,
        roomName: session.roomName,
        startsAt,
        endsAt,
        previous: change.kind === 'moved' ? { startsAt: new Date(change.before.startsAt), endsAt: new Date(change.before.endsAt) } : undefined,
        points,
        previousPointLabels,
        previousRoomName,
        reason: change.kind === 'cancelled' ? (change.reason ?? session.cancelReason) : undefined,
        assignment: r.assignment,
      });
      const added = await enqueue(trx, {
        kind: 'session_change',
        uniqueKey: `change:${session.id}:${change.kind}:${at.toISOString()}:${r.id}:${state}`,
        to: [r.email],
        ...mail,
        sessionId: session.id,
      });
      if (added) queued += 1;
    }
    return queued;
  }

  return {
    enqueue,
    notifySessionChange,
    /** The same, under the name the sessions service's SessionNotifier expects: pass `notifier: outbox`. */
    async sessionChanged(trx: Db, change: SessionChange): Promise<void> {
      await notifySessionChange(trx, change);
    },

    /** For the owner's outbox page: newest first; failed ones carry their last error. */
    async list(filter: { state?: OutboxState; cursor?: [number]; limit?: number }) {
      const page = await repo.page(filter);
      return { items: page.items.map(({ text: _text, html: _html, ...m }) => m), nextCursor: page.nextCursor };
    },

    /**
     * The owner sends a failed message again (after fixing the mail settings, say): it is queued
     * with its tries counted afresh and goes at the next cycle, written afresh if it is a reminder
     * or an alert. A reminder or alert whose class has begun is no longer worth sending.
     */
    async resend(id: number, actorId: number) {
      const now = clock.now();
      await writeTransaction(db, async (trx) => {
        const m = await repo.byId(id, trx);
        if (!m) throw notFound('That message');
        if (m.state !== 'failed') throw conflict('not_failed', `Only a failed message can be sent again; this one is ${m.state}.`);
        if ((m.kind === 'reminder' || m.kind === 'at_risk') && m.sessionStartsAt && new Date(m.sessionStartsAt).getTime() <= now.getTime()) {
          throw conflict('no_longer_useful', 'Its class has already begun, so this message is no longer worth sending.');
        }
        await repo.requeue(id, now, trx);
        await deps.audit?.record(trx, { actorId, action: 'outbox.resent', entity: 'outbox_message', entityId: id, before: { state: m.state, attempts: m.attempts, lastError: m.lastError }, after: { state: 'queued' } }, now);
      });
      const { text: _text, html: _html, ...wire } = (await repo.byId(id))!;
      return wire;
    },
  };
}
export type OutboxService = ReturnType<typeof outboxService>;
