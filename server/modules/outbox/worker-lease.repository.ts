import { writeTransaction, type Db } from '../../db/knex';

/**
 * A named lease in `worker_leases`: whichever process holds an unexpired one runs that worker
 * (the mail worker), so with several processes, on one machine or many, one schedules and sends.
 * A holder that dies stops renewing; another takes over once the lease runs out.
 */
export function workerLeaseRepository(db: Db) {
  return {
    /** Takes or renews the lease for `holder` until `now + ms`; false while someone else holds it. */
    async hold(name: string, holder: string, now: Date, ms: number): Promise<boolean> {
      return writeTransaction(db, async (trx) => {
        const row = (await trx('worker_leases').where({ name }).first('holder', 'expires_at')) as { holder: string; expires_at: string } | undefined;
        if (row && row.holder !== holder && row.expires_at > now.toISOString()) return false;
        const expires_at = new Date(now.getTime() + ms).toISOString();
        if (row) await trx('worker_leases').where({ name }).update({ holder, expires_at });
        else await trx('worker_leases').insert({ name, holder, expires_at });
        return true;
      });
    },
    /** Lets the lease go at once (a clean shutdown), so another process need not wait it out. */
    async release(name: string, holder: string): Promise<void> {
      await writeTransaction(db, (trx) => trx('worker_leases').where({ name, holder }).delete());
    },
  };
}
