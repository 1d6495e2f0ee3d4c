import Database from 'better-sqlite3';
import type { Db } from './knex';

/**
 * A token that changes whenever the database may have changed: a counter of our own statements
 * that are not reads (every COMMIT and ROLLBACK included), joined with SQLite's
 * `PRAGMA data_version`, which moves when a connection other than the one asking commits — a
 * second server on the same file, a maintenance script. Derived answers cached under one token
 * are never served under another.
 *
 * The pragma is asked on a read-only connection of its own, so it also moves with our commits and
 * costs a few microseconds instead of a trip through the query pool.
 */
export interface DataVersion {
  current(): Promise<string>;
  close(): void;
}

const READ = /^\s*(select\b|pragma\s+data_version\b)/i;

export function dataVersion(db: Db): DataVersion {
  let writes = 0;
  const onStatement = (q: { sql?: string }) => {
    if (!READ.test(q.sql ?? '')) writes++;
  };
  db.on('query', onStatement);
  // Counted again when the statement has run, so a read that started meanwhile sees a new token.
  db.on('query-response', (_r: unknown, q: { sql?: string }) => onStatement(q));
  db.on('query-error', (_e: unknown, q: { sql?: string }) => onStatement(q));

  const file = (db.client.config.connection as { filename?: string } | undefined)?.filename;
  let watcher: Database.Database | null = null;
  let pragma: Database.Statement | null = null;
  const external = async (): Promise<number> => {
    if (file && file !== ':memory:') {
      try {
        watcher ??= new Database(file, { readonly: true, fileMustExist: true });
        pragma ??= watcher.prepare('PRAGMA data_version').pluck();
        return pragma.get() as number;
      } catch {
        // Not readable on its own (yet): ask through the pool instead.
      }
    }
    const rows = (await db.raw('PRAGMA data_version')) as Array<{ data_version: number }>;
    return rows[0]?.data_version ?? 0;
  };
  return {
    async current() {
      return `${writes}:${await external()}`;
    },
    close() {
      watcher?.close();
      watcher = pragma = null;
    },
  };
}
