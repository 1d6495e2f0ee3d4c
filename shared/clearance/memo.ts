import { freezeDeep } from '../freeze';
import type { Policy } from '../schemas/policy';
import type { PointSnapshot } from './types';

/**
 * Zone arithmetic (Intl offsets) is the costly part of a status check, and the same few instants
 * recur across every point and session of a request; these pure results are kept in a bounded map.
 */
export function memoize<A extends readonly (string | number)[], R>(fn: (...args: A) => R, max = 20_000): (...args: A) => R {
  const cache = new Map<string, R>();
  return (...args: A) => {
    const key = args.join('|');
    const hit = cache.get(key);
    if (hit !== undefined || cache.has(key)) return hit as R;
    const value = fn(...args);
    if (cache.size >= max) cache.delete(cache.keys().next().value as string);
    cache.set(key, value);
    return value;
  };
}

// Work kept per snapshot. A request or a mail cycle asks about the same point many times (every
// class at "now", each class's start for its status and for its inspections). Results are pure in
// the snapshot, the policy and the instant, so they are kept per snapshot object — but only for
// snapshots sealed by `freezeSnapshot`: a sealed snapshot cannot change under the cache (writing
// to it throws), and a snapshot anyone may still change is always worked out afresh.

const sealed = new WeakSet<object>();

/** Freezes a snapshot whole, so the status rules may remember what they found for it. */
export function freezeSnapshot<T extends PointSnapshot>(snapshot: T): T {
  freezeDeep(snapshot);
  sealed.add(snapshot);
  sealed.add(snapshot.links);
  return snapshot;
}

/** Whether a snapshot (or its links) was sealed by `freezeSnapshot`. */
export const isSealed = (value: object): boolean => sealed.has(value);

/** A per-policy, per-sealed-snapshot memo; unsealed snapshots are always worked out afresh. */
export function snapshotMemo<V>() {
  const cache = new WeakMap<Policy, WeakMap<PointSnapshot, V>>();
  return (snapshot: PointSnapshot, policy: Policy, make: () => V): V => {
    if (!sealed.has(snapshot)) return make();
    let bySnapshot = cache.get(policy);
    if (!bySnapshot) cache.set(policy, (bySnapshot = new WeakMap()));
    let found = bySnapshot.get(snapshot);
    if (found === undefined) bySnapshot.set(snapshot, (found = make()));
    return found;
  };
}
