import { writeTransaction, type Db } from '../../db/knex';

interface CounterRow {
  key: string;
  count: number;
  expires_at: string;
}

/** A counter as read: 0 once lapsed. */
export interface Counter {
  count: number;
  expiresAt: string | null;
}

/**
 * The failed-sign-in counters (table `sign_in_counters`), in the database so every server
 * process counts together. Each call is one write transaction that takes the write lock first,
 * so two processes cannot both read "9" and both let a tenth guess through.
 */
export function signInCountersRepository(db: Db) {
  const read = async (trx: Db, keys: string[], now: string) => {
    const rows = await trx<CounterRow>('sign_in_counters').whereIn('key', keys).andWhere('expires_at', '>', now);
    const byKey = new Map(rows.map((r) => [r.key, r]));
    return (key: string): Counter => {
      const r = byKey.get(key);
      return r ? { count: Number(r.count), expiresAt: r.expires_at } : { count: 0, expiresAt: null };
    };
  };

  return {
    /**
     * Reads the counters and, unless `decide` refuses, adds one to each of `add` (a lapsed or
     * missing counter starts afresh with `windowEnds`), all under the lock.
     */
    async checkAndAdd<T extends { refused: boolean }>(
      keys: string[],
      add: string[],
      now: Date,
      windowEnds: Date,
      decide: (counter: (key: string) => Counter) => T,
    ): Promise<T> {
      const at = now.toISOString();
      return writeTransaction(db, async (trx) => {
        // Lapsed counters go as others are written: the table holds only live windows.
        await trx('sign_in_counters').where('expires_at', '<=', at).delete();
        const counter = await read(trx, keys, at);
        const verdict = decide(counter);
        if (verdict.refused) return verdict;
        for (const key of add) {
          const c = counter(key);
          await trx('sign_in_counters')
            .insert({ key, count: c.count + 1, expires_at: c.expiresAt ?? windowEnds.toISOString() })
            .onConflict('key')
            .merge(['count', 'expires_at']);
        }
        return verdict;
      });
    },

    /** Takes back one from each counter (a sign-in that succeeded) and sets `remember` until `rememberUntil`. */
    async takeBack(keys: string[], remember: string, now: Date, rememberUntil: Date): Promise<void> {
      const at = now.toISOString();
      await writeTransaction(db, async (trx) => {
        await trx('sign_in_counters').whereIn('key', keys).andWhere('expires_at', '>', at).andWhere('count', '>', 0).decrement('count', 1);
        await trx('sign_in_counters').insert({ key: remember, count: 1, expires_at: rememberUntil.toISOString() }).onConflict('key').merge(['count', 'expires_at']);
      });
    },
  };
}
export type SignInCountersRepository = ReturnType<typeof signInCountersRepository>;
