import { createHash } from 'node:crypto';
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import knexFactory, { type Knex } from 'knex';
import { createDb, migrate } from '../../server/db/knex';

/**
 * Where tests put their databases: a SQLite file by default; with TEST_DATABASE_URL
 * (postgres://…/postgres, a role that may create databases) a fresh PostgreSQL database per
 * test, copied from a migrated template made once per migration set, dropped at close.
 */
export const TEST_DATABASE_URL = process.env.TEST_DATABASE_URL || null;
export const onPostgres = TEST_DATABASE_URL !== null;
/** For `describe.skipIf(onPostgres)` / `it.skipIf`: tests of SQLite itself (its files, its backup API). */
export const sqliteOnly = onPostgres;

let admin: Knex | null = null;
const adminDb = () =>
  (admin ??= knexFactory({ client: 'pg', connection: TEST_DATABASE_URL!, pool: { min: 0, max: 2 } }));

const urlFor = (name: string) => {
  const u = new URL(TEST_DATABASE_URL!);
  u.pathname = `/${name}`;
  return u.toString();
};

/** Changes whenever a migration or the adapter does, so a stale template is never used. */
function schemaHash(): string {
  const h = createHash('sha256');
  const root = fileURLToPath(new URL('../..', import.meta.url));
  for (const f of readdirSync(join(root, 'migrations')).sort()) h.update(f).update(readFileSync(join(root, 'migrations', f)));
  h.update(readFileSync(join(root, 'server/db/dialect.ts')));
  h.update(readFileSync(join(root, 'server/db/knex.ts')));
  return h.digest('hex').slice(0, 12);
}

let template: Promise<string> | null = null;
function migratedTemplate(): Promise<string> {
  return (template ??= (async () => {
    const name = `loftwise_template_${schemaHash()}`;
    const a = adminDb();
    // One test process builds it; the others wait on the lock and find it made.
    await a.transaction(async (trx) => {
      await trx.raw('SELECT pg_advisory_xact_lock(7715001)');
      const found = await trx.raw('SELECT 1 FROM pg_database WHERE datname = ?', [name]);
      if (found.rows.length) return;
      await a.raw(`CREATE DATABASE ${name} TEMPLATE template0 ENCODING 'UTF8' LC_COLLATE 'C' LC_CTYPE 'C'`);
      const db = createDb(urlFor(name), { poolMax: 1 });
      try {
        await migrate(db);
      } finally {
        await db.destroy();
      }
    });
    return name;
  })());
}

export interface TestDatabase {
  /** What createDb opens: the SQLite file or the PostgreSQL URL. */
  target: string;
  drop(): Promise<void>;
}

/** A fresh, migrated (on PostgreSQL) or empty (SQLite: migrate it) database for one test. */
export async function freshDatabase(dir: string, file = 'test.sqlite', opts: { empty?: boolean } = {}): Promise<TestDatabase> {
  if (!onPostgres) return { target: join(dir, file), drop: async () => undefined };
  const tmpl = opts.empty ? "template0 ENCODING 'UTF8' LC_COLLATE 'C' LC_CTYPE 'C'" : await migratedTemplate();
  const name = `loftwise_t_${process.pid}_${Date.now().toString(36)}_${Math.random().toString(36).slice(2, 8)}`;
  await adminDb().raw(`CREATE DATABASE ${name} TEMPLATE ${tmpl}`);
  return {
    target: urlFor(name),
    drop: async () => {
      await adminDb().raw(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`);
    },
  };
}
