import type { Db } from './knex';
import type { DataVersion } from './data-version';
import { freezeDeep } from '../../shared/freeze';

/**
 * Records read once per data version and shared, frozen, by every read until a record changes:
 * the studio's policy and the rig as the status rules see it (every point's sealed snapshot).
 * These are inputs, not answers: each answer is still worked out afresh from them (the derived
 * cache, server/db/derived-cache.ts, is what keeps answers). Kept because every calendar range,
 * Today and rig list starts from the same rig, and loading it (four queries, ~300 rows) and sealing
 * it anew each time was most of a cold answer; the status rules' own memos (shared/clearance/memo.ts)
 * are kept per sealed snapshot and per policy object, so they now last as long as the records do.
 *
 * Correctness is the data version's: it moves on every committed change to a versioned table,
 * from any process (server/db/data-version.ts). The version is read before the load and the load
 * is tagged with it, so a change committed during the load moves the version past the tag and the
 * next read loads again; a kept value is never served under another version. Only reads outside a
 * transaction are kept: inside one (`trx` other than the app's `db`) the caller reads its own
 * transaction's view, afresh.
 */
export interface KeptRead<T> {
  get(trx?: Db): Promise<T>;
}

export function keptPerVersion<T>(db: Db, version: DataVersion | null, load: (trx: Db) => Promise<T>): KeptRead<T> {
  let kept: { version: string; value: Promise<T> } | null = null;
  return {
    async get(trx: Db = db) {
      if (!version || trx !== db) return load(trx);
      const now = await version.current();
      if (kept?.version === now) return kept.value;
      const value = load(db).then(freezeDeep);
      const entry = { version: now, value };
      kept = entry;
      // A failed load is not kept: the next read tries again.
      value.catch(() => {
        if (kept === entry) kept = null;
      });
      return value;
    },
  };
}
