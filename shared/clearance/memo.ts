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
