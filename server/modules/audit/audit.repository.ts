import { createHash } from 'node:crypto';
import type { Db } from '../../db/knex';

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

    async list(filter: { entity?: string; entityId?: number; limit?: number }) {
      const q = db<AuditRow>('audit_entries').leftJoin('users', 'users.id', 'audit_entries.actor_id').orderBy('audit_entries.id', 'desc').limit(filter.limit ?? 200);
      if (filter.entity) q.where('audit_entries.entity', filter.entity);
      if (filter.entityId) q.where('audit_entries.entity_id', filter.entityId);
      const rows = await q.select('audit_entries.*', 'users.name as actor_name');
      return rows.map((r: AuditRow & { actor_name: string | null }) => ({
        id: r.id,
        at: r.at,
        actor: r.actor_name,
        action: r.action,
        entity: r.entity,
        entityId: r.entity_id,
        before: r.before_json ? JSON.parse(r.before_json) : null,
        after: r.after_json ? JSON.parse(r.after_json) : null,
      }));
    },
  };
}
export type AuditRepository = ReturnType<typeof auditRepository>;
