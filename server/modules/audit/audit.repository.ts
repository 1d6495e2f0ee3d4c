import { withUpdatesAllowed } from '../../db/dialect';
import { createHash, createHmac, timingSafeEqual } from 'node:crypto';
import { writeTransaction, type Db } from '../../db/knex';
import { cutPage, keyset, pageLimit, type Page } from '../../db/keyset';
import type { AuditEntry, AuditListQuery } from '../../../shared/schemas/audit';

export interface AuditInput {
  actorId: number | null;
  action: string;
  entity: string;
  entityId: number | null;
  before?: unknown;
  after?: unknown;
}

interface AuditRow {
  id: number;
  at: string;
  actor_id: number | null;
  action: string;
  entity: string;
  entity_id: number | null;
  before_json: string | null;
  after_json: string | null;
  prev_hash: string;
  hash: string;
}

export interface ChainHead {
  count: number;
  hash: string;
}

export interface ChainCheck {
  ok: boolean;
  entries: number;
  firstBadId: number | null;
  problem: string | null;
  head: ChainHead;
  /** Present when a head published earlier was given: whether it is still in the chain. */
  publishedHead?: ChainHead & { found: boolean; problem: string | null };
}

/** A point's label and clearance columns as stored (`points.last_cleared_at`, `clearance_voided_at`). */
export interface PointAsStored {
  id: number;
  label: string;
  lastClearedAt: string | null;
  clearanceVoidedAt: string | null;
}

/** A `clearance_voids` row: the void of the clearance by inspection `inspectionId`. */
export interface ClearanceVoidOnRecord {
  inspectionId: number;
  pointId: number;
  at: string;
  reason: string;
}

/** An audit entry of a clearance or of its void; `inspectionId` is NaN when the entry names none. */
export interface ClearanceEntry {
  action: 'point.cleared' | 'point.clearance_voided';
  pointId: number;
  at: string;
  inspectionId: number;
}

/** The key chaining audit entries; kept outside the database (AUDIT_KEY or a file beside the auth secret). */
export type AuditKey = string | Buffer;

const GENESIS = '0'.repeat(64);

const fieldsOf = (r: Omit<AuditRow, 'hash'>) => JSON.stringify([r.id, r.at, r.actor_id, r.action, r.entity, r.entity_id, r.before_json, r.after_json, r.prev_hash]);

/**
 * The hash covers every field and the previous hash, so an edit, a gap or a reorder breaks the
 * chain; it is an HMAC-SHA-256 under a key the database does not hold, so someone who can write
 * the file cannot recompute a chain that verifies (PRODUCT.md §10).
 */
export function keyedHashOf(key: AuditKey, r: Omit<AuditRow, 'hash'>): string {
  return createHmac('sha256', key).update(fieldsOf(r)).digest('hex');
}

/** The chain as it was before entries were keyed: plain SHA-256, which anyone can recompute. */
export function unkeyedHashOf(r: Omit<AuditRow, 'hash'>): string {
  return createHash('sha256').update(fieldsOf(r)).digest('hex');
}

const sameHex = (a: string, b: string) => a.length === b.length && timingSafeEqual(Buffer.from(a), Buffer.from(b));

/** `count:hash`, as printed on exports and digests. */
export const formatHead = (h: ChainHead) => `${h.count}:${h.hash}`;
export function parseHead(text: string): ChainHead | null {
  const m = /^(\d{1,12}):([0-9a-f]{64})$/.exec(text.trim());
  return m ? { count: Number(m[1]), hash: m[2] } : null;
}

/**
 * `key` is needed to append and to verify; reading the head needs none. A repository made without
 * it refuses to append rather than write an entry no one could verify.
 */
export function auditRepository(db: Db, key?: AuditKey) {
  const needKey = (): AuditKey => {
    if (key === undefined || key.length === 0) throw new Error('The audit key is not configured: entries cannot be chained.');
    return key;
  };

  /** Walks the chain; `hashOf` decides keyed or not. */
  function walk(rows: AuditRow[], hashOf: (r: AuditRow) => string): Omit<ChainCheck, 'head'> {
    let prev = GENESIS;
    let expectedId = 1;
    for (const r of rows) {
      if (r.id !== expectedId) return { ok: false, entries: rows.length, firstBadId: r.id, problem: `Entry ${expectedId} is missing from the audit chain.` };
      if (r.prev_hash !== prev) return { ok: false, entries: rows.length, firstBadId: r.id, problem: `Entry ${r.id} does not follow the one before it.` };
      if (!sameHex(hashOf(r), r.hash)) return { ok: false, entries: rows.length, firstBadId: r.id, problem: `Entry ${r.id} (${r.action}) was changed after it was written, or its hash was not made with this studio’s audit key.` };
      prev = r.hash;
      expectedId += 1;
    }
    return { ok: true, entries: rows.length, firstBadId: null, problem: null };
  }

  const headOf = (rows: AuditRow[]): ChainHead => {
    const last = rows[rows.length - 1];
    return { count: last?.id ?? 0, hash: last?.hash ?? GENESIS };
  };

  return {
    /** Append one entry; call inside the transaction of the change it records. */
    async record(trx: Db, e: AuditInput, at: Date): Promise<void> {
      const k = needKey();
      const last = await trx<AuditRow>('audit_entries').orderBy('id', 'desc').first('id', 'hash');
      const row = {
        id: (last?.id ?? 0) + 1,
        at: at.toISOString(),
        actor_id: e.actorId,
        action: e.action,
        entity: e.entity,
        entity_id: e.entityId,
        before_json: e.before === undefined ? null : JSON.stringify(e.before),
        after_json: e.after === undefined ? null : JSON.stringify(e.after),
        prev_hash: last?.hash ?? GENESIS,
      };
      await trx('audit_entries').insert({ ...row, hash: keyedHashOf(k, row) });
    },

    /**
     * Checks every entry under the key and, given a head published earlier (on an export or a
     * digest), that the entry it names is still there with the same hash: deleting the newest
     * entries, or rewriting the chain, cannot pass against it.
     */
    async verify(published?: ChainHead): Promise<ChainCheck> {
      const k = needKey();
      const rows = await db<AuditRow>('audit_entries').orderBy('id');
      const result: ChainCheck = { ...walk(rows, (r) => keyedHashOf(k, r)), head: headOf(rows) };
      if (published) {
        const entry = rows.find((r) => r.id === published.count);
        let problem: string | null = null;
        if (published.count === 0) problem = null;
        else if (!entry) problem = `The published head names entry ${published.count}, but the chain holds ${rows.length} ${rows.length === 1 ? 'entry' : 'entries'}: entries were deleted since it was published.`;
        else if (!sameHex(entry.hash, published.hash)) problem = `Entry ${published.count} no longer has the hash published for it: the chain was rewritten since.`;
        result.publishedHead = { ...published, found: problem === null, problem };
        if (problem) {
          result.ok = false;
          result.problem ??= problem;
          result.firstBadId ??= Math.min(published.count, rows.length + 1);
        }
      }
      return result;
    },

    /** Whether the whole chain verifies as the plain SHA-256 chain written before entries were keyed. */
    async verifiesUnkeyed(trx: Db = db): Promise<boolean> {
      return walk(await trx<AuditRow>('audit_entries').orderBy('id'), unkeyedHashOf).ok;
    },

    /** Whether the whole chain verifies under the key. */
    async verifiesKeyed(trx: Db = db): Promise<boolean> {
      const k = needKey();
      return walk(await trx<AuditRow>('audit_entries').orderBy('id'), (r) => keyedHashOf(k, r)).ok;
    },

    /**
     * Re-chains every entry under the key, in one transaction, with the append-only triggers
     * lifted only inside it. Only for a chain that verifies unkeyed (see chain-upgrade.ts).
     */
    async rechainUnderKey(): Promise<number> {
      const k = needKey();
      return writeTransaction(db, async (trx) => {
        const rows = await trx<AuditRow>('audit_entries').orderBy('id');
        if (!walk(rows, unkeyedHashOf).ok) throw new Error('The unkeyed audit chain does not verify; it is not re-chained.');
        // The refusal of updates is lifted inside this transaction only (server/db/dialect.ts).
        await withUpdatesAllowed(trx, 'audit_entries', async () => {
          let prev = GENESIS;
          for (const r of rows) {
            const next = { ...r, prev_hash: prev };
            const hash = keyedHashOf(k, next);
            await trx('audit_entries').where({ id: r.id }).update({ prev_hash: prev, hash });
            prev = hash;
          }
        });
        return rows.length;
      });
    },

    /** The chain's head as published on exports and digests: how many entries, and the newest hash. */
    async head(trx: Db = db): Promise<ChainHead> {
      const last = await trx<AuditRow>('audit_entries').orderBy('id', 'desc').first('id', 'hash');
      return { count: last?.id ?? 0, hash: last?.hash ?? GENESIS };
    },

    /** The owner's audit list: filtered by who, what, which record and when; newest first, keyset on id. */
    async page(q: AuditListQuery): Promise<Page<AuditEntry>> {
      const sel = db<AuditRow>('audit_entries').leftJoin('users', 'users.id', 'audit_entries.actor_id');
      if (q.actorId) sel.where('audit_entries.actor_id', q.actorId);
      if (q.action) sel.where('audit_entries.action', q.action);
      if (q.entity) sel.where('audit_entries.entity', q.entity);
      if (q.entityId) sel.where('audit_entries.entity_id', q.entityId);
      if (q.from) sel.where('audit_entries.at', '>=', new Date(q.from).toISOString());
      if (q.to) sel.where('audit_entries.at', '<', new Date(q.to).toISOString());
      const rows = (await keyset(sel, [{ col: 'audit_entries.id', dir: 'desc' }], q.cursor)
        .limit(pageLimit(q.limit))
        .select('audit_entries.*', 'users.name as actor_name')) as Array<AuditRow & { actor_name: string | null }>;
      const page = cutPage(rows, q.limit, (r) => [r.id]);
      const json = (text: string | null): unknown => {
        if (!text) return null;
        try {
          return JSON.parse(text);
        } catch {
          return text;
        }
      };
      return {
        items: page.rows.map((r) => ({
          id: r.id,
          at: r.at,
          actorId: r.actor_id,
          actor: r.actor_name,
          action: r.action,
          entity: r.entity,
          entityId: r.entity_id,
          before: json(r.before_json),
          after: json(r.after_json),
        })),
        nextCursor: page.nextCursor,
      };
    },

    /** The actions and record types present, for the filters to offer. */
    async facets(): Promise<{ actions: string[]; entities: string[] }> {
      const actions = (await db('audit_entries').distinct('action').orderBy('action')) as Array<{ action: string }>;
      const entities = (await db('audit_entries').distinct('entity').orderBy('entity')) as Array<{ entity: string }>;
      return { actions: actions.map((r) => r.action), entities: entities.map((r) => r.entity) };
    },

    // ---- what the verify compares: the rows as stored, read raw (not through the rules that
    // derive a status from them), since a hand edit of any of them is what it looks for.

    /** Every point's label and stored clearance columns, by label. */
    async pointsAsStored(trx: Db = db): Promise<PointAsStored[]> {
      const rows = (await trx('points').orderBy('label').select('id', 'label', 'last_cleared_at', 'clearance_voided_at')) as Array<{ id: number; label: string; last_cleared_at: string | null; clearance_voided_at: string | null }>;
      return rows.map((r) => ({ id: r.id, label: r.label, lastClearedAt: r.last_cleared_at, clearanceVoidedAt: r.clearance_voided_at }));
    },
    /** Every void of a clearance on record. */
    async clearanceVoidsOnRecord(trx: Db = db): Promise<ClearanceVoidOnRecord[]> {
      const rows = (await trx('clearance_voids').select('inspection_id', 'point_id', 'at', 'reason')) as Array<{ inspection_id: number; point_id: number; at: string; reason: string }>;
      return rows.map((r) => ({ inspectionId: r.inspection_id, pointId: r.point_id, at: r.at, reason: r.reason }));
    },
    /** The chain's entries of clearances and their voids, with the inspection each names. */
    async clearanceEntries(trx: Db = db): Promise<ClearanceEntry[]> {
      const rows = (await trx('audit_entries').whereIn('action', ['point.cleared', 'point.clearance_voided']).select('action', 'entity_id', 'at', 'after_json')) as Array<{ action: ClearanceEntry['action']; entity_id: number; at: string; after_json: string | null }>;
      return rows.map((r) => ({ action: r.action, pointId: r.entity_id, at: r.at, inspectionId: Number((JSON.parse(r.after_json ?? '{}') as { inspectionId?: number }).inspectionId) }));
    },
  };
}
export type AuditRepository = ReturnType<typeof auditRepository>;
