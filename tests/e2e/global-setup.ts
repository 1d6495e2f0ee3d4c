import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { TestProject } from 'vitest/node';
import { freePort } from '../helpers/free-port';

let server: ChildProcess | null = null;
/**
 * The mail worker's cycle (OUTBOX_INTERVAL_SECONDS, 15 s in production): 2 s here, so a test that
 * waits for an e-mail (a sign-in link, an alert) waits 2 s at most rather than 15, and one that
 * waits "two more cycles" to see nothing more is sent waits 5 s. Tests read it as `outboxIntervalMs`.
 */
const OUTBOX_INTERVAL_SECONDS = 2;
let dir = '';

/** Starts the real server as `npm start` would (after the build), on its own port and database. */
export async function setup(project: TestProject) {
  dir = mkdtempSync(join(tmpdir(), 'loftwise-e2e-'));
  const port = await freePort();
  const url = `http://127.0.0.1:${port}`;
  server = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    env: { ...process.env, PORT: String(port), APP_URL: url, LOFTWISE_DB: join(dir, 'e2e.sqlite'), UPLOAD_DIR: join(dir, 'uploads'), SMTP_URL: '', OUTBOX_INTERVAL_SECONDS: String(OUTBOX_INTERVAL_SECONDS) },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let log = '';
  server.stdout!.on('data', (d) => (log += d));
  server.stderr!.on('data', (d) => (log += d));
  const deadline = Date.now() + 45_000;
  for (;;) {
    try {
      const res = await fetch(`${url}/api/health`);
      if (res.ok) break;
    } catch {
      /* not up yet */
    }
    if (Date.now() > deadline || server.exitCode !== null) throw new Error(`server did not start:\n${log}`);
    await new Promise((r) => setTimeout(r, 250));
  }
  project.provide('baseUrl', url);
  project.provide('outboxIntervalMs', OUTBOX_INTERVAL_SECONDS * 1000);
}

export async function teardown() {
  if (server && server.exitCode === null) {
    const exited = new Promise((r) => server!.once('exit', r));
    server.kill('SIGTERM');
    await Promise.race([exited, new Promise((r) => setTimeout(r, 5000))]);
  }
  rmSync(dir, { recursive: true, force: true });
}

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string;
    outboxIntervalMs: number;
  }
}
