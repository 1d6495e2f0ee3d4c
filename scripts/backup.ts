// `npm run backup [-- destination.sqlite]`: a consistent copy of the live database, safe while the server runs.
import { join, resolve } from 'node:path';
import { loadConfig } from '../server/config';
import { backupDatabase, backupFileName } from '../server/db/backup';

// The copy holds everything the live file does: for this user only.
process.umask(0o077);
const config = loadConfig();
const dest = resolve(process.argv[2] ?? join('data', 'backups', backupFileName(new Date())));
backupDatabase(config.dbFile, dest)
  .then(({ pages }) => console.log(`Backed up ${config.dbFile} to ${dest} (${pages} pages, integrity ok).`))
  .catch((err) => {
    console.error(`Backup failed: ${err instanceof Error ? err.message : err}`);
    process.exit(1);
  });
