export interface Clock {
  now(): Date;
}
export const systemClock: Clock = { now: () => new Date() };

/** A clock tests can set and move. */
export function fixedClock(start: Date | string): Clock & { set(d: Date | string): void; advance(ms: number): void } {
  let t = new Date(start).getTime();
  return {
    now: () => new Date(t),
    set: (d) => void (t = new Date(d).getTime()),
    advance: (ms) => void (t += ms),
  };
}
