import type { Db } from './knex';

/** Whether another row already uses a name, compared without case (labels and serials are read aloud). */
export async function valueTaken(db: Db, table: string, column: string, value: string, exceptId?: number): Promise<boolean> {
  const q = db(table).whereRaw(`lower(${column}) = lower(?)`, [value]);
  if (exceptId) q.whereNot('id', exceptId);
  return Boolean(await q.first('id'));
}
