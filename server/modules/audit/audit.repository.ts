import { createHash } from 'node:crypto';
import type { Db } from '../../db/knex';
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

const GENESIS = '0'.repeat(64);

/** The hash covers every field and the previous hash, so an edit, a gap or a reorder breaks the chain. */
function hashOf(r: Omit<AuditRow, 'id' | 'hash'> & { id: number }): string {
  return createHash('sha256')
    .update(JSON.stringify([r.id, r.at, r.actor_id, r.action, r.entity, r.entity_id, r.before_json, r.after_json, r.prev_hash]))
    .digest('hex');
}

export function auditRepository(db: Db) {
  return {
    /** Append one entry; call inside the transaction of the change it records. */
    async record(trx: Db, e: AuditInput, at: Date): Promise<void> {
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
      await trx('audit_entries').insert({ ...row, hash: hashOf(row) });
    },

    async verify(): Promise<{ ok: boolean; entries: number; firstBadId: number | null; problem: string | null }> {
      const rows = await db<AuditRow>('audit_entries').orderBy('id');
      let prev = GENESIS;
      let expectedId = 1;
      for (const r of rows) {
        if (r.id !== expectedId) return { ok: false, entries: rows.length, firstBadId: r.id, problem: `Entry ${expectedId} is missing.` };
        if (r.prev_hash !== prev) return { ok: false, entries: rows.length, firstBadId: r.id, problem: `Entry ${r.id} does not follow the one before it.` };
        if (hashOf(r) !== r.hash) return { ok: false, entries: rows.length, firstBadId: r.id, problem: `Entry ${r.id} was changed after it was written.` };
        prev = r.hash;
        expectedId += 1;
      }
      return { ok: true, entries: rows.length, firstBadId: null, problem: null };
    },

    /** The chain's head as published on exports and digests: how many entries, and the newest hash. */
    async head(trx: Db = db): Promise<{ count: number; hash: string }> {
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
  };
}
export type AuditRepository = ReturnType<typeof auditRepository>;
