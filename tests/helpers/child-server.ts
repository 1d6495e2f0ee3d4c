import { spawn, type ChildProcess } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { freePort } from './free-port';
import { TEST_PASSWORD } from './factories';

/**
 * The real server (`server/index.ts`) as a child process on a database the test prepared, so what
 * it does with its own event loop and memory can be measured from outside, signed in as `email`
 * (a user the test made). `stop()` ends it. Another test's server may take the port between
 * `freePort` and the child's listen; a sign-in that fails there means we reached that other
 * server, so the child is stopped and started again on another port.
 */
export async function startChildServer(o: { dbFile: string; uploadDir: string; email: string; env?: Record<string, string> }) {
  for (let attempt = 1; ; attempt++) {
    const server = await startOnce(o);
    const cookie = await signInTo(server.base, o.email).catch((err: unknown) => (attempt < 3 ? null : Promise.reject(err)));
    if (cookie) return { ...server, cookie };
    await server.stop();
  }
}

async function startOnce(o: { dbFile: string; uploadDir: string; env?: Record<string, string> }) {
  const port = await freePort();
  const base = `http://127.0.0.1:${port}`;
  const child: ChildProcess = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    env: { ...process.env, PORT: String(port), APP_URL: base, LOFTWISE_DB: o.dbFile, UPLOAD_DIR: o.uploadDir, LOFTWISE_SEED: 'none', SMTP_URL: '', NODE_ENV: 'test', ...o.env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let log = '';
  child.stdout!.on('data', (d) => (log += d));
  child.stderr!.on('data', (d) => (log += d));
  const stop = async () => {
    if (child.exitCode !== null) return;
    const exited = new Promise((r) => child.once('exit', r));
    child.kill('SIGTERM');
    await Promise.race([exited, new Promise((r) => setTimeout(r, 5000))]);
    if (child.exitCode === null) child.kill('SIGKILL');
  };
  const deadline = Date.now() + 45_000;
  for (;;) {
    const up = await fetch(`${base}/api/health`).then((r) => r.ok, () => false);
    if (up) break;
    if (Date.now() > deadline || child.exitCode !== null) {
      await stop();
      throw new Error(`server did not start:\n${log}`);
    }
    await new Promise((r) => setTimeout(r, 250));
  }
  return { base, pid: child.pid!, stop, log: () => log };
}

/** Signs in through Auth.js's credentials flow; returns the session cookie. */
export async function signInTo(base: string, email: string, password = TEST_PASSWORD): Promise<string> {
  const { cookie } = await signInAttempt(base, email, password);
  if (!cookie) throw new Error(`could not sign in as ${email}`);
  return cookie;
}

/** One credentials sign-in as the form posts it: the answer's status and the session cookie ('' when refused). */
export async function signInAttempt(base: string, email: string, password: string): Promise<{ status: number; cookie: string }> {
  const csrf = await fetch(`${base}/auth/csrf`);
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const cookie = (csrf.headers.getSetCookie() ?? []).map((c) => c.split(';')[0]).join('; ');
  const res = await fetch(`${base}/auth/callback/credentials`, {
    method: 'POST',
    redirect: 'manual',
    headers: { 'Content-Type': 'application/x-www-form-urlencoded', cookie },
    body: new URLSearchParams({ email, password, csrfToken }),
  });
  const session = (res.headers.getSetCookie() ?? []).map((c) => c.split(';')[0]).find((c) => c.startsWith('authjs.session-token='));
  return { status: res.status, cookie: session ?? '' };
}

/** Resident memory now and at its peak since the process started, in MB (/proc/<pid>/status). */
export function residentMb(pid: number) {
  const status = readFileSync(`/proc/${pid}/status`, 'utf8');
  const kb = (field: string) => Number(/\d+/.exec(status.split('\n').find((l) => l.startsWith(field))!)![0]);
  return { now: kb('VmRSS:') / 1024, peak: kb('VmHWM:') / 1024 };
}
