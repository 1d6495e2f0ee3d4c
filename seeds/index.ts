import { writeTransaction, type Db } from '../server/db/knex';
import { seedStudioAndStaff } from './01-studio-and-staff';
import { seedRig } from './02-rig';
import { seedSafety } from './03-safety';
import { seedSchedule } from './04-schedule';
import { seedRecords } from './05-records';
import { seedStudents } from './06-students';

/**
 * Loads the invented demo studio, but only into a database with no staff yet; each step is
 * idempotent and every date in it is relative to `now`, the moment of the first start.
 */
export async function seedDemoIfEmpty(db: Db, now: Date, auditKey: string): Promise<boolean> {
  // Checked under the write lock, so two processes starting on one new file seed it once.
  return writeTransaction(db, async (trx) => {
    if (await trx('users').first('id')) return false;
    await seedStudioAndStaff(trx, now);
    await seedRig(trx, now);
    await seedSafety(trx, now, auditKey);
    await seedSchedule(trx, now);
    await seedRecords(trx, now);
    await seedStudents(trx, now);
    return true;
  });
}
