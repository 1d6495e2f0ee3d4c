import { rawConnectionOf, type Db } from './knex';
import { UNVERSIONED_TABLES } from './dialect';

/**
 * A token that changes whenever the records a kept answer reads may have changed: the single
 * row of `data_versions`, moved by triggers on every table but `UNVERSIONED_TABLES` (installed
 * by `installDataVersionTriggers` after each migrate), whoever commits the change: this process,
 * another server process on the same database, a maintenance script. One indexed read per ask;
 * the same on SQLite and PostgreSQL.
 *
 * Derived answers kept under one token are never served under another.
 */
export interface DataVersion {
  current(): Promise<string>;
}

/** Read by no kept answer (sessions, Today, points, people): writing them keeps kept answers. */
export const UNREAD_TABLES = UNVERSIONED_TABLES;

const READ_VERSION = 'SELECT version FROM data_versions WHERE id = 1';

export function dataVersion(db: Db): DataVersion {
  const raw = rawConnectionOf(db);
  let prepared: { get(): unknown } | null = null;
  let preparedFor = -1;
  return {
    async current() {
      // SQLite: synchronous on the pool's one connection, without queueing behind the pool; but
      // not while a transaction is open on it, whose own uncommitted move it would see (and a
      // rollback then takes back, so a later commit could reach the same number).
      if (raw?.conn && !raw.conn.inTransaction) {
        if (preparedFor !== raw.generation) {
          prepared = raw.conn.prepare(READ_VERSION).pluck();
          preparedFor = raw.generation;
        }
        return String(prepared!.get());
      }
      const row = (await db('data_versions').where({ id: 1 }).first('version')) as { version: number | string } | undefined;
      return String(row?.version ?? 0);
    },
  };
}
