import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createDb, migrate } from '../../server/db/knex';
import { makeUser, TEST_PASSWORD } from '../helpers/factories';
import { freePort } from '../helpers/free-port';
import { freshDatabase, onPostgres, type TestDatabase } from '../helpers/database';

// `WEB_CONCURRENCY=2 npm start`'s server: node:cluster, on the SQLite file or PostgreSQL.
let dir = '';
let database: TestDatabase;

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'loftwise-cluster-'));
  database = await freshDatabase(dir, 'cluster.sqlite');
  const db = createDb(database.target, { poolMax: 1 });
  await migrate(db);
  await makeUser(db, { role: 'owner', email: 'owner@cluster.test' });
  const now = new Date().toISOString();
  await db('outbox_messages').insert({ kind: 'session_change', unique_key: 'cluster-test', recipients_json: '["teach@cluster.test"]', subject: 'Sent once by one process', text_body: 'x', html_body: '<p>x</p>', state: 'queued', attempts: 0, next_attempt_at: now, created_at: now });
  await db.destroy();
});
afterAll(async () => {
  await database?.drop();
  rmSync(dir, { recursive: true, force: true });
});

describe(`WEB_CONCURRENCY=2 on ${onPostgres ? 'PostgreSQL' : 'the SQLite file'}`, () => {
  it('serves from two processes, sends through the one catcher, shows it on the Mailbox page from either, and stops cleanly', async () => {
    const port = await freePort();
    const base = `http://127.0.0.1:${port}`;
    const child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
      env: {
        ...process.env,
        PORT: String(port),
        APP_URL: base,
        ...(onPostgres ? { DATABASE_URL: database.target } : { LOFTWISE_DB: database.target }),
        UPLOAD_DIR: join(dir, 'uploads'),
        LOFTWISE_SEED: 'none',
        AUTH_SECRET: 'cluster-test-secret-cluster-test-secret-01',
        SMTP_URL: '',
        WEB_CONCURRENCY: '2',
        OUTBOX_INTERVAL_SECONDS: '1',
      },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let out = '';
    child.stdout!.on('data', (d) => (out += d));
    child.stderr!.on('data', (d) => (out += d));
    const exit = new Promise<number | null>((r) => child.once('exit', (code) => r(code)));
    try {
      const deadline = Date.now() + 40_000;
      while (!out.includes('2 processes).')) {
        if (Date.now() > deadline || child.exitCode !== null) throw new Error(`did not start: ${out}`);
        await new Promise((r) => setTimeout(r, 200));
      }
      const csrf = await fetch(`${base}/auth/csrf`);
      const { csrfToken } = (await csrf.json()) as { csrfToken: string };
      const res = await fetch(`${base}/auth/callback/credentials`, {
        method: 'POST',
        redirect: 'manual',
        headers: { 'Content-Type': 'application/x-www-form-urlencoded', cookie: (csrf.headers.getSetCookie() ?? []).map((c) => c.split(';')[0]).join('; ') },
        body: new URLSearchParams({ email: 'owner@cluster.test', password: TEST_PASSWORD, csrfToken }),
      });
      const cookie = (res.headers.getSetCookie() ?? []).map((c) => c.split(';')[0]).filter((c) => c.includes('session-token')).join('; ');
      expect(cookie).not.toBe('');
      const mailbox = async () => {
        const r = await fetch(`${base}/api/dev/mailbox`, { headers: { cookie, Connection: 'close' } });
        expect(r.status).toBe(200);
        return ((await r.json()) as Array<{ subject: string }>).filter((m) => m.subject === 'Sent once by one process');
      };
      while ((await mailbox()).length === 0) {
        if (Date.now() > deadline) throw new Error('the queued message never reached the catcher');
        await new Promise((r) => setTimeout(r, 250));
      }
      await new Promise((r) => setTimeout(r, 3_000));
      // New connections each time: the cluster spreads them over both processes; every one sees it once.
      for (let i = 0; i < 6; i++) expect(await mailbox()).toHaveLength(1);
    } finally {
      if (child.exitCode === null) child.kill('SIGTERM');
    }
    expect(await exit).toBe(0);
    expect(out).toContain('SIGTERM: stopping the server processes.');
  }, 90_000);
});
