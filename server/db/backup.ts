import Database from 'better-sqlite3';
import { chmodSync, closeSync, existsSync, mkdirSync, openSync } from 'node:fs';
import { dirname } from 'node:path';
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
