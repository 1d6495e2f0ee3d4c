import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn, type ChildProcess } from 'node:child_process';
import { connect, createServer, type Server } from 'node:net';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createDb, migrate, type Db } from '../../server/db/knex';
import { startFakeSmtp, type FakeSmtp } from '../../server/mail/fake-smtp';
import { makePoint, makeRoom, makeStandardPath, makeUser, TEST_PASSWORD } from '../helpers/factories';
import { freePort } from '../helpers/free-port';
import { freshDatabase, onPostgres, type TestDatabase } from '../helpers/database';
import { signInAttempt, signInTo } from '../helpers/child-server';

// The real server as child processes (`tsx server/index.ts`) on one database: a SQLite file, or
// PostgreSQL when TEST_DATABASE_URL is set.
const DAY = 86_400_000;
const DB_NAME = onPostgres ? 'PostgreSQL' : 'one SQLite file';
let dir = '';
let database: TestDatabase;
let sink: FakeSmtp;
const ids = { points: [] as number[], instructors: [] as number[], classTypeId: 0, roomId: 0, lonePoint: 0 };

/** A short-lived connection of the test's own, beside the servers'. */
async function withDb<T>(fn: (db: Db) => Promise<T>): Promise<T> {
  const db = createDb(database.target, { poolMax: 1 });
  try {
    return await fn(db);
  } finally {
    await db.destroy();
  }
}

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'loftwise-processes-'));
  database = await freshDatabase(dir, 'shared.sqlite');
  sink = await startFakeSmtp(0, { keep: Infinity });
  const db = createDb(database.target, { poolMax: 1 });
  await migrate(db);
  await makeUser(db, { role: 'reception', email: 'desk@processes.test' });
  await makeUser(db, { role: 'rigger', email: 'rigger@processes.test' });
  await makeUser(db, { role: 'rigger', email: 'guessed@processes.test' });
  for (let i = 0; i < 4; i++) ids.instructors.push((await makeUser(db, { role: 'instructor' })).id);
  ids.roomId = await makeRoom(db);
  for (let i = 0; i < 3; i++) {
    const p = await makePoint(db, { roomId: ids.roomId, clearedAt: new Date(Date.now() - DAY).toISOString(), structuralRatingKn: 30 });
    for (const g of await makeStandardPath(db, p.id, { apparatus: { kind: 'fabric', inspectedUntil: null } })) await db('gear_items').where({ id: g }).update({ inspected_until: new Date(Date.now() + 60 * DAY).toISOString() });
    ids.points.push(p.id);
  }
  {
    const p = await makePoint(db, { roomId: ids.roomId, clearedAt: new Date(Date.now() - DAY).toISOString(), structuralRatingKn: 30 });
    for (const g of await makeStandardPath(db, p.id, { apparatus: { kind: 'fabric', inspectedUntil: null } })) await db('gear_items').where({ id: g }).update({ inspected_until: new Date(Date.now() + 60 * DAY).toISOString() });
    ids.lonePoint = p.id;
  }
  const [ct] = await db('class_types').insert({ name: 'Silks', apparatus: 'fabric', duration_minutes: 60, capacity: 8, performers_per_point: 1, created_at: new Date().toISOString() }).returning('id');
  ids.classTypeId = (ct as { id: number }).id;
  await db.destroy();
});
afterAll(async () => {
  await sink?.close();
  await database?.drop();
  rmSync(dir, { recursive: true, force: true });
});

interface Started {
  child: ChildProcess;
  stdout: () => string;
  stderr: () => string;
  exit: Promise<number | null>;
}

function spawnServer(port: number): Started {
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    env: {
      ...process.env,
      PORT: String(port),
      APP_URL: `http://127.0.0.1:${port}`,
      ...(onPostgres ? { DATABASE_URL: database.target } : { LOFTWISE_DB: database.target }),
      UPLOAD_DIR: join(dir, 'uploads'),
      LOFTWISE_SEED: 'none',
      AUTH_SECRET: 'process-test-secret-process-test-secret-01',
      SMTP_URL: sink.url,
      OUTBOX_INTERVAL_SECONDS: '1',
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let out = '';
  let err = '';
  child.stdout!.on('data', (d) => (out += d));
  child.stderr!.on('data', (d) => (err += d));
  const exit = new Promise<number | null>((r) => child.once('exit', (code) => r(code)));
  return { child, stdout: () => out, stderr: () => err, exit };
}

async function untilServing(port: number, s: Started) {
  const deadline = Date.now() + 30_000;
  for (;;) {
    try {
      if ((await fetch(`http://127.0.0.1:${port}/api/health`)).ok) return;
    } catch {
      /* starting */
    }
    if (Date.now() > deadline || s.child.exitCode !== null) throw new Error(`server did not start: ${s.stderr()}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

const stop = async (s: Started) => {
  if (s.child.exitCode === null) s.child.kill('SIGTERM');
  await s.exit;
};

describe('an idle keep-alive connection', () => {
  it('stays open past Node’s 5 s, so a client reusing it is not reset as the server closes it', async () => {
    const port = await freePort();
    const server = spawnServer(port);
    try {
      await untilServing(port, server);
      const socket = connect(port, '127.0.0.1');
      let closedAt: number | null = null;
      let received = '';
      socket.on('data', (d) => (received += d));
      socket.on('close', () => (closedAt = Date.now()));
      const ask = async () => {
        received = '';
        socket.write(`GET /api/health HTTP/1.1\r\nHost: 127.0.0.1:${port}\r\nConnection: keep-alive\r\n\r\n`);
        const deadline = Date.now() + 5_000;
        while (!/\r\n\r\n[\s\S]*\}/.test(received) && closedAt === null && Date.now() < deadline) await new Promise((r) => setTimeout(r, 20));
        return received;
      };
      expect(await ask()).toMatch(/^HTTP\/1\.1 200/);
      const idleFrom = Date.now();
      await new Promise((r) => setTimeout(r, 6_500));
      expect(closedAt === null ? 'still open' : `closed by the server after ${closedAt - idleFrom} ms idle`).toBe('still open');
      expect(await ask()).toMatch(/^HTTP\/1\.1 200/);
      socket.destroy();
    } finally {
      await stop(server);
    }
  }, 60_000);
});

describe('a port already taken', () => {
  it('makes the server exit non-zero with a clear message, before its mail worker runs', async () => {
    const now = new Date().toISOString();
    await withDb((db) =>
      db('outbox_messages').insert({ kind: 'session_change', unique_key: 'port-test', recipients_json: '["teach@processes.test"]', subject: 'Due now', text_body: 'x', html_body: '<p>x</p>', state: 'queued', attempts: 0, next_attempt_at: now, created_at: now }),
    );
    const holder: Server = createServer();
    await new Promise<void>((r) => holder.listen(0, () => r()));
    const port = (holder.address() as { port: number }).port;
    try {
      const second = spawnServer(port);
      const code = await Promise.race([second.exit, new Promise<'still running'>((r) => setTimeout(() => r('still running'), 30_000))]);
      if (code === 'still running') await stop(second);
      expect(code).not.toBe('still running');
      expect(code).not.toBe(0);
      expect(second.stderr()).toContain(`port ${port} is already in use`);
      expect(second.stdout()).not.toMatch(/serving/);
      // Its mail worker never ran: the message due is still queued and nothing reached SMTP.
      expect(await withDb((db) => db('outbox_messages').where({ unique_key: 'port-test' }).first('state'))).toEqual({ state: 'queued' });
      expect(sink.messages().filter((m) => m.subject === 'Due now')).toEqual([]);
    } finally {
      holder.close();
      await withDb((db) => db('outbox_messages').where({ unique_key: 'port-test' }).delete());
    }
  }, 40_000);
});

describe(`two server processes on ${DB_NAME}`, () => {
  it('answer 200 mixed bookings with no 5xx and no double booking', async () => {
    const ports = [await freePort(), await freePort()];
    const servers = ports.map(spawnServer);
    try {
      await Promise.all(ports.map((p, i) => untilServing(p, servers[i])));
      const bases = ports.map((p) => `http://127.0.0.1:${p}`);
      const desks = await Promise.all(bases.map((b) => signInTo(b, 'desk@processes.test')));
      const call = (i: number, method: string, path: string, body?: unknown) =>
        fetch(bases[i] + path, { method, headers: { 'Content-Type': 'application/json', Origin: bases[i], cookie: desks[i] }, body: body === undefined ? undefined : JSON.stringify(body) }).then(async (r) => ({
          status: r.status,
          body: (await r.json().catch(() => null)) as { id?: number; error?: { code: string } } | null,
        }));
      // Few slots and points, so the two processes contend for the same rows all along.
      const slot = (n: number) => {
        const startsAt = new Date(Date.now() + (2 + (n % 6)) * DAY);
        startsAt.setUTCHours(17 + (n % 2), 0, 0, 0);
        return { startsAt: startsAt.toISOString(), endsAt: new Date(startsAt.getTime() + 3600_000).toISOString() };
      };
      const booked: number[] = [];
      const statuses: number[] = [];
      let n = 0;
      const worker = async (w: number) => {
        while (n < 200) {
          const k = n++;
          const i = (k + w) % 2;
          const kind = k % 5;
          let r;
          if (kind <= 1) {
            r = await call(i, 'POST', '/api/sessions', { classTypeId: ids.classTypeId, instructorId: ids.instructors[k % 4], roomId: ids.roomId, ...slot(k), pointIds: [ids.points[k % 3]] });
            if (r.status === 201 && r.body?.id) booked.push(r.body.id);
          } else if (kind === 2) {
            const first = slot(k);
            r = await call(i, 'POST', '/api/sessions', { classTypeId: ids.classTypeId, instructorId: ids.instructors[k % 4], roomId: ids.roomId, ...first, pointIds: [ids.points[(k + 1) % 3]], rrule: 'FREQ=WEEKLY;COUNT=3', bookAvailable: true });
            if (r.status === 201 && r.body?.id) booked.push(r.body.id);
          } else if (kind === 3 && booked.length) {
            r = await call(i, 'PATCH', `/api/sessions/${booked[k % booked.length]}`, slot(k + 3));
          } else if (booked.length) {
            r = await call(i, 'POST', `/api/sessions/${booked[k % booked.length]}/cancel`, { reason: 'Studio closed', scope: 'this' });
          } else {
            r = await call(i, 'GET', '/api/sessions?from=' + encodeURIComponent(new Date().toISOString()) + '&to=' + encodeURIComponent(new Date(Date.now() + 9 * DAY).toISOString()));
          }
          statuses.push(r.status);
        }
      };
      await Promise.all(Array.from({ length: 12 }, (_, w) => worker(w)));
      const tally = statuses.reduce<Record<number, number>>((t, s) => ({ ...t, [s]: (t[s] ?? 0) + 1 }), {});
      console.log(`two processes: ${statuses.length} requests answered ${JSON.stringify(tally)}`);
      expect(statuses).toHaveLength(200);
      expect(statuses.filter((s) => s >= 500)).toEqual([]);
      expect(tally[201]).toBeGreaterThan(0);

      await withDb(async (db) => {
        const overlapping = async (column: string, table: string, id: string) =>
          (await db.raw(
            `SELECT a.${column} FROM ${table} a JOIN ${table} b ON a.${column} = b.${column} AND a.${id} < b.${id} AND a.starts_at < b.ends_at AND b.starts_at < a.ends_at WHERE NOT a.cancelled AND NOT b.cancelled`,
          )) as unknown;
        const rows = (r: unknown) => (Array.isArray(r) ? r : (r as { rows: unknown[] }).rows);
        expect(rows(await overlapping('point_id', 'session_points', 'session_id'))).toEqual([]);
        expect(rows(await overlapping('instructor_id', 'sessions', 'id'))).toEqual([]);
        if (!onPostgres) expect(rows(await db.raw('PRAGMA integrity_check'))).toEqual([{ integrity_check: 'ok' }]);
      });
    } finally {
      await Promise.all(servers.map(stop));
    }
  }, 120_000);
});

describe(`what several processes on ${DB_NAME} promise (PRODUCT.md §12)`, () => {
  let servers: Started[] = [];
  let bases: string[] = [];
  beforeAll(async () => {
    const ports = [await freePort(), await freePort()];
    servers = ports.map(spawnServer);
    await Promise.all(ports.map((p, i) => untilServing(p, servers[i])));
    bases = ports.map((p) => `http://127.0.0.1:${p}`);
  }, 60_000);
  afterAll(async () => {
    await Promise.all(servers.map(stop));
  });
  const call = (base: string, cookie: string, method: string, path: string, body?: unknown) =>
    fetch(base + path, { method, headers: { 'Content-Type': 'application/json', Origin: base, cookie }, body: body === undefined ? undefined : JSON.stringify(body) }).then(async (r) => ({
      status: r.status,
      body: (await r.json().catch(() => null)) as Record<string, unknown> | Array<Record<string, unknown>> | null,
    }));

  it('book one point and slot 30 times at once through both: exactly one 201 and no 5xx', async () => {
    const desks = await Promise.all(bases.map((b) => signInTo(b, 'desk@processes.test')));
    const startsAt = new Date(Date.now() + 10 * DAY);
    startsAt.setUTCHours(12, 0, 0, 0);
    const endsAt = new Date(startsAt.getTime() + 3600_000);
    const results = await Promise.all(
      Array.from({ length: 30 }, (_, k) =>
        call(bases[k % 2], desks[k % 2], 'POST', '/api/sessions', {
          classTypeId: ids.classTypeId,
          instructorId: ids.instructors[k % 4],
          roomId: ids.roomId,
          startsAt: startsAt.toISOString(),
          endsAt: endsAt.toISOString(),
          pointIds: [ids.lonePoint],
        }),
      ),
    );
    const statuses = results.map((r) => r.status);
    console.log(`30 bookings of one point and slot on ${DB_NAME}: ${JSON.stringify(statuses.reduce<Record<number, number>>((t, s) => ({ ...t, [s]: (t[s] ?? 0) + 1 }), {}))}`);
    expect(statuses.filter((s) => s === 201)).toHaveLength(1);
    expect(statuses.filter((s) => s >= 500)).toEqual([]);
    expect(statuses.filter((s) => s !== 201).every((s) => s === 409)).toBe(true);
    const held = await withDb((db) => db('session_points').where({ point_id: ids.lonePoint, cancelled: false }).select('session_id'));
    expect(held).toHaveLength(1);
  }, 60_000);

  it('block a point through the other process on the very next request once a fault is opened', async () => {
    const riggers = await Promise.all(bases.map((b) => signInTo(b, 'rigger@processes.test')));
    const statusOf = async (i: number) => {
      const r = await call(bases[i], riggers[i], 'GET', '/api/points');
      expect(r.status).toBe(200);
      return (r.body as Array<{ id: number; status: { status: string } }>).find((p) => p.id === ids.lonePoint)!.status.status;
    };
    // The second process has the rig list kept from before the fault.
    expect(await statusOf(1)).not.toBe('blocked');
    expect(await statusOf(1)).not.toBe('blocked');
    const fault = await call(bases[0], riggers[0], 'POST', '/api/faults', { pointId: ids.lonePoint, severity: 'high', description: 'Anchor bolt turning in the beam' });
    expect(fault.status).toBe(201);
    expect(await statusOf(1)).toBe('blocked');
  }, 60_000);

  it('refuse the 11th failed sign-in of one account and address, whichever process counts it', async () => {
    const statuses: number[] = [];
    for (let i = 0; i < 11; i++) statuses.push((await signInAttempt(bases[i % 2], 'guessed@processes.test', `wrong-${i}`)).status);
    expect(statuses.slice(0, 10)).not.toContain(429);
    expect(statuses[10]).toBe(429);
    // Refused through both, the right password included.
    for (const b of bases) expect((await signInAttempt(b, 'guessed@processes.test', TEST_PASSWORD)).status).toBe(429);
  }, 60_000);

  it('deliver each reminder exactly once though both run a mail worker', async () => {
    const desks = await Promise.all(bases.map((b) => signInTo(b, 'desk@processes.test')));
    // Classes inside the 2-hour lead [studio choice, policy default]: each gets one catch-up reminder at once.
    const booked: number[] = [];
    for (let k = 0; k < 4; k++) {
      const startsAt = new Date(Date.now() + (60 + 15 * k) * 60_000);
      startsAt.setUTCSeconds(0, 0);
      const r = await call(bases[k % 2], desks[k % 2], 'POST', '/api/sessions', {
        classTypeId: ids.classTypeId,
        instructorId: ids.instructors[k],
        roomId: ids.roomId,
        startsAt: startsAt.toISOString(),
        endsAt: new Date(startsAt.getTime() + 10 * 60_000).toISOString(),
        pointIds: [ids.points[k % 3]],
      });
      expect(r.status, JSON.stringify(r.body)).toBe(201);
      booked.push((r.body as { id: number }).id);
    }
    const reminderIds = async () =>
      (await withDb((db) => db('outbox_messages').where({ kind: 'reminder', state: 'sent' }).whereIn('session_id', booked).select('id'))) as Array<{ id: number }>;
    const deadline = Date.now() + 30_000;
    while ((await reminderIds()).length < booked.length && Date.now() < deadline) await new Promise((r) => setTimeout(r, 250));
    // Several more worker cycles in both processes (1 s apart) must send nothing again.
    await new Promise((r) => setTimeout(r, 4_000));
    const rows = await reminderIds();
    expect(rows).toHaveLength(booked.length);
    const received = sink.messages().filter((m) => rows.some((r) => m.messageId.startsWith(`<outbox.${r.id}.`)));
    expect(received.map((m) => m.messageId).sort()).toEqual([...new Set(received.map((m) => m.messageId))].sort());
    expect(received).toHaveLength(booked.length);
    const leases = await withDb((db) => db('worker_leases').select('name'));
    expect(leases).toEqual([{ name: 'mail' }]);
  }, 90_000);
});
