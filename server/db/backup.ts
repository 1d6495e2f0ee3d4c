import Database from 'better-sqlite3';
import { execFile } from 'node:child_process';
import { chmodSync, closeSync, existsSync, mkdirSync, openSync, readdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { narrowToOwner, PRIVATE_DIR_MODE, PRIVATE_FILE_MODE } from './knex';

/**
 * A consistent copy of the live database through SQLite's online backup API: it copies pages
 * while the server keeps running, and restarts itself if a write lands mid-copy.
 */
export async function backupDatabase(sourceFile: string, destFile: string): Promise<{ pages: number }> {
  // A backup holds everything the live file does: owner-only like it (see preparePrivateDbFile).
  if (!existsSync(dirname(destFile))) mkdirSync(dirname(destFile), { recursive: true, mode: PRIVATE_DIR_MODE });
  if (!existsSync(destFile)) closeSync(openSync(destFile, 'a', PRIVATE_FILE_MODE));
  chmodSync(destFile, PRIVATE_FILE_MODE);
  const source = new Database(sourceFile, { readonly: true, fileMustExist: true });
  try {
    const result = await source.backup(destFile);
    const copy = new Database(destFile, { readonly: true });
    try {
      const check = copy.pragma('integrity_check', { simple: true });
      if (check !== 'ok') throw new Error(`The backup failed its integrity check: ${String(check)}`);
    } finally {
      copy.close();
    }
    narrowToOwner(destFile);
    return { pages: result.totalPages };
  } finally {
    source.close();
  }
}

export function backupFileName(now: Date): string {
  return `loftwise-${now.toISOString().replace(/[:.]/g, '-').replace('T', '_').slice(0, 19)}.sqlite`;
}

/** pg_dump on PATH, or the newest under Debian's /usr/lib/postgresql/<version>/bin. */
export function findPgDump(): string {
  const onPath = (process.env.PATH ?? '').split(':').map((d) => join(d, 'pg_dump')).find((f) => existsSync(f));
  if (onPath) return onPath;
  const root = '/usr/lib/postgresql';
  const versions = existsSync(root) ? readdirSync(root).filter((v) => /^\d+$/.test(v)).sort((a, b) => Number(b) - Number(a)) : [];
  const found = versions.map((v) => join(root, v, 'bin', 'pg_dump')).find((f) => existsSync(f));
  if (!found) throw new Error('pg_dump was not found: install the PostgreSQL client tools (Debian: postgresql-client) matching the server.');
  return found;
}

/**
 * A consistent copy of a PostgreSQL database through `pg_dump` (one snapshot, safe while the
 * servers run), in its custom format for `pg_restore`; owner-only like every backup.
 */
export async function backupPostgres(url: string, destFile: string): Promise<{ tool: string }> {
  if (!existsSync(dirname(destFile))) mkdirSync(dirname(destFile), { recursive: true, mode: PRIVATE_DIR_MODE });
  if (!existsSync(destFile)) closeSync(openSync(destFile, 'a', PRIVATE_FILE_MODE));
  chmodSync(destFile, PRIVATE_FILE_MODE);
  const tool = findPgDump();
  await new Promise<void>((resolvePromise, reject) => {
    execFile(tool, ['--format=custom', '--no-owner', `--file=${destFile}`, `--dbname=${url}`], (err, _out, stderr) =>
      err ? reject(new Error(`pg_dump failed: ${String(stderr).trim() || err.message}`)) : resolvePromise(),
    );
  });
  chmodSync(destFile, PRIVATE_FILE_MODE);
  return { tool };
}

export function pgBackupFileName(now: Date): string {
  return backupFileName(now).replace(/\.sqlite$/, '.pgdump');
}
