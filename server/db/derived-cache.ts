import { createHash } from 'node:crypto';
import type { Clock } from '../clock';
import type { DataVersion } from './data-version';
import type { Policy } from '../../shared/schemas/policy';
import { freezeDeep } from '../../shared/freeze';
import { stillValid, validityTracker, type ValidityTracker } from '../../shared/clearance/validity';
import { CallerGone, currentCaller, runForCaller, sharedCaller } from '../http/caller';

/** What a cached computation returns: the answer, and until when it holds with the data unchanged. */
export interface Derived<T> {
  value: T;
  /** Whether the answer still holds at `now` (see shared/clearance/validity.ts). */
  holdsAt(now: Date): boolean;
  /** Roughly how many rows the answer carries (sessions, points); what the cache's bound counts. */
  weight?: number;
}

export interface DerivedCache {
  /**
   * The answer for `key`: from the cache when it was worked out under the current data version and
   * still holds at the clock's now, otherwise from `compute` (one computation for many callers).
   */
  get<T>(key: string, compute: () => Promise<Derived<T>>): Promise<T>;
}

interface Entry {
  version: string;
  derived: Derived<unknown>;
  weight: number;
}

// Answers handed out by the cache are shared between requests, so their JSON text can be too.
const jsonTexts = new WeakMap<object, { body: Buffer; etag: string }>();
const shared = new WeakSet<object>();

/** The JSON body (UTF-8) and its entity tag for an answer the cache handed out, made once; undefined for anything else. */
export function sharedJson(value: unknown): { body: Buffer; etag: string } | undefined {
  if (!value || typeof value !== 'object' || !shared.has(value)) return undefined;
  let json = jsonTexts.get(value);
  if (json === undefined) {
    const body = Buffer.from(JSON.stringify(value), 'utf8');
    json = { body, etag: `W/"${body.length.toString(16)}-${createHash('sha1').update(body).digest('base64').slice(0, 27)}"` };
    jsonTexts.set(value, json);
  }
  return json;
}

/**
 * Statuses derived from the rig and the calendar, kept per data version (PRODUCT.md's rules are
 * pure functions of the records and the time, so an answer holds until either changes). Bounded by
 * the rows it holds, since anyone signed in can ask for many different date ranges; the oldest
 * entry goes first, and an answer larger than the whole bound is not kept.
 */
export function derivedCache(deps: { version: DataVersion; clock: Clock; maxWeight?: number }): DerivedCache {
  const maxWeight = deps.maxWeight ?? 5_000;
  const entries = new Map<string, Entry>();
  let weight = 0;
  const drop = (key: string) => {
    const e = entries.get(key);
    if (e) {
      weight -= e.weight;
      entries.delete(key);
    }
  };
  const pending = new Map<string, { promise: Promise<Derived<unknown>>; join: (c: ReturnType<typeof currentCaller>) => void }>();
  let lastVersion = '';
  return {
    async get<T>(key: string, compute: () => Promise<Derived<T>>): Promise<T> {
      const version = await deps.version.current();
      if (version !== lastVersion) {
        entries.clear();
        weight = 0;
        pending.clear();
        lastVersion = version;
      }
      const hit = entries.get(key);
      if (hit && hit.version === version && hit.derived.holdsAt(deps.clock.now())) return hit.derived.value as T;
      const flightKey = `${version}\u0000${key}`;
      let flight = pending.get(flightKey);
      if (flight) flight.join(currentCaller());
      else {
        // Worked out for everyone who asks meanwhile: dropped (server/http/caller.ts) only once all have gone.
        const callers = sharedCaller(currentCaller());
        const mine = { promise: runForCaller(callers.caller, compute), join: callers.join };
        flight = mine;
        pending.set(flightKey, mine);
        flight.promise
          .then((derived) => {
            if (lastVersion !== version) return;
            drop(key);
            const w = Math.max(1, derived.weight ?? 1);
            if (w > maxWeight) return;
            while (weight + w > maxWeight) drop(entries.keys().next().value as string);
            // Frozen: a caller that tried to change a shared answer would change it for everyone.
            if (derived.value && typeof derived.value === 'object') shared.add(freezeDeep(derived.value));
            entries.set(key, { version, derived, weight: w });
            weight += w;
          })
          .catch(() => undefined)
          .finally(() => {
            if (pending.get(flightKey) === mine) pending.delete(flightKey);
          });
      }
      try {
        return (await flight.promise).value as T;
      } catch (err) {
        // Dropped for callers that had all gone just as this one joined: this one still waits, so ask again.
        if (err instanceof CallerGone && !currentCaller()?.gone) return this.get(key, compute);
        throw err;
      }
    },
  };
}

/** For tests and tools that want every answer worked out afresh. */
export const noDerivedCache: DerivedCache = { get: async (_key, compute) => (await compute()).value };

/**
 * Defence in depth: whatever the validity says, an answer is worked out afresh at least this
 * often. The status rules are exact about their instants; this bounds the cost of a mistake there.
 */
export const DERIVED_MAX_AGE_MS = 10_000;

/** Builds an answer at `now` while `build` names what it depends on in time. */
export function deriveAt<T>(policy: Policy, now: Date, build: (track: ValidityTracker) => T): Derived<T> {
  const track = validityTracker(policy, now);
  track.atMost(DERIVED_MAX_AGE_MS);
  return derived(build(track), track, policy);
}

/** `deriveAt` for an answer built in pieces (with the event loop given a turn between them). */
export async function deriveInPieces<T>(policy: Policy, now: Date, build: (track: ValidityTracker) => Promise<T>): Promise<Derived<T>> {
  const track = validityTracker(policy, now);
  track.atMost(DERIVED_MAX_AGE_MS);
  return derived(await build(track), track, policy);
}

function derived<T>(value: T, track: ValidityTracker, policy: Policy): Derived<T> {
  const validity = track.result();
  const weight = Array.isArray(value) ? value.length : 1 + Object.values(value as object).reduce<number>((n, v) => n + (Array.isArray(v) ? v.length : 0), 0);
  return { value, holdsAt: (t) => stillValid(validity, t, policy), weight };
}
