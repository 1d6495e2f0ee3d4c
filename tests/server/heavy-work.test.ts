import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { heavyWork, type HeavyWork } from '../../server/http/heavy-work';
import { seedDemoIfEmpty } from '../../seeds';
import { DEMO_PASSWORD } from '../../seeds/01-studio-and-staff';
import { createTestApp, signIn, TEST_AUDIT_KEY, type TestContext } from '../helpers/app';

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

  it('gives the loop a turn at a pause only once the answer has held it for a slice', async () => {
    const heavy = heavyWork({ sliceMs: 20 });
    const log: string[] = [];
    await heavy.run(async () => {
      const io = new Promise<void>((resolve) => setImmediate(() => (log.push('io'), resolve())));
      await heavy.pause();
      log.push('quick pause');
      // Hold the loop for longer than the slice, as a long piece of work would.
      const until = performance.now() + 25;
      while (performance.now() < until) /* busy */;
      await heavy.pause();
      log.push('pause after a slice');
      await io;
    });
    expect(log).toEqual(['quick pause', 'io', 'pause after a slice']);
  });

  it('passes on its place when a job fails', async () => {
    const heavy = heavyWork();
    await expect(heavy.run(async () => Promise.reject(new Error('boom')))).rejects.toThrow('boom');
    expect(await heavy.run(async () => 'next')).toBe('next');
    expect(heavy.pending).toBe(0);
  });
});

/*
 * Through the real app, cache off (every range worked out afresh): ranges asked at once queue one
 * behind another, the health check answers while they are still queued, and ranges whose caller
 * hung up before their turn are dropped rather than worked out for no one. Ordering, not timing.
 */
describe('heavy work in the real app', () => {
  let ctx: TestContext;
  let server: Server;
  let base = '';
  let cookie = '';
  let heavy: HeavyWork;

  beforeAll(async () => {
    ctx = await createTestApp({ now: '2026-12-01T08:30:00Z', deps: { cacheDerived: false } });
    await seedDemoIfEmpty(ctx.db, ctx.clock.now(), TEST_AUDIT_KEY);
    heavy = ctx.app.locals.heavy as HeavyWork;
    server = ctx.app.listen(0, '127.0.0.1');
    await new Promise((r) => server.once('listening', r));
    base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
    const { res, ok } = await signIn(ctx.app, 'reception@loftwise.test', DEMO_PASSWORD);
    if (!ok) throw new Error('sign-in failed');
    cookie = ([] as string[]).concat(res.headers['set-cookie'] ?? []).map((c) => c.split(';')[0]).join('; ');
  }, 60_000);

  afterAll(async () => {
    server?.closeAllConnections();
    await new Promise((r) => server?.close(r));
    await ctx?.close();
  });

  /** A different 43-day range for each `i`, so nothing could be shared between them. */
  const range = (i: number) => {
    const from = new Date(Date.parse('2026-11-23T00:00:00Z') + i * 60_000);
    return `${base}/api/sessions?from=${from.toISOString()}&to=${new Date(from.getTime() + 43 * 86_400_000).toISOString()}`;
  };
  const until = async (what: () => boolean) => {
    for (let i = 0; i < 20_000 && !what(); i++) await new Promise((r) => setImmediate(r));
    return what();
  };

  it('answers the health check while ranges are still queued', async () => {
    const ranges = Array.from({ length: 12 }, (_, i) => fetch(range(i), { headers: { cookie } }));
    expect(await until(() => heavy.pending >= 3)).toBe(true);
    const health = await fetch(`${base}/api/health`);
    expect(health.status).toBe(200);
    // Answered while the ranges asked before it were still running or waiting.
    expect(heavy.pending).toBeGreaterThan(0);
    for (const r of await Promise.all(ranges)) expect(r.status).toBe(200);
    expect(heavy.pending).toBe(0);
  }, 60_000);

  it('drops queued ranges whose caller hung up, and still answers the next one', async () => {
    const before = heavy.dropped;
    const aborts = Array.from({ length: 12 }, () => new AbortController());
    const asked = aborts.map((a, i) => fetch(range(100 + i), { headers: { cookie }, signal: a.signal }).catch(() => 'hung up'));
    expect(await until(() => heavy.pending >= 3)).toBe(true);
    for (const a of aborts) a.abort();
    await Promise.all(asked);
    expect(await until(() => heavy.pending === 0)).toBe(true);
    expect(heavy.dropped - before).toBeGreaterThan(0);
    const next = await fetch(range(200), { headers: { cookie } });
    expect(next.status).toBe(200);
    expect(Array.isArray(await next.json())).toBe(true);
  }, 60_000);
});
