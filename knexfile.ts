import { migrationSource } from './migrations';
import { postgresConnection } from './server/db/dialect';

// For the knex CLI; the server itself migrates on start (server/index.ts), and installs the
// data-version triggers after the migrations (use `migrate()` from server/db/knex.ts, not the CLI alone).
const url = process.env.DATABASE_URL;
export default url
  ? { client: 'pg', connection: postgresConnection(url), migrations: { migrationSource } }
  : {
      client: 'better-sqlite3',
      connection: { filename: process.env.LOFTWISE_DB ?? 'data/loftwise.sqlite' },
      useNullAsDefault: true,
      migrations: { migrationSource },
    };
