import { chmodSync, closeSync, existsSync, mkdirSync, openSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname } from 'node:path';
import knexFactory, { type Knex } from 'knex';
import { migrationSource } from '../../migrations';
import { installDataVersionTriggers, isPostgres, isPostgresUrl, postgresConnection, takePostgresWriteLock } from './dialect';

export type Db = Knex;

/** The SQLite connection behind a knex made by `createDb`, and how many times it was (re)opened. */
export interface RawConnection {
  conn: { prepare(sql: string): { pluck(): { get(): unknown } }; inTransaction: boolean } | null;
  generation: number;
}
const rawConnections = new WeakMap<Db, RawConnection>();
export const rawConnectionOf = (db: Db): RawConnection | undefined => rawConnections.get(db);

/** How long SQLite itself waits for a lock (blocking the event loop) before answering SQLITE_BUSY. */
const BUSY_TIMEOUT_MS = 5000;
/** While taking the write lock we wait only briefly in SQLite and retry without blocking (writeTransaction). */
const BEGIN_BUSY_TIMEOUT_MS = 25;

/** Only the owner of the process may read the records (staff e-mails, password hashes, the audit). */
export const PRIVATE_FILE_MODE = 0o600;
export const PRIVATE_DIR_MODE = 0o700;

/**
 * The database file, its WAL and shared-memory files are created (and kept) readable by the
 * owner only: SQLite gives the WAL and SHM the main file's mode, so the main file is made first
 * with 0600, and files an older version left wider are narrowed.
 */
export function preparePrivateDbFile(file: string): void {
  const dir = dirname(file);
  if (!existsSync(dir)) mkdirSync(dir, { recursive: true, mode: PRIVATE_DIR_MODE });
  if (!existsSync(file)) closeSync(openSync(file, 'a', PRIVATE_FILE_MODE));
  narrowToOwner(file);
}

/** chmod 0600 on a database file and whichever of its -wal/-shm exist; a file we do not own is left as it is. */
export function narrowToOwner(file: string): void {
  for (const f of [file, `${file}-wal`, `${file}-shm`]) {
    try {
      if (existsSync(f)) chmodSync(f, PRIVATE_FILE_MODE);
    } catch {
      /* not ours to change (EPERM): SQLite still opens it */
    }
  }
}

// knex's SQLite transaction always says `BEGIN` (deferred): it reads at one snapshot and asks for
// the write lock only at its first write, and when another process committed in between SQLite
// refuses the upgrade with SQLITE_BUSY_SNAPSHOT without waiting. A write transaction therefore
// begins with `BEGIN IMMEDIATE`, which takes the write lock before reading anything.
const require = createRequire(import.meta.url);
type TransactionCtor = new (client: unknown, container: unknown, config?: Record<string, unknown>, outerTx?: unknown) => {
  query(conn: unknown, sql: string): Promise<unknown>;
  trxClient: { query(conn: unknown, sql: string): Promise<unknown> };
};
const SqliteTransaction = require('knex/lib/dialects/sqlite3/execution/sqlite-transaction') as TransactionCtor;
const BetterSqliteClient = require('knex/lib/dialects/better-sqlite3') as new (config: Knex.Config) => object;

type PragmaConn = { pragma(s: string): unknown };

class LoftwiseSqliteTransaction extends SqliteTransaction {
  private readonly immediate: boolean;
  constructor(client: unknown, container: unknown, config?: Record<string, unknown>, outerTx?: unknown) {
    super(client, container, config, outerTx);
    this.immediate = Boolean(config?.immediate);
  }
  async begin(conn: PragmaConn): Promise<unknown> {
    if (!this.immediate) return this.query(conn, 'BEGIN;');
    conn.pragma(`busy_timeout = ${BEGIN_BUSY_TIMEOUT_MS}`);
    try {
      // Straight to the client: knex's own transaction query would reject the transaction and
      // still run its body; a failed BEGIN must reject before anything of `fn` runs.
      return await this.trxClient.query(conn, 'BEGIN IMMEDIATE;');
    } catch (err) {
      // Nothing of the transaction has run: writeTransaction may safely try it again.
      if (isBusy(err)) (err as { lockNotTaken?: boolean }).lockNotTaken = true;
      throw err;
    } finally {
      conn.pragma(`busy_timeout = ${BUSY_TIMEOUT_MS}`);
    }
  }
}

type Statement = { reader: boolean; all(bindings: unknown[]): unknown };
type StatementConn = { prepare(sql: string): Statement };
/** Prepared read statements kept per connection, by SQL text (see `_query` below). */
const preparedReads = new WeakMap<object, Map<string, Statement>>();
const PREPARED_READS_KEPT = 500;

class LoftwiseSqliteClient extends (BetterSqliteClient as new (config: Knex.Config) => { transaction(...args: unknown[]): unknown; _query(conn: unknown, obj: unknown): Promise<unknown>; _formatBindings(b: unknown): unknown[]; _optSafeIntegers(o: unknown): boolean | undefined }) {
  override transaction(...args: unknown[]) {
    const [container, config, outerTx] = args;
    return new LoftwiseSqliteTransaction(this, container, config as Record<string, unknown> | undefined, outerTx);
  }

  /**
   * Reads run through a statement prepared once per connection and SQL text (at most 500 kept, the
   * oldest dropped first) instead of one prepared for every query, as knex's client does: preparing
   * was about a tenth of a cold calendar week. `all()` runs synchronously to the end, so a kept
   * statement is never in use twice at once; SQLite re-prepares a statement by itself after a
   * schema change. Writes, and reads asking for safe integers, go through knex's own path.
   */
  override async _query(conn: unknown, obj: unknown): Promise<unknown> {
    const q = obj as { sql?: string; bindings?: unknown[]; options?: unknown; method?: string; response?: unknown };
    if (!q.sql || this._optSafeIntegers(q.options) !== undefined || !/^\s*(select|with)\b/i.test(q.sql)) return super._query(conn, obj);
    let kept = preparedReads.get(conn as object);
    if (!kept) preparedReads.set(conn as object, (kept = new Map()));
    let statement = kept.get(q.sql);
    if (!statement) {
      statement = (conn as StatementConn).prepare(q.sql);
      if (!statement.reader) return super._query(conn, obj);
      if (kept.size >= PREPARED_READS_KEPT) kept.delete(kept.keys().next().value as string);
      kept.set(q.sql, statement);
    }
    q.response = statement.all(this._formatBindings(q.bindings));
    return q;
  }
}

export const isBusy = (err: unknown): boolean => {
  const code = (err as { code?: unknown })?.code;
  // SQLite's busy answers; PostgreSQL's lock timeout, deadlock and serialisation failure.
  return typeof code === 'string' && (code.startsWith('SQLITE_BUSY') || code === '55P03' || code === '40P01' || code === '40001');
};

/** How long a write keeps trying for the lock before giving up with a 503. */
const WRITE_LOCK_PATIENCE_MS = 15_000;

export class DatabaseBusyError extends Error {
  constructor() {
    super('The database stayed busy; nothing was changed.');
  }
}

/**
 * Every transaction that writes goes through here. On SQLite it takes the write lock first
 * (`BEGIN IMMEDIATE`), so no read inside it can go stale before its write; while another
 * process holds the lock it waits with growing, jittered pauses (not blocking the event loop)
 * and tries again. Only the lock is retried, never a transaction that has begun, so `fn` runs
 * once. On PostgreSQL it takes a transaction-scoped advisory lock first (server/db/dialect.ts),
 * so write transactions run one at a time there too, waiting at most as long.
 */
export async function writeTransaction<T>(db: Db, fn: (trx: Knex.Transaction) => Promise<T>): Promise<T> {
  if (isPostgres(db)) {
    try {
      return await db.transaction(async (trx) => {
        await takePostgresWriteLock(trx, WRITE_LOCK_PATIENCE_MS);
        return fn(trx);
      });
    } catch (err) {
      if ((err as { lockNotTaken?: boolean })?.lockNotTaken) throw new DatabaseBusyError();
      throw err;
    }
  }
  if (!isSqlite(db)) return db.transaction(fn);
  const giveUpAt = Date.now() + WRITE_LOCK_PATIENCE_MS;
  for (let attempt = 0; ; attempt++) {
    try {
      return await db.transaction(fn, { immediate: true } as Knex.TransactionConfig);
    } catch (err) {
      if (!(err as { lockNotTaken?: boolean })?.lockNotTaken) throw err;
      if (Date.now() >= giveUpAt) throw new DatabaseBusyError();
      const pause = Math.min(200, 5 * 2 ** Math.min(attempt, 6));
      await new Promise((r) => setTimeout(r, pause / 2 + Math.random() * pause));
    }
  }
}

/**
 * Several reads that must agree with each other (an export's rows and the chain head printed
 * under them): one snapshot. SQLite's transaction reads at one snapshot already; PostgreSQL's
 * default READ COMMITTED takes one per statement, so it asks for REPEATABLE READ.
 */
export async function readTransaction<T>(db: Db, fn: (trx: Knex.Transaction) => Promise<T>): Promise<T> {
  if (isPostgres(db)) return db.transaction(fn, { isolationLevel: 'repeatable read', readOnly: true } as Knex.TransactionConfig);
  return db.transaction(fn);
}

const isSqlite = (db: Db) => db.client instanceof LoftwiseSqliteClient;

/**
 * `target` is a SQLite file (the default) or a `postgres://` URL.
 *
 * SQLite: one connection: SQLite has one writer, and a single connection serialises our transactions.
 * synchronous=FULL so an acknowledged inspection or fault survives a crash or power loss
 * (see DEVELOPERS.md, "Durability").
 */
export function createDb(target: string, opts: { poolMax?: number } = {}): Db {
  if (isPostgresUrl(target)) {
    return knexFactory({
      client: 'pg',
      connection: postgresConnection(target),
      pool: { min: 0, max: opts.poolMax ?? 10 },
      migrations: { migrationSource },
    });
  }
  const file = target;
  if (file !== ':memory:') preparePrivateDbFile(file);
  const raw: RawConnection = { conn: null, generation: 0 };
  const db = knexFactory({
    client: LoftwiseSqliteClient as unknown as typeof Knex.Client,
    connection: { filename: file },
    useNullAsDefault: true,
    pool: {
      min: 1,
      max: 1,
      afterCreate(conn: PragmaConn, done: (err: Error | null, conn: unknown) => void) {
        try {
          if (file !== ':memory:') conn.pragma('journal_mode = WAL');
          conn.pragma('synchronous = FULL');
          conn.pragma('foreign_keys = ON');
          conn.pragma(`busy_timeout = ${BUSY_TIMEOUT_MS}`);
          // The WAL and SHM now exist, with the main file's mode; narrowed again in case they were older.
          if (file !== ':memory:') narrowToOwner(file);
          raw.conn = conn as unknown as RawConnection['conn'];
          raw.generation++;
          done(null, conn);
        } catch (err) {
          done(err as Error, conn);
        }
      },
    },
    migrations: { migrationSource },
  });
  rawConnections.set(db, raw);
  return db;
}

export async function migrate(db: Db): Promise<void> {
  await db.migrate.latest();
  // Every table a kept answer may read moves the data version (server/db/data-version.ts).
  await installDataVersionTriggers(db);
}
