import { mkdirSync } from 'node:fs';
import { dirname } from 'node:path';
import knexFactory, { type Knex } from 'knex';
import { migrationSource } from '../../migrations';

export type Db = Knex;

/** The SQLite connection behind a knex made by `createDb`, and how many times it was (re)opened. */
export interface RawConnection {
  conn: { prepare(sql: string): { pluck(): { get(): unknown } } } | null;
  generation: number;
}
const rawConnections = new WeakMap<Db, RawConnection>();
export const rawConnectionOf = (db: Db): RawConnection | undefined => rawConnections.get(db);

/**
 * One connection: SQLite has one writer, and a single connection serialises our transactions.
 * synchronous=FULL so an acknowledged inspection or fault survives a crash or power loss
 * (see DEVELOPERS.md, "Durability").
 */
export function createDb(file: string): Db {
  if (file !== ':memory:') mkdirSync(dirname(file), { recursive: true });
  const raw: RawConnection = { conn: null, generation: 0 };
  const db = knexFactory({
    client: 'better-sqlite3',
    connection: { filename: file },
    useNullAsDefault: true,
    pool: {
      min: 1,
      max: 1,
      afterCreate(conn: { pragma(s: string): unknown }, done: (err: Error | null, conn: unknown) => void) {
        try {
          if (file !== ':memory:') conn.pragma('journal_mode = WAL');
          conn.pragma('synchronous = FULL');
          conn.pragma('foreign_keys = ON');
          conn.pragma('busy_timeout = 5000');
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
}
