import { createRequire } from 'node:module';
import type { Knex } from 'knex';

const pgTypes = (createRequire(import.meta.url)('pg') as { types: { getTypeParser(oid: number, format?: string): unknown } }).types;

/**
 * The one place where SQL differs between SQLite (the default file) and PostgreSQL
 * (`DATABASE_URL=postgres://…`). Feature code, migrations and seeds call these helpers and
 * otherwise write portable knex (see DEVELOPERS.md, "Portable SQL").
 */
export type Dialect = 'sqlite' | 'postgres';

export const dialectOf = (db: Knex | Knex.Transaction): Dialect => (db.client.config?.client === 'pg' || db.client.dialect === 'postgresql' ? 'postgres' : 'sqlite');
export const isPostgres = (db: Knex | Knex.Transaction): boolean => dialectOf(db) === 'postgres';
export const isPostgresUrl = (target: string): boolean => /^postgres(ql)?:\/\//i.test(target);

// ---- PostgreSQL connection: rows read the same as from SQLite

/**
 * Rows read the same from both databases. Counts (`count(*)` is bigint) and `numeric` come from
 * node-postgres as strings; on SQLite they are numbers, and ours never exceed 2^53. Booleans are
 * 0/1 on SQLite, so PostgreSQL's true/false are read as 1/0 too (PostgreSQL takes 1/0 and
 * true/false alike when written). Instants stay ISO text columns on both.
 */
const BOOL = 16;
const INT8 = 20;
const NUMERIC = 1700;
export function postgresConnection(url: string): Knex.PgConnectionConfig {
  return {
    connectionString: url,
    types: {
      getTypeParser: ((oid: number, format?: string) => {
        if (oid === INT8 || oid === NUMERIC) return (v: string) => (v === null ? null : Number(v));
        if (oid === BOOL) return (v: string) => (v === null ? null : v === 't' ? 1 : 0);
        return pgTypes.getTypeParser(oid, format as 'text');
      }) as never,
    },
  } as Knex.PgConnectionConfig;
}

// ---- Triggers

/** The table refuses every UPDATE and DELETE (records that are never rewritten: the audit, inspections…). */
export async function appendOnly(knex: Knex, table: string): Promise<void> {
  await refuseChange(knex, table, 'update');
  await refuseChange(knex, table, 'delete');
}

/** The trigger `<table>_no_update` or `<table>_no_delete`, refusing that change with "<table> are append-only". */
async function refuseChange(knex: Knex, table: string, op: 'update' | 'delete'): Promise<void> {
  const message = `${table} are append-only`;
  if (isPostgres(knex)) {
    await knex.raw(`CREATE OR REPLACE FUNCTION ${table}_append_only() RETURNS trigger LANGUAGE plpgsql AS $$ BEGIN RAISE EXCEPTION '${message}'; END $$`);
    await knex.raw(`CREATE TRIGGER ${table}_no_${op} BEFORE ${op.toUpperCase()} ON ${table} FOR EACH ROW EXECUTE FUNCTION ${table}_append_only()`);
    return;
  }
  await knex.raw(`CREATE TRIGGER ${table}_no_${op} BEFORE ${op.toUpperCase()} ON ${table} BEGIN SELECT RAISE(ABORT, '${message}'); END`);
}

/**
 * Runs `fn` with an append-only table's refusal of updates lifted, inside the caller's write
 * transaction only (DDL is transactional on both databases): for a deliberate, audited rewrite
 * such as re-chaining the audit under its key.
 */
export async function withUpdatesAllowed<T>(trx: Knex.Transaction, table: string, fn: () => Promise<T>): Promise<T> {
  await dropTrigger(trx, table, `${table}_no_update`);
  const result = await fn();
  await refuseChange(trx, table, 'update');
  return result;
}

/**
 * The table refuses an INSERT whose new row matches `when` (portable SQL over `NEW.column`):
 * a check kept as a trigger so it holds for rows written by any tool, not only the app.
 */
export async function refuseInsertWhen(knex: Knex, name: string, table: string, when: string, message: string): Promise<void> {
  if (isPostgres(knex)) {
    await knex.raw(`CREATE OR REPLACE FUNCTION ${name}() RETURNS trigger LANGUAGE plpgsql AS $$ BEGIN IF ${when} THEN RAISE EXCEPTION '${message}'; END IF; RETURN NEW; END $$`);
    await knex.raw(`CREATE TRIGGER ${name} BEFORE INSERT ON ${table} FOR EACH ROW EXECUTE FUNCTION ${name}()`);
    return;
  }
  await knex.raw(`CREATE TRIGGER ${name} BEFORE INSERT ON ${table} WHEN ${when} BEGIN SELECT RAISE(ABORT, '${message}'); END`);
}

/** Drops a trigger (PostgreSQL names triggers per table). For maintenance and tests. */
export async function dropTrigger(knex: Knex, table: string, name: string): Promise<void> {
  await knex.raw(isPostgres(knex) ? `DROP TRIGGER ${name} ON ${table}` : `DROP TRIGGER ${name}`);
}

// ---- The data version: one counter every process reads (server/db/data-version.ts)

/**
 * Tables no kept answer reads, so writing them leaves kept answers alone: mail bookkeeping
 * (written every worker cycle), the sign-in counters (every sign-in), the lease of the mail
 * worker, the counter itself and knex's own.
 */
export const UNVERSIONED_TABLES = new Set(['outbox_messages', 'sign_in_counters', 'verification_tokens', 'worker_leases', 'data_versions', 'knex_migrations', 'knex_migrations_lock']);

/** The tables of the schema (knex's and SQLite's own included where present). */
export async function tableNames(db: Knex): Promise<string[]> {
  if (isPostgres(db)) {
    const r = (await db.raw("SELECT table_name AS name FROM information_schema.tables WHERE table_schema = current_schema() AND table_type = 'BASE TABLE'")) as { rows: Array<{ name: string }> };
    return r.rows.map((x) => x.name);
  }
  const rows = (await db.raw("SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%'")) as Array<{ name: string }>;
  return rows.map((x) => x.name);
}

/**
 * After the migrations: every table but `UNVERSIONED_TABLES` moves `data_versions` on any
 * insert, update or delete, by whoever writes (another process, a maintenance script). Run at
 * each migrate, so a table a later migration adds (or rebuilds) is covered without it asking.
 *
 * SQLite: row triggers in the writing transaction (one writer at a time). PostgreSQL: a
 * deferred constraint trigger, so the counter row is locked only at commit, after every other
 * lock the transaction takes (no deadlock with it), and at most once per transaction.
 */
export async function installDataVersionTriggers(db: Knex): Promise<void> {
  const tables = (await tableNames(db)).filter((t) => !UNVERSIONED_TABLES.has(t));
  if (isPostgres(db)) {
    await db.raw(`CREATE OR REPLACE FUNCTION loftwise_bump_data_version() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF current_setting('loftwise.data_version_moved', true) IS DISTINCT FROM txid_current()::text THEN
    UPDATE data_versions SET version = version + 1 WHERE id = 1;
    PERFORM set_config('loftwise.data_version_moved', txid_current()::text, true);
  END IF;
  RETURN NULL;
END $$`);
    const existing = new Set(
      ((await db.raw("SELECT tgname FROM pg_trigger WHERE tgname LIKE '%\\_data\\_version' ESCAPE '\\' AND NOT tgisinternal")) as { rows: Array<{ tgname: string }> }).rows.map((r) => r.tgname),
    );
    for (const t of tables) {
      if (existing.has(`${t}_data_version`)) continue;
      await db.raw(`CREATE CONSTRAINT TRIGGER ${t}_data_version AFTER INSERT OR UPDATE OR DELETE ON ${t} DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION loftwise_bump_data_version()`);
    }
    return;
  }
  for (const t of tables) {
    for (const op of ['insert', 'update', 'delete']) {
      await db.raw(`CREATE TRIGGER IF NOT EXISTS ${t}_data_version_${op} AFTER ${op.toUpperCase()} ON ${t} BEGIN UPDATE data_versions SET version = version + 1 WHERE id = 1; END`);
    }
  }
}

// ---- Writing

/**
 * PostgreSQL's part of `writeTransaction`: a transaction-scoped advisory lock taken before
 * anything is read, so write transactions run one at a time per database as they do on SQLite
 * (a booking's checks and its insert cannot interleave with another's). Waits at most
 * `patienceMs`; a lock not taken in time rejects with `lockNotTaken` before `fn` runs.
 */
const WRITE_LOCK_KEY = 0x10f7_5e; // any fixed number; advisory locks are per database
export async function takePostgresWriteLock(trx: Knex.Transaction, patienceMs: number): Promise<void> {
  await trx.raw(`SELECT set_config('lock_timeout', ?, true)`, [`${patienceMs}ms`]);
  try {
    await trx.raw('SELECT pg_advisory_xact_lock(?)', [WRITE_LOCK_KEY]);
  } catch (err) {
    if ((err as { code?: string }).code === '55P03') (err as { lockNotTaken?: boolean }).lockNotTaken = true;
    throw err;
  }
  await trx.raw(`SELECT set_config('lock_timeout', '0', true)`);
}
