import Database from 'better-sqlite3';
import { mkdirSync } from 'node:fs';
import { dirname } from 'node:path';

/**
 * A consistent copy of the live database through SQLite's online backup API: it copies pages
 * while the server keeps running, and restarts itself if a write lands mid-copy.
 */
export async function backupDatabase(sourceFile: string, destFile: string): Promise<{ pages: number }> {
  mkdirSync(dirname(destFile), { recursive: true });
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
    return { pages: result.totalPages };
  } finally {
    source.close();
  }
}

export function backupFileName(now: Date): string {
  return `loftwise-${now.toISOString().replace(/[:.]/g, '-').replace('T', '_').slice(0, 19)}.sqlite`;
}
