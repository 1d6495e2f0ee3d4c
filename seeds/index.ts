import type { Db } from '../server/db/knex';
import { seedStudioAndStaff } from './01-studio-and-staff';

/** Loads the demo studio, but only into a database with no staff yet; each step is idempotent. */
export async function seedDemoIfEmpty(db: Db, now: Date): Promise<boolean> {
  const anyone = await db('users').first('id');
  if (anyone) return false;
  await db.transaction(async (trx) => {
    await seedStudioAndStaff(trx, now);
  });
  return true;
}
