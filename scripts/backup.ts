// `npm run backup [-- destination]`: a consistent copy of the live database, safe while the server runs:
// SQLite's online backup API for the file, pg_dump when DATABASE_URL names PostgreSQL.
import { join, resolve } from 'node:path';
import { loadConfig } from '../server/config';
import { backupDatabase, backupFileName, backupPostgres, pgBackupFileName } from '../server/db/backup';

// The copy holds everything the live database does: for this user only.
process.umask(0o077);
const config = loadConfig();
const fail = (err: unknown) => {
  console.error(`Backup failed: ${err instanceof Error ? err.message : err}`);
  process.exit(1);
};
if (config.databaseUrl) {
  const url = new URL(config.databaseUrl);
  const dest = resolve(process.argv[2] ?? join('data', 'backups', pgBackupFileName(new Date())));
  backupPostgres(config.databaseUrl, dest)
    .then(({ tool }) => console.log(`Backed up the PostgreSQL database ${url.pathname.slice(1)} on ${url.host} with pg_dump (${tool}) to ${dest} (custom format: restore with pg_restore).`))
    .catch(fail);
} else {
  const dest = resolve(process.argv[2] ?? join('data', 'backups', backupFileName(new Date())));
  backupDatabase(config.dbFile, dest)
    .then(({ pages }) => console.log(`Backed up ${config.dbFile} to ${dest} (${pages} pages, integrity ok).`))
    .catch(fail);
}
