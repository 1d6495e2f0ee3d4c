import { existsSync, writeFileSync } from 'node:fs';
import type { Db } from '../../db/knex';
import { auditRepository, type AuditKey } from './audit.repository';

export type ChainUpgrade = 'keyed' | 'rechained' | 'broken';

/**
 * Entries written before the chain was keyed carry plain SHA-256 hashes. They are re-chained under
 * the key here, at the server's first start with the key, rather than in a migration: the key is
 * kept outside the database on purpose, and migrations see only the database.
 *
 * Re-chaining happens once. The old chain must verify first (an edit made before the upgrade is
 * not laundered into the keyed chain), and afterwards a marker file beside the key says it is done:
 * someone who can write the database cannot later recompute a plain chain and have this step key
 * it, since that marker lives with the key, outside the file they can edit.
 */
export async function keyAuditChain(db: Db, key: AuditKey, markerFile: string, log: (line: string) => void = console.log): Promise<ChainUpgrade> {
  const audit = auditRepository(db, key);
  const done = () => {
    if (!existsSync(markerFile)) writeFileSync(markerFile, `The audit chain is keyed (${new Date().toISOString()}). Do not delete: it stops an unkeyed chain from ever being re-keyed.\n`, { mode: 0o600 });
  };
  if (await audit.verifiesKeyed()) {
    done();
    return 'keyed';
  }
  if (!existsSync(markerFile) && (await audit.verifiesUnkeyed())) {
    const n = await audit.rechainUnderKey();
    done();
    log(`Re-chained ${n} audit ${n === 1 ? 'entry' : 'entries'} under the audit key.`);
    return 'rechained';
  }
  log('The audit chain does not verify under the audit key: GET /api/audit/verify names the first bad entry.');
  return 'broken';
}
