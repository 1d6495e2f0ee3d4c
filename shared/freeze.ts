/** Freezes a value and everything reachable from it; returns it. Already frozen parts are left as they are. */
export function freezeDeep<T>(value: T): T {
  if (value && typeof value === 'object' && !Object.isFrozen(value)) {
    Object.freeze(value);
    for (const v of Object.values(value as object)) freezeDeep(v);
  }
  return value;
}
