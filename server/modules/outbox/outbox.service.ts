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
import { faultReportedMessage } from '../../mail/templates/fault-reported';
import { UNDO_WINDOW_MS } from '../../../shared/schedule/undo';
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

/** The times a waiting "Moved" notice moved the class from, read from its key. */
function movedFrom(uniqueKey: string): { startsAt: string; endsAt: string } | null {
  const m = uniqueKey.match(/:from:([^/]+)\/(.+)$/);
  return m ? { startsAt: m[1], endsAt: m[2] } : null;
}
const sameInstant = (a: string | Date, b: string | Date) => new Date(a).getTime() === new Date(b).getTime();

export function outboxService(deps: { db: Db; clock: Clock; studio: StudioRepository; appUrl: string; undoWindowMs?: number; audit?: AuditRepository }) {
  const { db, clock, studio, appUrl } = deps;
  const undoWindowMs = deps.undoWindowMs ?? UNDO_WINDOW_MS;
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
    if (change.kind === 'moved' && undoWindowMs > 0) {
      // A move waits out the undo window. Another move of the class within it replaces the waiting
      // notice (told from the first time to the latest); a move back to where it was sends nothing.
      const waiting = await repo.waitingWithPrefix(`change:${session.id}:moved:`, at, trx);
      const from = waiting.map((w) => movedFrom(w.uniqueKey)).find((f) => f !== null);
      if (waiting.length) await repo.skipWaiting(waiting.map((w) => w.id), 'Not sent: the move was undone or changed again within the undo window.', trx);
      if (from) {
        if (sameInstant(from.startsAt, session.startsAt) && sameInstant(from.endsAt, session.endsAt)) return 0;
        change = { ...change, before: { ...change.before, startsAt: from.startsAt, endsAt: from.endsAt } };
      }
    }
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
      const moved = change.kind === 'moved';
      const added = await enqueue(trx, {
        kind: 'session_change',
        // A move's key keeps the times it moved from, so a later move within the undo window can tell it.
        uniqueKey: `change:${session.id}:${change.kind}:${at.toISOString()}:${r.id}:${state}${moved ? `:from:${new Date(change.before.startsAt).toISOString()}/${new Date(change.before.endsAt).toISOString()}` : ''}`,
        to: [r.email],
        ...mail,
        sessionId: session.id,
        ...(moved && undoWindowMs > 0 ? { notBefore: new Date(at.getTime() + undoWindowMs) } : {}),
      });
      if (added) queued += 1;
    }
    return queued;
  }

  /**
   * A fault just opened, told to the active riggers when nothing else would tell them: the point
   * has no booked class ahead (so no at-risk alert follows), or the fault is of high severity
   * (always). In the caller's transaction, so the notice exists exactly when the fault does.
   */
  async function faultOpened(trx: Db, f: { faultId: number; pointId: number | null; gearId: number | null; severity: string; description: string; reportedBy: number }): Promise<boolean> {
    const at = clock.now();
    const gear = f.gearId !== null ? await rig.gearById(f.gearId, trx) : null;
    const pointId = f.pointId ?? gear?.pointId ?? null;
    const point = pointId !== null ? await rig.pointById(pointId, trx) : null;
    const booked = pointId !== null && (await data.pointBookedAfter(pointId, at, trx));
    const why = !booked ? 'no_booked_class' : f.severity === 'high' ? 'high_severity' : null;
    if (!why) return false;
    const { name: studioName, policy } = await studio.get(trx);
    const reporter = await data.userById(f.reportedBy, trx);
    const to = (await data.activeStaff(['rigger'], trx)).map((u) => u.email);
    const mail = faultReportedMessage({
      studioName,
      timeZone: policy.timeZone,
      appUrl,
      faultId: f.faultId,
      pointLabel: point?.label ?? null,
      roomName: point?.roomName || null,
      gearSerial: gear?.serial ?? null,
      severity: f.severity,
      description: f.description,
      reportedBy: reporter?.name ?? 'someone',
      reportedAt: at,
      why,
    });
    return enqueue(trx, {
      kind: 'fault',
      uniqueKey: `fault:${f.faultId}`,
      to,
      ...mail,
      ...(to.length ? {} : { state: 'skipped' as const, note: 'Nobody to tell: there is no active rigger account.' }),
    } as EnqueueInput);
  }

  return {
    enqueue,
    notifySessionChange,
    faultOpened,
    /** The same, under the name the sessions service's SessionNotifier expects: pass `notifier: outbox`. */
    async sessionChanged(trx: Db, change: SessionChange): Promise<void> {
      await notifySessionChange(trx, change);
    },

    /** For the owner's outbox page: newest first; failed ones carry their last error. */
    async list(filter: { state?: OutboxState; kind?: OutboxKind; to?: string; cursor?: [number]; limit?: number }) {
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
        if (m.kind === 'sign_in_link') throw conflict('ask_for_new_link', 'A sign-in link is not kept once it fails; the student asks for a new one on the sign-in page.');
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
