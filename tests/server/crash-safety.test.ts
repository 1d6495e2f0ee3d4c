import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { createDb, migrate } from '../../server/db/knex';
import { startFakeSmtp, type CaughtMessage, type FakeSmtp } from '../../server/mail/fake-smtp';
import { outboxMessageId } from '../../server/mail/deliver';
import { makePoint, makeRoom, makeStandardPath, makeUser, TEST_AUDIT_KEY } from '../helpers/factories';
import { freePort } from '../helpers/free-port';
import { signInTo } from '../helpers/child-server';

// The real server as a child process, killed with SIGKILL mid-load again and again, restarted on
// the same database: every acknowledged write must survive, the file must stay sound, and every
// message the outbox holds must reach the SMTP server (a real one, in this process) exactly once
// but for a redelivery, under the same Message-ID, of a send a kill cut off.
const CYCLES = Number(process.env.CRASH_CYCLES ?? 20);
const DAY = 86_400_000;
// A lease is written when a row is claimed, so every start gets the short one: a row a kill left
// `sending` goes again seconds later, not after the default five minutes.
const LEASE_SECONDS = 2;
const INTERVAL_SECONDS = 1;
// deliverDue sends one message at a time, so a kill can cut off at most one accepted-but-unmarked send.
const SENDS_IN_FLIGHT = 1;

let dir = '';
let dbFile = '';
let sink: FakeSmtp;
// Bookings and moves go on points nobody reports a fault on, so they keep contending all along;
// faults go on other points, each with classes booked on it, so that each fault makes classes at risk.
const ids = { bookingPoints: [] as number[], faultPoints: [] as number[], classTypeId: 0, roomId: 0, instructors: [] as number[] };
const acknowledged = { faults: new Set<number>(), sessions: new Set<number>(), inspections: new Set<number>(), moves: new Map<number, number>() };

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'loftwise-crash-'));
  dbFile = join(dir, 'crash.sqlite');
  sink = await startFakeSmtp(0, { keep: Infinity });
  const db = createDb(dbFile);
  await migrate(db);
  await makeUser(db, { role: 'reception', email: 'desk@crash.test' });
  const teacher = await makeUser(db, { role: 'instructor', email: 'teach@crash.test' });
  for (let i = 0; i < 6; i++) ids.instructors.push((await makeUser(db, { role: 'instructor' })).id);
  ids.roomId = await makeRoom(db);
  for (const list of [ids.bookingPoints, ids.faultPoints]) {
    for (let i = 0; i < 4; i++) {
      const p = await makePoint(db, { roomId: ids.roomId, clearedAt: new Date(Date.now() - DAY).toISOString(), structuralRatingKn: 30 });
      for (const g of await makeStandardPath(db, p.id, { apparatus: { kind: 'fabric', inspectedUntil: null } })) await db('gear_items').where({ id: g }).update({ inspected_until: new Date(Date.now() + 20 * DAY).toISOString() });
      list.push(p.id);
    }
  }
  const [ct] = await db('class_types').insert({ name: 'Silks', apparatus: 'fabric', duration_minutes: 60, capacity: 8, performers_per_point: 1, created_at: new Date().toISOString() }).returning('id');
  ids.classTypeId = (ct as { id: number }).id;
  // Two classes on each fault point, days ahead (no reminder is due within the test).
  const now = new Date().toISOString();
  for (const [i, pointId] of ids.faultPoints.entries()) {
    for (const day of [3 + i, 8 + i]) {
      const startsAt = new Date(Date.now() + day * DAY);
      startsAt.setUTCHours(10, 0, 0, 0);
      const endsAt = new Date(startsAt.getTime() + 3600_000).toISOString();
      const [row] = await db('sessions')
        .insert({ class_type_id: ids.classTypeId, instructor_id: teacher.id, room_id: ids.roomId, starts_at: startsAt.toISOString(), ends_at: endsAt, cancelled: false, at_risk: false, created_at: now, updated_at: now })
        .returning('id');
      await db('session_points').insert({ session_id: (row as { id: number }).id, point_id: pointId, starts_at: startsAt.toISOString(), ends_at: endsAt, cancelled: false });
    }
  }
  await db.destroy();
});
afterAll(async () => {
  await sink?.close();
  rmSync(dir, { recursive: true, force: true });
});

async function start(port: number): Promise<ChildProcess> {
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    env: {
      ...process.env,
      PORT: String(port),
      APP_URL: `http://127.0.0.1:${port}`,
      LOFTWISE_DB: dbFile,
      UPLOAD_DIR: join(dir, 'uploads'),
      LOFTWISE_SEED: 'none',
      AUTH_SECRET: 'crash-test-secret-crash-test-secret-0123',
      // The key the factories chain their audit entries under, so the server's entries follow them.
      AUDIT_KEY: TEST_AUDIT_KEY,
      SMTP_URL: sink.url,
      OUTBOX_LEASE_SECONDS: String(LEASE_SECONDS),
      OUTBOX_INTERVAL_SECONDS: String(INTERVAL_SECONDS),
      // Moves tell at once here: within the undo window moves of a class are told as one (or not
      // at all when undone), and this test counts one committed notice per acknowledged move.
      MOVE_NOTICE_DELAY_SECONDS: '0',
    },
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

/** 18:00 UTC on the day `day` days from now, for an hour. */
function eveningSlot(day: number) {
  const startsAt = new Date(Date.now() + day * DAY);
  startsAt.setUTCHours(18, 0, 0, 0);
  return { startsAt: startsAt.toISOString(), endsAt: new Date(startsAt.getTime() + 3600_000).toISOString() };
}

const exited = (child: ChildProcess) => (child.exitCode !== null || child.signalCode !== null ? Promise.resolve() : new Promise((r) => child.once('exit', r)));

describe('crash safety', () => {
  it(`keeps every acknowledged write through ${CYCLES} SIGKILLs under write load, and sends every outbox message once`, async () => {
    let slot = 0;
    const moving = new Set<number>();
    for (let cycle = 0; cycle < CYCLES; cycle++) {
      const port = await freePort();
      const base = `http://127.0.0.1:${port}`;
      const child = await start(port);
      const desk = await signInTo(base, 'desk@crash.test');
      const teacher = await signInTo(base, 'teach@crash.test');
      type Body = { id?: number; inspectionId?: number; startsAt?: string } | null;
      const call = (cookie: string, method: string, path: string, body?: unknown) =>
        fetch(base + path, { method, headers: { 'Content-Type': 'application/json', Origin: base, cookie }, body: body === undefined ? undefined : JSON.stringify(body) }).then(async (r) => ({ status: r.status, body: (await r.json().catch(() => null)) as Body }));
      let stop = false;
      const load = async (worker: number) => {
        while (!stop) {
          const kind = (worker + slot) % 4;
          try {
            if (kind === 0) {
              const r = await call(teacher, 'POST', '/api/faults', { pointId: ids.faultPoints[slot % 4], severity: 'low', description: `crash cycle ${cycle} fault ${slot}` });
              if (r.status === 201 && r.body?.id) acknowledged.faults.add(r.body.id);
            } else if (kind === 1) {
              // Bookings on the same few slots, so double-booking would show if a check were lost.
              const r = await call(desk, 'POST', '/api/sessions', { classTypeId: ids.classTypeId, instructorId: ids.instructors[slot % 6], roomId: ids.roomId, ...eveningSlot(2 + (slot % 10)), pointIds: [ids.bookingPoints[slot % 4]] });
              if (r.status === 201 && r.body?.id) acknowledged.sessions.add(r.body.id);
            } else if (kind === 2) {
              const r = await call(teacher, 'POST', `/api/points/${ids.bookingPoints[slot % 4]}/preuse`, { items: [{ key: 'connectors_locked', result: 'pass' }, { key: 'textile_unworn', result: 'pass' }, { key: 'swivel_turning', result: 'pass' }, { key: 'basket_clear', result: 'pass' }] });
              if (r.status === 201 && r.body?.inspectionId) acknowledged.inspections.add(r.body.inspectionId);
            } else {
              // Move a booked class to another evening, which queues the instructor's e-mail in the
              // same transaction. One move per class at a time, read first, so each 200 is a real move.
              const free = [...acknowledged.sessions].filter((s) => !moving.has(s));
              const id = free.length ? free[slot % free.length] : undefined;
              if (id !== undefined) {
                moving.add(id);
                try {
                  const now = await call(desk, 'GET', `/api/sessions/${id}`);
                  let day = 2 + Math.floor(Math.random() * 12);
                  if (eveningSlot(day).startsAt === now.body?.startsAt) day += 1;
                  const r = await call(desk, 'PATCH', `/api/sessions/${id}`, eveningSlot(day));
                  if (r.status === 200) acknowledged.moves.set(id, (acknowledged.moves.get(id) ?? 0) + 1);
                } finally {
                  moving.delete(id);
                }
              }
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
      await exited(child);
    }
    expect(acknowledged.faults.size + acknowledged.sessions.size + acknowledged.inspections.size).toBeGreaterThan(CYCLES);
    expect(acknowledged.moves.size).toBeGreaterThan(0);

    // One more clean start must succeed on the crashed file (migrations, WAL recovery), and its
    // worker must finish the outbox: wait until nothing is queued or being sent for a few cycles
    // in a row (so a cycle has run after the last fault and found nothing more to queue).
    const port = await freePort();
    const child = await start(port);
    const watch = new Database(dbFile, { readonly: true });
    try {
      const pending = watch.prepare("SELECT count(*) AS n FROM outbox_messages WHERE state IN ('queued', 'sending')");
      const deadline = Date.now() + 60_000;
      let quietSince = Date.now();
      for (;;) {
        if ((pending.get() as { n: number }).n > 0) quietSince = Date.now();
        else if (Date.now() - quietSince >= 3 * INTERVAL_SECONDS * 1000) break;
        if (Date.now() > deadline) throw new Error(`the outbox did not drain within 60 s: ${(pending.get() as { n: number }).n} rows still queued or sending`);
        await new Promise((r) => setTimeout(r, 100));
      }
    } finally {
      watch.close();
    }
    child.kill('SIGTERM');
    await exited(child);

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

      const rows = db.prepare('SELECT id, kind, unique_key, recipients_json, subject, state, last_error FROM outbox_messages ORDER BY id').all() as Array<{
        id: number;
        kind: string;
        unique_key: string;
        recipients_json: string;
        subject: string;
        state: string;
        last_error: string | null;
      }>;
      // The load queued both kinds: at-risk alerts (faults on booked points) and change e-mails (moves).
      expect(rows.filter((r) => r.kind === 'at_risk').length).toBeGreaterThan(0);
      expect(rows.filter((r) => r.kind === 'session_change').length).toBeGreaterThan(0);
      // An acknowledged move committed its e-mail with it.
      const movedRows = db.prepare('SELECT count(*) AS n FROM outbox_messages WHERE unique_key LIKE ?');
      const lostMoveMail = [...acknowledged.moves].filter(([id, n]) => (movedRows.get(`change:${id}:moved:%`) as { n: number }).n < n);
      expect(lostMoveMail).toEqual([]);
      // Every message went: none failed, none left queued or sending, none dropped.
      expect(rows.filter((r) => r.state !== 'sent').map(({ id, kind, state, last_error }) => ({ id, kind, state, last_error }))).toEqual([]);

      // Each row reached the SMTP server under its own stable Message-ID, as itself.
      const byId = new Map<string, CaughtMessage[]>();
      const deliveries = sink.messages();
      for (const m of deliveries) byId.set(m.messageId, [...(byId.get(m.messageId) ?? []), m]);
      const expected = new Map(rows.map((r) => [outboxMessageId({ id: r.id, uniqueKey: r.unique_key }, 'http://127.0.0.1'), r]));
      expect([...expected.keys()].filter((mid) => !byId.has(mid))).toEqual([]);
      expect([...byId.keys()].filter((mid) => !expected.has(mid))).toEqual([]);
      expect(byId.size).toBe(rows.length);
      for (const [mid, copies] of byId) {
        const row = expected.get(mid)!;
        for (const copy of copies) expect({ mid, subject: copy.subject, to: copy.to }).toEqual({ mid, subject: row.subject, to: JSON.parse(row.recipients_json) });
      }
      // At least once: a kill between the server accepting a message and the row being marked
      // sent means it goes again, under the same Message-ID. Nothing else may repeat a message.
      const duplicates = deliveries.length - byId.size;
      console.log(`crash safety: ${rows.length} outbox messages, ${deliveries.length} deliveries, ${duplicates} redelivered after ${CYCLES} kills`);
      expect(duplicates).toBeLessThanOrEqual(CYCLES * SENDS_IN_FLIGHT);
    } finally {
      db.close();
    }
  }, 600_000);
});
