import { migrationSource } from './migrations';

// For the knex CLI; the server itself migrates on start (server/index.ts).
export default {
  client: 'better-sqlite3',
  connection: { filename: process.env.LOFTWISE_DB ?? 'data/loftwise.sqlite' },
  useNullAsDefault: true,
  migrations: { migrationSource },
};
