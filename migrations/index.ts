import type { Knex } from 'knex';
import * as m001 from './001-staff-and-studio';

/**
 * Static list of migrations, append-only. A static source loads the same under vitest, tsx and
 * the built server (a folder of raw .ts files does not).
 */
const migrations: Record<string, Knex.Migration> = {
  '001-staff-and-studio': m001,
};

export const migrationSource: Knex.MigrationSource<string> = {
  getMigrations: async () => Object.keys(migrations),
  getMigrationName: (name) => name,
  getMigration: async (name) => migrations[name],
};
