import { setImmediate as nextTurn } from 'node:timers/promises';
import { CallerGone, currentCaller } from './caller';

/**
 * Heavy answers (a calendar range, Today, the rig list, worked out afresh) run one at a time, each
 * starting on a fresh turn of the event loop and giving the loop back between its pieces, so
 * light requests (the health check, one point's status, a booking) wait at most one piece, never
 * a queue of them.
 *
 * Why a turn and not just `await`: knex on better-sqlite3 answers a query synchronously, so a
 * request's chain of queries and the promise continuations around them run as microtasks, which
 * the loop finishes before it reads a socket again; twenty such requests admitted together held a
 * health check for seconds. `setImmediate` lets the poll phase (new connections, other requests'
 * data) run first. And one at a time, because pieces admitted together all run in one check
 * phase: the loop would still read sockets only after every one of them.
 *
 * Work whose caller has gone (server/http/caller.ts) is dropped when its turn comes, and between
 * its pieces: a storm of requests that time out does not leave a queue worked out for no one.
 *
 * A pause gives a turn only once the answer has held the loop for `sliceMs` since its last turn
 * (5 ms by default): a turn costs about 0.3 ms even on an idle server, and a 43-day range asked
 * for one at a time spent 4 of its 34 ms in thirteen of them. A light request still waits at most
 * one slice and one piece.
 */
export interface HeavyWork {
  /** Runs `fn` when no other heavy answer is being worked out (first come, first served). */
  run<T>(fn: () => Promise<T>): Promise<T>;
  /** Gives the event loop a turn (between the pieces of one heavy answer); throws CallerGone when no one waits for it any more. */
  pause(): Promise<void>;
  /** How many are running or waiting (for tests and the bench). */
  readonly pending: number;
  /** How many were dropped because their caller had gone. */
  readonly dropped: number;
}

export function heavyWork(opts: { concurrency?: number; sliceMs?: number } = {}): HeavyWork {
  const concurrency = opts.concurrency ?? 1;
  const sliceMs = opts.sliceMs ?? 5;
  let lastTurn = 0;
  const turn = async () => {
    await nextTurn();
    lastTurn = performance.now();
  };
  let running = 0;
  let dropped = 0;
  const waiting: Array<() => void> = [];
  const dropIfGone = () => {
    if (currentCaller()?.gone) {
      dropped++;
      throw new CallerGone();
    }
  };
  return {
    async run<T>(fn: () => Promise<T>): Promise<T> {
      if (running < concurrency) running++;
      else await new Promise<void>((admit) => waiting.push(admit));
      try {
        await turn();
        dropIfGone();
        return await fn();
      } finally {
        // The place passes straight to the next in line (`running` stays), so none can jump the queue.
        const next = waiting.shift();
        if (next) next();
        else running--;
      }
    },
    pause: async () => {
      if (performance.now() - lastTurn >= sliceMs) await turn();
      dropIfGone();
    },
    get pending() {
      return running + waiting.length;
    },
    get dropped() {
      return dropped;
    },
  };
}

/** For services built without one (tests, scripts): no queue, no pauses. */
export const unboundedWork: HeavyWork = { run: (fn) => fn(), pause: async () => undefined, pending: 0, dropped: 0 };
