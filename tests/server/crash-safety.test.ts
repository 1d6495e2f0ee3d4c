import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { createDb, migrate } from '../../server/db/knex';
import { makePoint, makeRoom, makeStandardPath, makeUser, TEST_PASSWORD } from '../helpers/factories';
import { freePort } from '../helpers/free-port';

// The real server as a child process, killed with SIGKILL mid-load again and again, restarted on
// the same database: every acknowledged write must survive and the file must stay sound.
const CYCLES = Number(process.env.CRASH_CYCLES ?? 20);
let dir = '';
let dbFile = '';
const ids = { pointIds: [] as number[], classTypeId: 0, instructors: [] as number[] };
const acknowledged = { faults: new Set<number>(), sessions: new Set<number>(), inspections: new Set<number>() };

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'loftwise-crash-'));
  dbFile = join(dir, 'crash.sqlite');
  const db = createDb(dbFile);
  await migrate(db);
  await makeUser(db, { role: 'reception', email: 'desk@crash.test' });
  await makeUser(db, { role: 'instructor', email: 'teach@crash.test' });
  for (let i = 0; i < 6; i++) ids.instructors.push((await makeUser(db, { role: 'instructor' })).id);
  const roomId = await makeRoom(db);
  for (let i = 0; i < 4; i++) {
    const p = await makePoint(db, { roomId, clearedAt: new Date(Date.now() - 86_400_000).toISOString(), structuralRatingKn: 30 });
    for (const g of await makeStandardPath(db, p.id)) await db('gear_items').where({ id: g }).update({ inspected_until: new Date(Date.now() + 20 * 86_400_000).toISOString() });
    ids.pointIds.push(p.id);
  }
  const [ct] = await db('class_types').insert({ name: 'Silks', apparatus: 'fabric', duration_minutes: 60, capacity: 8, performers_per_point: 1, created_at: new Date().toISOString() }).returning('id');
  ids.classTypeId = (ct as { id: number }).id;
  await db.destroy();
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

async function start(port: number): Promise<ChildProcess> {
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    env: { ...process.env, PORT: String(port), APP_URL: `http://127.0.0.1:${port}`, LOFTWISE_DB: dbFile, UPLOAD_DIR: join(dir, 'uploads'), LOFTWISE_SEED: 'none', AUTH_SECRET: 'crash-test-secret-crash-test-secret-0123', SMTP_URL: '' },
    stdio: ['ignore', 'ignore', 'pipe'],
  });
  let errors = '';
  child.stderr!.on('data', (d) => (errors += d));
  const deadline = Date.now() + 30_000;
  for (;;) {
    try {
      if ((await fetch(`http://127.0.0.1:${port}/api/health`)).ok) return child;
    } catch {
      /* starting */
    }
    if (Date.now() > deadline || child.exitCode !== null) throw new Error(`server did not start: ${errors}`);
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

describe('crash safety', () => {
  it(`keeps every acknowledged write through ${CYCLES} SIGKILLs under write load`, async () => {
    let slot = 0;
    for (let cycle = 0; cycle < CYCLES; cycle++) {
      const port = await freePort();
      const base = `http://127.0.0.1:${port}`;
      const child = await start(port);
      const desk = await signIn(base, 'desk@crash.test');
      const teacher = await signIn(base, 'teach@crash.test');
      const post = (cookie: string, path: string, body: unknown) =>
        fetch(base + path, { method: 'POST', headers: { 'Content-Type': 'application/json', Origin: base, cookie }, body: JSON.stringify(body) }).then(async (r) => ({ status: r.status, body: (await r.json().catch(() => null)) as { id?: number; inspectionId?: number } | null }));
      let stop = false;
      const load = async (worker: number) => {
        while (!stop) {
          const kind = (worker + slot) % 3;
          try {
            if (kind === 0) {
              const r = await post(teacher, '/api/faults', { pointId: ids.pointIds[slot % 4], severity: 'low', description: `crash cycle ${cycle} fault ${slot}` });
              if (r.status === 201 && r.body?.id) acknowledged.faults.add(r.body.id);
            } else if (kind === 1) {
              // Bookings on the same few slots, so double-booking would show if a check were lost.
              const day = 2 + (slot % 10);
              const startsAt = new Date(Date.now() + day * 86_400_000);
              startsAt.setUTCHours(18, 0, 0, 0);
              const r = await post(desk, '/api/sessions', { classTypeId: ids.classTypeId, instructorId: ids.instructors[slot % 6], roomId: 1, startsAt: startsAt.toISOString(), endsAt: new Date(startsAt.getTime() + 3600_000).toISOString(), pointIds: [ids.pointIds[slot % 4]] });
              if (r.status === 201 && r.body?.id) acknowledged.sessions.add(r.body.id);
            } else {
              const r = await post(teacher, `/api/points/${ids.pointIds[slot % 4]}/preuse`, { items: [{ key: 'connectors_locked', result: 'pass' }, { key: 'textile_unworn', result: 'pass' }, { key: 'swivel_turning', result: 'pass' }, { key: 'basket_clear', result: 'pass' }] });
              if (r.status === 201 && r.body?.inspectionId) acknowledged.inspections.add(r.body.inspectionId);
            }
          } catch {
            return; // the server died under us
          }
          slot += 1;
        }
      };
      const workers = [0, 1, 2].map(load);
      await new Promise((r) => setTimeout(r, 150 + Math.random() * 600));
      child.kill('SIGKILL');
      stop = true;
      await Promise.all(workers);
      if (child.exitCode === null && child.signalCode === null) await new Promise((r) => child.once('exit', r));
    }
    expect(acknowledged.faults.size + acknowledged.sessions.size + acknowledged.inspections.size).toBeGreaterThan(CYCLES);

    // One more clean start must succeed on the crashed file (migrations, WAL recovery).
    const port = await freePort();
    const child = await start(port);
    child.kill('SIGTERM');
    await new Promise((r) => child.once('exit', r));

    const db = new Database(dbFile, { readonly: true });
    try {
      expect(db.pragma('integrity_check', { simple: true })).toBe('ok');
      const has = (table: string, set: Set<number>) => {
        const found = new Set((db.prepare(`SELECT id FROM ${table}`).all() as Array<{ id: number }>).map((r) => r.id));
        return [...set].filter((id) => !found.has(id));
      };
      expect(has('faults', acknowledged.faults)).toEqual([]);
      expect(has('sessions', acknowledged.sessions)).toEqual([]);
      expect(has('inspections', acknowledged.inspections)).toEqual([]);
      const doubles = db
        .prepare('SELECT a.point_id FROM session_points a JOIN session_points b ON a.point_id = b.point_id AND a.session_id < b.session_id AND a.starts_at < b.ends_at AND b.starts_at < a.ends_at WHERE a.cancelled = 0 AND b.cancelled = 0')
        .all();
      expect(doubles).toEqual([]);
    } finally {
      db.close();
    }
  }, 600_000);
});
