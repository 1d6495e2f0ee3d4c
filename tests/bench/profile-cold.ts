// `npx tsx tests/bench/profile-cold.ts [studio.sqlite] [--profile]`: the bench's full studio served
// with the derived cache off, the cold answers timed one at a time (as the bench's `cold` figures),
// and with --profile a CPU profile of the server summarised by self time (what to cut next).
// The studio file is built when missing and kept, so repeated runs start in seconds. PROFILE_N sets
// how many requests of each (30), PROFILE_ONLY=week (or today, points, "43-day range") only that one.
import { spawn } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, relative } from 'node:path';
import { BENCH_PASSWORD, buildStudio, FULL } from './build-studio';

const file = process.argv.slice(2).find((a) => !a.startsWith('--')) ?? join(tmpdir(), 'loftwise-profile.sqlite');
const profile = process.argv.includes('--profile');
const port = 5390;
const base = `http://127.0.0.1:${port}`;
const n = Number(process.env.PROFILE_N ?? 30);

async function signIn(email: string): Promise<string> {
  const csrf = await fetch(`${base}/auth/csrf`);
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const cookie = csrf.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ');
  const res = await fetch(`${base}/auth/callback/credentials`, { method: 'POST', redirect: 'manual', headers: { 'Content-Type': 'application/x-www-form-urlencoded', cookie }, body: new URLSearchParams({ email, password: BENCH_PASSWORD, csrfToken }) });
  const session = res.headers.getSetCookie().map((c) => c.split(';')[0]).find((c) => c.includes('session-token'));
  if (!session) throw new Error('sign-in failed');
  return session;
}

interface Node {
  id: number;
  callFrame: { functionName: string; url: string; lineNumber: number };
  children?: number[];
}

function summarise(dir: string) {
  const name = readdirSync(dir).find((f) => f.endsWith('.cpuprofile'));
  if (!name) return console.log('no profile written');
  const p = JSON.parse(readFileSync(join(dir, name), 'utf8')) as { nodes: Node[]; samples: number[]; timeDeltas: number[] };
  const byId = new Map(p.nodes.map((x) => [x.id, x]));
  const self = new Map<number, number>();
  p.samples.forEach((id, i) => self.set(id, (self.get(id) ?? 0) + (p.timeDeltas[i] ?? 0)));
  const total = [...self.values()].reduce((a, b) => a + b, 0);
  const where = (x: Node) => `${x.callFrame.functionName || '(anon)'} ${relative(process.cwd(), x.callFrame.url.replace('file://', ''))}:${x.callFrame.lineNumber + 1}`;
  const fn = new Map<string, number>();
  const files = new Map<string, number>();
  for (const [id, us] of self) {
    const x = byId.get(id)!;
    fn.set(where(x), (fn.get(where(x)) ?? 0) + us);
    const f = relative(process.cwd(), x.callFrame.url.replace('file://', '')).replace(/node_modules\/([^/]+(\/[^/]+)?).*/, 'node_modules/$1') || x.callFrame.functionName;
    files.set(f, (files.get(f) ?? 0) + us);
  }
  const top = (m: Map<string, number>, k: number) => [...m].sort((a, b) => b[1] - a[1]).slice(0, k).map(([w, us]) => `${((100 * us) / total).toFixed(1).padStart(5)}%  ${w}`).join('\n');
  // Inclusive: each sample counted once under every distinct function on its stack.
  const parent = new Map<number, number>();
  for (const x of p.nodes) for (const c of x.children ?? []) parent.set(c, x.id);
  const incl = new Map<string, number>();
  for (const [id, us] of self) {
    const seen = new Set<string>();
    for (let at: number | undefined = id; at !== undefined; at = parent.get(at)) {
      const x = byId.get(at)!;
      const key = `${x.callFrame.functionName || '(anon)'} ${relative(process.cwd(), x.callFrame.url.replace('file://', '')).replace(/^node_modules\/([^/]+).*/, '$1')}`;
      if (seen.has(key)) continue;
      seen.add(key);
      incl.set(key, (incl.get(key) ?? 0) + us);
    }
  }
  console.log(`\ninclusive time by function\n${top(new Map([...incl].filter(([k]) => !k.includes('node:') && !k.startsWith('(root)'))), 70)}`);
  console.log(`\nself time by function (total ${(total / 1000).toFixed(0)} ms)\n${top(fn, 45)}\n\nself time by file\n${top(files, 30)}`);
}

async function main() {
  if (!existsSync(file)) {
    console.log(`building the full studio in ${file}…`);
    await buildStudio(file, FULL, new Date());
  }
  const profDir = mkdtempSync(join(tmpdir(), 'loftwise-prof-'));
  const child = spawn(process.execPath, [...(profile ? ['--cpu-prof', `--cpu-prof-dir=${profDir}`] : []), '--import', 'tsx', 'server/index.ts'], {
    env: { ...process.env, NODE_ENV: 'production', PORT: String(port), APP_URL: base, LOFTWISE_DB: file, UPLOAD_DIR: join(profDir, 'uploads'), LOFTWISE_SEED: 'none', AUTH_SECRET: 'bench-secret-bench-secret-bench-secret-1', OUTBOX_INTERVAL_SECONDS: '3600', LOFTWISE_DERIVED_CACHE: 'off', SMTP_URL: 'smtp://127.0.0.1:9' },
    stdio: ['ignore', 'ignore', 'inherit'],
  });
  const exited = new Promise((r) => child.on('exit', r));
  try {
    for (let i = 0; ; i++) {
      try {
        if ((await fetch(`${base}/api/health`)).ok) break;
      } catch {
        /* starting */
      }
      if (i > 600) throw new Error('server did not start');
      await new Promise((r) => setTimeout(r, 100));
    }
    const cookie = await signIn('reception@bench.test');
    const monday = new Date();
    monday.setUTCDate(monday.getUTCDate() - ((monday.getUTCDay() + 6) % 7));
    monday.setUTCHours(0, 0, 0, 0);
    const range = (days: number, shift: number) => {
      const from = new Date(monday.getTime() + shift * 60_000);
      return `from=${from.toISOString()}&to=${new Date(from.getTime() + days * 86_400_000).toISOString()}`;
    };
    // PROFILE_ONLY=week (or "43-day range", today, points) times and profiles only that one.
    const timed = async (label: string, path: (i: number) => string) => {
      if (process.env.PROFILE_ONLY && label !== process.env.PROFILE_ONLY && label !== 'warm-up') return;
      const times: number[] = [];
      let bytes = 0;
      for (let i = 0; i < n; i++) {
        const t = performance.now();
        const r = await fetch(base + path(i), { headers: { cookie } });
        bytes = (await r.arrayBuffer()).byteLength;
        if (!r.ok) throw new Error(`${path(i)} answered ${r.status}`);
        times.push(performance.now() - t);
      }
      times.sort((a, b) => a - b);
      console.log(`${label.padEnd(14)} median ${times[Math.floor(n / 2)].toFixed(1)} ms, min ${times[0].toFixed(1)}, max ${times[n - 1].toFixed(1)} (${(bytes / 1024).toFixed(0)} KB)`);
    };
    await timed('warm-up', (i) => `/api/sessions?${range(7, 5000 + i)}`);
    await timed('week', (i) => `/api/sessions?${range(7, i + 1)}`);
    await timed('43-day range', (i) => `/api/sessions?${range(43, 100 + i)}`);
    await timed('today', () => '/api/today');
    await timed('points', () => '/api/points');
  } finally {
    child.kill('SIGTERM');
    await exited;
  }
  if (profile) summarise(profDir);
}

main().catch((err) => {
  console.error(err);
  process.exitCode = 1;
});
