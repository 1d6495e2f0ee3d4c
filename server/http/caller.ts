import { AsyncLocalStorage } from 'node:async_hooks';
import type { Response } from 'express';
import { HttpError } from './errors';

/**
 * Whom a piece of work is for: the request that asked, so heavy work queued for a caller that has
 * gone (closed the connection, timed out) is dropped rather than worked out for no one. Carried
 * in async context, so services take no extra argument; work with no caller (the mail worker,
 * scripts) is never dropped.
 */
export interface Caller {
  readonly gone: boolean;
}

const callers = new AsyncLocalStorage<Caller>();

export const currentCaller = (): Caller | undefined => callers.getStore();

export function runForCaller<T>(caller: Caller, fn: () => T): T {
  return callers.run(caller, fn);
}

/** The caller of an HTTP request: gone once its connection closed before the answer was sent. */
export function callerOf(res: Response): Caller {
  let gone = false;
  res.once('close', () => {
    if (!res.writableFinished) gone = true;
  });
  return {
    get gone() {
      return gone;
    },
  };
}

/**
 * One computation shared by several callers (the derived cache's single flight): gone only when
 * every one of them is, so a caller that stays still gets its answer.
 */
export function sharedCaller(first: Caller | undefined): { caller: Caller; join(c: Caller | undefined): void } {
  const waiting = new Set<Caller | undefined>([first]);
  return {
    caller: {
      get gone() {
        for (const c of waiting) if (!c || !c.gone) return false;
        return true;
      },
    },
    join: (c) => void waiting.add(c),
  };
}

/** Thrown where queued work is dropped: nobody is there to read the answer (499, as proxies log it). */
export class CallerGone extends HttpError {
  constructor() {
    super(499, 'caller_gone', 'The request was closed before its answer was worked out.');
  }
}
