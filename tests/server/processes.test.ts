import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn, type ChildProcess } from 'node:child_process';
import { createServer, type Server } from 'node:net';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { createDb, migrate } from '../../server/db/knex';
import { startFakeSmtp, type FakeSmtp } from '../../server/mail/fake-smtp';
import { makePoint, makeRoom, makeStandardPath, makeUser, TEST_PASSWORD } from '../helpers/factories';
import { freePort } from '../helpers/free-port';

// The real server as child processes (`tsx server/index.ts`) on one SQLite file.
const DAY = 86_400_000;
let dir = '';
let dbFile = '';
let sink: FakeSmtp;
const ids = { points: [] as number[], instructors: [] as number[], classTypeId: 0, roomId: 0 };

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'loftwise-processes-'));
  dbFile = join(dir, 'shared.sqlite');
  sink = await startFakeSmtp(0, { keep: Infinity });
  const db = createDb(dbFile);
  await migrate(db);
  await makeUser(db, { role: 'reception', email: 'desk@processes.test' });
  for (let i = 0; i < 4; i++) ids.instructors.push((await makeUser(db, { role: 'instructor' })).id);
  ids.roomId = await makeRoom(db);
  for (let i = 0; i < 3; i++) {
    const p = await makePoint(db, { roomId: ids.roomId, clearedAt: new Date(Date.now() - DAY).toISOString(), structuralRatingKn: 30 });
    for (const g of await makeStandardPath(db, p.id, { apparatus: { kind: 'fabric', inspectedUntil: null } })) await db('gear_items').where({ id: g }).update({ inspected_until: new Date(Date.now() + 60 * DAY).toISOString() });
    ids.points.push(p.id);
  }
  const [ct] = await db('class_types').insert({ name: 'Silks', apparatus: 'fabric', duration_minutes: 60, capacity: 8, performers_per_point: 1, created_at: new Date().toISOString() }).returning('id');
  ids.classTypeId = (ct as { id: number }).id;
  await db.destroy();
});
afterAll(async () => {
  await sink?.close();
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
      LOFTWISE_DB: dbFile,
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

async function signIn(base: string, email: string): Promise<string> {
  const csrf = await fetch(`${base}/auth/csrf`);
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const cookie = (csrf.headers.getSetCookie() ?? []).map((c) => c.split(';')[0]).join('; ');
  const res = await fetch(`${base}/auth/callback/credentials`, {
    method: 'POST',
    redirect: 'manual',
    headers: { 'Content-Type': 'application/x-www-form-urlencoded', cookie },
    body: new URLSearchParams({ email, password: TEST_PASSWORD, csrfToken }),
  });
  return (res.headers.getSetCookie() ?? []).map((c) => c.split(';')[0]).filter((c) => c.includes('session-token')).join('; ');
}

const stop = async (s: Started) => {
  if (s.child.exitCode === null) s.child.kill('SIGTERM');
  await s.exit;
};

describe('a port already taken', () => {
  it('makes the server exit non-zero with a clear message, before its mail worker runs', async () => {
    const db = new Database(dbFile);
    const now = new Date().toISOString();
    db.prepare(
      "INSERT INTO outbox_messages (kind, unique_key, recipients_json, subject, text_body, html_body, state, attempts, next_attempt_at, created_at) VALUES ('session_change', 'port-test', '[\"teach@processes.test\"]', 'Due now', 'x', '<p>x</p>', 'queued', 0, ?, ?)",
    ).run(now, now);
    db.close();
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
      const check = new Database(dbFile, { readonly: true });
      expect(check.prepare("SELECT state FROM outbox_messages WHERE unique_key = 'port-test'").get()).toEqual({ state: 'queued' });
      check.close();
      expect(sink.messages().filter((m) => m.subject === 'Due now')).toEqual([]);
    } finally {
      holder.close();
      const db2 = new Database(dbFile);
      db2.prepare("DELETE FROM outbox_messages WHERE unique_key = 'port-test'").run();
      db2.close();
    }
  }, 40_000);
});

describe('two server processes on one SQLite file', () => {
  it('answer 200 mixed bookings with no 5xx and no double booking', async () => {
    const ports = [await freePort(), await freePort()];
    const servers = ports.map(spawnServer);
    try {
      await Promise.all(ports.map((p, i) => untilServing(p, servers[i])));
      const bases = ports.map((p) => `http://127.0.0.1:${p}`);
      const desks = await Promise.all(bases.map((b) => signIn(b, 'desk@processes.test')));
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

      const db = new Database(dbFile, { readonly: true });
      try {
        const overlapping = (column: string, table: string) =>
          db
            .prepare(
              `SELECT a.${column} FROM ${table} a JOIN ${table} b ON a.${column} = b.${column} AND a.rowid < b.rowid AND a.starts_at < b.ends_at AND b.starts_at < a.ends_at WHERE a.cancelled = 0 AND b.cancelled = 0`,
            )
            .all();
        expect(overlapping('point_id', 'session_points')).toEqual([]);
        expect(overlapping('instructor_id', 'sessions')).toEqual([]);
        expect(db.pragma('integrity_check', { simple: true })).toBe('ok');
      } finally {
        db.close();
      }
    } finally {
      await Promise.all(servers.map(stop));
    }
  }, 120_000);
});
