import { rawConnectionOf, type Db } from './knex';

/**
 * A token that changes whenever the records a kept answer reads may have changed:
 *
 * - our own writes, counted from the statements through this knex: a write to any table but the
 *   ones no kept answer reads (`UNREAD_TABLES`) counts when it starts and when it has run, and so
 *   does the COMMIT or ROLLBACK of a transaction that made one;
 * - anyone else's commits (a second server on the same file, a maintenance script), from SQLite's
 *   `PRAGMA data_version` on our own connection, which moves only when another connection commits.
 *
 * Derived answers kept under one token are never served under another.
 */
export interface DataVersion {
  current(): Promise<string>;
}

/**
 * Mail bookkeeping (written every worker cycle) and the sign-in counters (written at every
 * sign-in): read by no kept answer (sessions, Today, points, people).
 */
export const UNREAD_TABLES = new Set(['outbox_messages', 'sign_in_counters']);

const READ = /^\s*(select\b|pragma\s+data_version\b)/i;
const TX_START = /^\s*(begin|savepoint)\b/i;
const TX_END = /^\s*(commit|rollback|release)\b/i;
const TARGET = /^\s*(?:insert\s+(?:or\s+\w+\s+)?into|update(?:\s+or\s+\w+)?|delete\s+from|replace\s+into)\s+[`"[]?(\w+)/i;

interface Statement {
  sql?: string;
  __knexTxId?: string;
}

export function dataVersion(db: Db): DataVersion {
  let writes = 0;
  const dirty = new Set<string>();
  const onStatement = (q: Statement) => {
    const sql = q.sql ?? '';
    if (READ.test(sql) || TX_START.test(sql)) return;
    if (TX_END.test(sql)) {
      // A transaction's end counts when it wrote something that matters (or is not knex's own).
      if (!q.__knexTxId || dirty.delete(q.__knexTxId)) writes++;
      return;
    }
    const table = TARGET.exec(sql)?.[1];
    if (table && UNREAD_TABLES.has(table)) return;
    writes++;
    if (q.__knexTxId) dirty.add(q.__knexTxId);
  };
  db.on('query', onStatement);
  // Counted again once the statement has run, so an answer begun while it ran is never served after.
  db.on('query-response', (_r: unknown, q: Statement) => onStatement(q));
  db.on('query-error', (_e: unknown, q: Statement) => onStatement(q));

  const raw = rawConnectionOf(db);
  let pragma: { get(): unknown } | null = null;
  let preparedFor = -1;
  const others = async (): Promise<string> => {
    if (raw?.conn) {
      // Synchronous and read-only; on the pool's one connection it sees other connections' commits.
      if (preparedFor !== raw.generation) {
        pragma = raw.conn.prepare('PRAGMA data_version').pluck();
        preparedFor = raw.generation;
      }
      return `${raw.generation}.${String(pragma!.get())}`;
    }
    const rows = (await db.raw('PRAGMA data_version')) as Array<{ data_version: number }>;
    return `p.${rows[0]?.data_version ?? 0}`;
  };
  return {
    async current() {
      return `${writes}:${await others()}`;
    },
  };
}
