import { writeTransaction, type Db } from '../../db/knex';
import { cutPage, keyset, pageLimit, type Page } from '../../db/keyset';

import { outboxStates, type OutboxKind, type StudentOutboxKind } from '../../../shared/schemas/outbox';
export { outboxStates };
export type { OutboxKind, StudentOutboxKind };
export type OutboxState = (typeof outboxStates)[number];

export interface OutboxRow {
  id: number;
  kind: OutboxKind;
  unique_key: string;
  recipients_json: string;
  subject: string;
  text_body: string;
  html_body: string;
  state: OutboxState;
  attempts: number;
  next_attempt_at: string;
  lease_until: string | null;
  last_error: string | null;
  session_id: number | null;
  session_starts_at: string | null;
  created_at: string;
  sent_at: string | null;
}

export interface OutboxMessage {
  id: number;
  kind: OutboxKind;
  uniqueKey: string;
  to: string[];
  subject: string;
  text: string;
  html: string;
  state: OutboxState;
  attempts: number;
  nextAttemptAt: string;
  lastError: string | null;
  sessionId: number | null;
  sessionStartsAt: string | null;
  createdAt: string;
  sentAt: string | null;
}

export interface NewOutboxRow {
  kind: OutboxKind;
  /** At most one message per key, ever: a second insert with the same key does nothing. */
  uniqueKey: string;
  to: string[];
  subject: string;
  text: string;
  html: string;
  /** Not sent before this instant (default: at the next worker cycle). */
  notBefore?: Date;
  /** `skipped` records a decision (a reminder replaced by a catch-up one) without ever sending. */
  state?: 'queued' | 'skipped';
  note?: string | null;
  sessionId?: number | null;
  sessionStartsAt?: string | null;
}

const toMessage = (r: OutboxRow): OutboxMessage => ({
  id: r.id,
  kind: r.kind,
  uniqueKey: r.unique_key,
  to: JSON.parse(r.recipients_json) as string[],
  subject: r.subject,
  text: r.text_body,
  html: r.html_body,
  state: r.state,
  attempts: r.attempts,
  nextAttemptAt: r.next_attempt_at,
  lastError: r.last_error,
  sessionId: r.session_id,
  sessionStartsAt: r.session_starts_at,
  createdAt: r.created_at,
  sentAt: r.sent_at,
});

/**
 * Tries before a message with no moment of its own is given up as failed (a change e-mail, a
 * digest): with the capped back-off below, about three hours of an SMTP server away.
 */
export const MAX_ATTEMPTS = 16;
const BASE_DELAY_MS = 30_000;
/** The longest wait between tries, so a message goes soon after the server is back. */
export const MAX_DELAY_MS = 15 * 60_000;

/** Wait after the n-th failed attempt (n ≥ 1): 30 s, 1 min, 2 min, … capped at 15 minutes. */
export function retryDelayMs(attempts: number): number {
  return Math.min(BASE_DELAY_MS * 2 ** Math.max(0, attempts - 1), MAX_DELAY_MS);
}

/**
 * How long a failed message is worth trying again. A reminder or an at-risk alert is useful until
 * its class starts (the sender drops it then, or sooner if the class moves or is no longer at
 * risk), however many tries that takes; anything else gets MAX_ATTEMPTS tries.
 */
export function nextTry(m: Pick<OutboxMessage, 'kind' | 'sessionStartsAt'>, attempt: number, now: Date): { state: 'queued' | 'failed'; at: Date } {
  const at = new Date(now.getTime() + retryDelayMs(attempt));
  const timed = (m.kind === 'reminder' || m.kind === 'at_risk') && m.sessionStartsAt;
  if (timed) return { state: at.getTime() < new Date(m.sessionStartsAt!).getTime() ? 'queued' : 'failed', at };
  return { state: attempt >= MAX_ATTEMPTS ? 'failed' : 'queued', at };
}

/** What a sign-in link's row keeps once it has gone out or failed for good: no link to sign in by. */
export const LINK_FORGOTTEN = 'A sign-in link was e-mailed here. The link itself is not kept.';

/** Column updates that blank a sign-in link's body and leave every other kind's as it is. */
function forgetLink(db: Db) {
  const keepUnlessLink = (column: 'text_body' | 'html_body') =>
    db.raw(`CASE WHEN kind = 'sign_in_link' THEN ? ELSE ${column} END`, [column === 'html_body' ? `<p>${LINK_FORGOTTEN}</p>` : LINK_FORGOTTEN]);
  return { text_body: keepUnlessLink('text_body'), html_body: keepUnlessLink('html_body') };
}

export function outboxRepository(db: Db) {
  return {
    /** Inserts in the caller's transaction; a key already present is left as it is. Returns whether a row was added. */
    async insert(trx: Db, m: NewOutboxRow, now: Date): Promise<boolean> {
      const rows = await trx('outbox_messages')
        .insert({
          kind: m.kind,
          unique_key: m.uniqueKey,
          recipients_json: JSON.stringify(m.to),
          subject: m.subject,
          text_body: m.text,
          html_body: m.html,
          state: m.state ?? 'queued',
          attempts: 0,
          next_attempt_at: (m.notBefore ?? now).toISOString(),
          last_error: m.note ?? null,
          session_id: m.sessionId ?? null,
          session_starts_at: m.sessionStartsAt ?? null,
          created_at: now.toISOString(),
        })
        .onConflict('unique_key')
        .ignore()
        .returning('id');
      return rows.length > 0;
    },

    /** Which of these keys already have a row (in any state). */
    async existingKeys(keys: string[], trx: Db = db): Promise<Set<string>> {
      if (!keys.length) return new Set();
      const rows = (await trx('outbox_messages').whereIn('unique_key', keys).select('unique_key')) as Array<{ unique_key: string }>;
      return new Set(rows.map((r) => r.unique_key));
    },

    /** How many rows have a key starting with `prefix` (the prefix holds no LIKE wildcards of its own). */
    async countWithPrefix(prefix: string, trx: Db = db): Promise<number> {
      const escaped = prefix.replace(/[\\%_]/g, (c) => `\\${c}`);
      const [row] = (await trx('outbox_messages').whereRaw("unique_key LIKE ? ESCAPE '\\'", [`${escaped}%`]).count({ n: '*' })) as Array<{ n: number }>;
      return Number(row.n);
    },

    /**
     * Claims up to `limit` due rows for sending, in one short transaction: first returns rows whose
     * lease ran out (a worker that crashed mid-send) to the queue, then marks the due ones `sending`
     * with a lease, so a second worker on the same database never picks them up meanwhile.
     */
    async claimDue(now: Date, limit: number, leaseMs: number): Promise<OutboxMessage[]> {
      const at = now.toISOString();
      return writeTransaction(db, async (trx) => {
        await trx('outbox_messages').where('state', 'sending').where('lease_until', '<=', at).update({ state: 'queued', lease_until: null });
        const due = (await trx('outbox_messages').where('state', 'queued').where('next_attempt_at', '<=', at).orderBy('id').limit(limit)) as OutboxRow[];
        if (!due.length) return [];
        await trx('outbox_messages')
          .whereIn('id', due.map((r) => r.id))
          .update({ state: 'sending', lease_until: new Date(now.getTime() + leaseMs).toISOString() });
        return due.map((r) => ({ ...toMessage(r), state: 'sending' as const }));
      });
    },

    /** Marks a message sent; a sign-in link's body is blanked then (the link is a credential and has done its job). */
    async markSent(id: number, now: Date): Promise<void> {
      await db('outbox_messages')
        .where({ id, state: 'sending' })
        .update({ state: 'sent', sent_at: now.toISOString(), lease_until: null, last_error: null, ...forgetLink(db) });
    },

    /** Records a failed attempt: back to the queue after a back-off while still useful (`nextTry`), else `failed`. Returns the new state. */
    async markFailed(m: Pick<OutboxMessage, 'id' | 'kind' | 'sessionStartsAt'>, attempt: number, error: string, now: Date): Promise<'queued' | 'failed'> {
      const next = nextTry(m, attempt, now);
      await db('outbox_messages')
        .where({ id: m.id })
        .update({
          state: next.state,
          attempts: attempt,
          last_error: error.slice(0, 1000),
          lease_until: null,
          next_attempt_at: next.at.toISOString(),
          ...(next.state === 'failed' ? forgetLink(db) : {}),
        });
      return next.state;
    },

    async byId(id: number, trx: Db = db): Promise<OutboxMessage | null> {
      const row = (await trx('outbox_messages').where({ id }).first()) as OutboxRow | undefined;
      return row ? toMessage(row) : null;
    },

    /** A failed message queued again by the owner, due at once, with its tries counted afresh. */
    async requeue(id: number, now: Date, trx: Db): Promise<void> {
      await trx('outbox_messages').where({ id, state: 'failed' }).update({ state: 'queued', attempts: 0, next_attempt_at: now.toISOString(), lease_until: null });
    },

    /** Claimed rows handed back untried (the server went away mid-batch): queued again, no attempt counted. */
    async release(ids: number[]): Promise<void> {
      if (!ids.length) return;
      await db('outbox_messages').whereIn('id', ids).where('state', 'sending').update({ state: 'queued', lease_until: null });
    },

    /** A claimed message that should no longer go out (its session moved, was cancelled or began). */
    /** What a row will be sent as, when it is written afresh at sending time. */
    async rewrite(id: number, mail: { to: string[]; subject: string; text: string; html: string }): Promise<void> {
      await db('outbox_messages').where({ id, state: 'sending' }).update({ recipients_json: JSON.stringify(mail.to), subject: mail.subject, text_body: mail.text, html_body: mail.html });
    },
    /** Queued rows whose key starts with `prefix` and that are not due before `after` (still waiting). */
    async waitingWithPrefix(prefix: string, after: Date, trx: Db = db): Promise<Array<{ id: number; uniqueKey: string }>> {
      const escaped = prefix.replace(/[\\%_]/g, (c) => `\\${c}`);
      const rows = (await trx('outbox_messages')
        .whereRaw("unique_key LIKE ? ESCAPE '\\'", [`${escaped}%`])
        .where('state', 'queued')
        .where('next_attempt_at', '>', after.toISOString())
        .orderBy('id')
        .select('id', 'unique_key')) as Array<{ id: number; unique_key: string }>;
      return rows.map((r) => ({ id: r.id, uniqueKey: r.unique_key }));
    },
    async skipWaiting(ids: number[], why: string, trx: Db = db): Promise<void> {
      if (ids.length) await trx('outbox_messages').whereIn('id', ids).where('state', 'queued').update({ state: 'skipped', last_error: why });
    },
    async markSkipped(id: number, why: string): Promise<void> {
      await db('outbox_messages').where({ id }).update({ state: 'skipped', lease_until: null, last_error: why });
    },

    /** Newest first, keyset on id (PRODUCT.md §10). */
    async page(filter: { state?: OutboxState; kind?: OutboxKind; to?: string; cursor?: [number]; limit?: number }): Promise<Page<OutboxMessage>> {
      const q = db<OutboxRow>('outbox_messages');
      if (filter.state) q.where('state', filter.state);
      if (filter.kind) q.where('kind', filter.kind);
      // Recipients are kept as a JSON array of addresses: one of them is the quoted address.
      if (filter.to) q.whereRaw("LOWER(recipients_json) LIKE ? ESCAPE '\\'", [`%${JSON.stringify(filter.to.toLowerCase()).replace(/[\\%_]/g, (c) => `\\${c}`)}%`]);
      const rows = (await keyset(q, [{ col: 'id', dir: 'desc' }], filter.cursor).limit(pageLimit(filter.limit))) as OutboxRow[];
      const page = cutPage(rows, filter.limit, (r) => [r.id]);
      return { items: page.rows.map(toMessage), nextCursor: page.nextCursor };
    },
  };
}
export type OutboxRepository = ReturnType<typeof outboxRepository>;
