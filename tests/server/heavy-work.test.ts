import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { heavyWork } from '../../server/http/heavy-work';
import { createTestApp, signIn, type TestContext } from '../helpers/app';
import { makePoint, makeRoom, makeStandardPath, makeUser, TEST_PASSWORD } from '../helpers/factories';

/*
 * Issue 13 §5, issue 16 §2: heavy answers (a calendar range worked out afresh) must not hold light
 * requests behind them. Ordering, not timing: the health check and one point's status, asked
 * after a burst of different ranges, are answered before most of the burst is.
 */

const DAY = 86_400_000;
const NOW = '2026-12-01T10:00:00Z';

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

describe('light requests during a storm of calendar ranges (derived cache off)', () => {
  let ctx: TestContext;
  let server: Server;
  let base: string;
  let cookie: string;
  let pointId: number;

  beforeAll(async () => {
    ctx = await createTestApp({ now: NOW, deps: { cacheDerived: false } });
    const roomId = await makeRoom(ctx.db);
    const instructor = await makeUser(ctx.db, { role: 'instructor' });
    const points: number[] = [];
    for (let i = 0; i < 6; i++) {
      const p = await makePoint(ctx.db, { roomId, clearedAt: '2026-11-20T09:00:00Z' });
      await makeStandardPath(ctx.db, p.id, { apparatus: { kind: 'fabric', inspectedUntil: '2027-03-01T00:00:00Z' } });
      points.push(p.id);
    }
    pointId = points[0];
    const [ct] = await ctx.db('class_types').insert({ name: 'Silks', apparatus: 'fabric', duration_minutes: 60, capacity: 8, performers_per_point: 1, active: true, created_at: NOW }).returning('id');
    const classTypeId = (ct as { id: number }).id;
    // Six classes a day for 43 days, every point booked: each range is a few hundred classes.
    const start = Date.parse('2026-12-02T00:00:00Z');
    for (let d = 0; d < 43; d++) {
      for (let k = 0; k < 6; k++) {
        const s = new Date(start + d * DAY + (9 + 2 * k) * 3_600_000);
        const e = new Date(s.getTime() + 3_600_000);
        const [row] = await ctx.db('sessions')
          .insert({ class_type_id: classTypeId, instructor_id: instructor.id, room_id: roomId, starts_at: s.toISOString(), ends_at: e.toISOString(), cancelled: false, at_risk: false, created_at: NOW, updated_at: NOW })
          .returning('id');
        const sessionId = (row as { id: number }).id;
        await ctx.db('session_points').insert(points.map((p) => ({ session_id: sessionId, point_id: p, starts_at: s.toISOString(), ends_at: e.toISOString(), cancelled: false })));
      }
    }
    const reception = await makeUser(ctx.db, { role: 'reception' });
    const { res, ok } = await signIn(ctx.app, reception.email, TEST_PASSWORD);
    if (!ok) throw new Error('sign-in failed');
    cookie = ([] as string[]).concat(res.headers['set-cookie'] ?? []).map((c) => c.split(';')[0]).join('; ');
    server = ctx.app.listen(0, '127.0.0.1');
    await new Promise((r) => server.once('listening', r));
    base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  }, 120_000);

  afterAll(async () => {
    server?.closeAllConnections();
    await new Promise((r) => server?.close(r));
    await ctx?.close();
  });

  it('answers the health check and a point status before most of 16 different 43-day ranges', async () => {
    const order: string[] = [];
    const ask = async (name: string, path: string) => {
      const res = await fetch(base + path, { headers: { cookie } });
      await res.arrayBuffer();
      expect(res.status, `${name} answered ${res.status}`).toBe(200);
      order.push(name);
    };
    const from = Date.parse('2026-12-02T00:00:00Z');
    const heavy = Array.from({ length: 16 }, (_, i) => {
      const f = new Date(from + i * 60_000);
      return ask(`range ${i}`, `/api/sessions?from=${f.toISOString()}&to=${new Date(f.getTime() + 43 * DAY).toISOString()}`);
    });
    // Asked once the ranges have been sent and are being worked out.
    await new Promise((r) => setTimeout(r, 20));
    await Promise.all([ask('health', '/api/health'), ask('status', `/api/points/${pointId}/status`), ...heavy]);
    const ranges = order.filter((n) => n.startsWith('range'));
    expect(ranges).toHaveLength(16);
    // Before the queue, both came back behind (nearly) every range.
    expect(order.indexOf('health'), order.join(', ')).toBeLessThan(8);
    expect(order.indexOf('status'), order.join(', ')).toBeLessThan(8);
  }, 120_000);
});
