import type { Db } from '../server/db/knex';
import { seedStudioAndStaff } from './01-studio-and-staff';
import { seedRig } from './02-rig';
import { seedSafety } from './03-safety';
import { seedSchedule } from './04-schedule';

/**
 * Loads the invented demo studio, but only into a database with no staff yet; each step is
 * idempotent and every date in it is relative to `now`, the moment of the first start.
 */
export async function seedDemoIfEmpty(db: Db, now: Date): Promise<boolean> {
  const anyone = await db('users').first('id');
  if (anyone) return false;
  await db.transaction(async (trx) => {
    await seedStudioAndStaff(trx, now);
    await seedRig(trx, now);
    await seedSafety(trx, now);
    await seedSchedule(trx, now);
  });
  return true;
}
