import { describe, expect, it } from 'vitest';
import { heavyWork } from '../../server/http/heavy-work';

/*
 * Heavy answers (a calendar range worked out afresh) must not hold light requests behind them:
 * one at a time, each starting after the loop has read its sockets. Ordering, not timing; the
 * end-to-end figure (the health check's p99 during a storm of ranges) is the bench's.
 */

describe('heavy work queue', () => {
  it('runs one at a time, in order, and lets the event loop read sockets before each starts', async () => {
    const heavy = heavyWork();
    const log: string[] = [];
    let running = 0;
    let most = 0;
    const job = (name: string) =>
      heavy.run(async () => {
        running++;
        most = Math.max(most, running);
        log.push(`start ${name}`);
        await heavy.pause();
        log.push(`end ${name}`);
        running--;
        return name;
      });
    const results = Promise.all([job('a'), job('b'), job('c')]);
    // An I/O callback queued after the jobs (as a light request's socket read would be).
    const io = new Promise<void>((resolve) => setImmediate(() => (log.push('io'), resolve())));
    expect(await results).toEqual(['a', 'b', 'c']);
    await io;
    expect(most).toBe(1);
    expect(log.indexOf('io')).toBeLessThan(log.indexOf('end b'));
    expect(log.filter((l) => l !== 'io')).toEqual(['start a', 'end a', 'start b', 'end b', 'start c', 'end c']);
    expect(heavy.pending).toBe(0);
  });

  it('passes on its place when a job fails', async () => {
    const heavy = heavyWork();
    await expect(heavy.run(async () => Promise.reject(new Error('boom')))).rejects.toThrow('boom');
    expect(await heavy.run(async () => 'next')).toBe('next');
    expect(heavy.pending).toBe(0);
  });
});
