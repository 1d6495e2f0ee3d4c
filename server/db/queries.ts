import type { Db } from './knex';
import { labelSkeleton } from '../../shared/text/labels';

/**
 * The existing value another row uses that looks the same as `value` (labels and serials are read
 * aloud and printed), or null. "The same" is `labelSkeleton`: case, dashes and Cyrillic or Greek
 * look-alikes folded, so `МH-1` (Cyrillic М) is taken when `MH-1` exists. Compared in code rather
 * than through a stored key: these are a studio's registers (tens to a few thousand rows, read only
 * when one is created or renamed), and a stored key would need every writer, seeds included, to fill it.
 */
export async function valueTaken(db: Db, table: string, column: string, value: string, exceptId?: number): Promise<string | null> {
  const key = labelSkeleton(value);
  const q = db(table).select('id', column);
  if (exceptId) q.whereNot('id', exceptId);
  const rows = (await q) as Array<Record<string, string>>;
  return rows.find((r) => labelSkeleton(r[column]) === key)?.[column] ?? null;
}
