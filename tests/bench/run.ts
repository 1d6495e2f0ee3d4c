// `npm run bench [-- --quick]`: builds a large studio in a temporary database, serves it with the
// real server on loopback, loads it from a second process (autocannon) and prints figures.
// The last line is one JSON object. Figures, not pass/fail: targets are in DEVELOPERS.md.
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { BENCH_PASSWORD, buildStudio, FULL, growSessions, QUICK } from './build-studio';

const quick = process.argv.includes('--quick');
const size = quick ? QUICK : FULL;
const seconds = quick ? 2 : 8;
const basePort = quick ? 5400 : 5300;
const CHROMIUM = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';
const dir = mkdtempSync(join(tmpdir(), 'loftwise-bench-'));
const children: ChildProcess[] = [];
const log = (s: string) => process.stderr.write(s + '\n');

async function startServer(file: string, port: number) {
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    env: { ...process.env, NODE_ENV: 'production', PORT: String(port), APP_URL: `http://127.0.0.1:${port}`, LOFTWISE_DB: file, UPLOAD_DIR: join(dir, 'uploads'), LOFTWISE_SEED: 'none', LOFTWISE_BENCH_BASELINE: '1', AUTH_SECRET: 'bench-secret-bench-secret-bench-secret-1' },
    stdio: ['ignore', 'ignore', 'inherit'],
  });
  children.push(child);
  const base = `http://127.0.0.1:${port}`;
  for (let i = 0; i < 300; i++) {
    try {
      if ((await fetch(`${base}/api/health`)).ok) return base;
    } catch {
      /* starting */
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error('bench server did not start');
}

async function signIn(base: string, email: string): Promise<string> {
  const csrf = await fetch(`${base}/auth/csrf`);
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const cookie = csrf.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ');
  const res = await fetch(`${base}/auth/callback/credentials`, { method: 'POST', redirect: 'manual', headers: { 'Content-Type': 'application/x-www-form-urlencoded', cookie }, body: new URLSearchParams({ email, password: BENCH_PASSWORD, csrfToken }) });
  const session = res.headers.getSetCookie().map((c) => c.split(';')[0]).find((c) => c.includes('session-token'));
  if (!session) throw new Error(`bench sign-in failed for ${email}`);
  return session;
}

interface Load {
  rps: number;
  p50Ms: number;
  p99Ms: number;
  non2xx: number;
}
/** autocannon in its own process, 50 connections, so the load generator does not share our event loop. */
function autocannon(url: string, cookie: string, duration: number): Load {
  const out = spawnSync(join('node_modules', '.bin', 'autocannon'), ['-c', '50', '-d', String(duration), '-j', '-H', `cookie=${cookie}`, url], { encoding: 'utf8', maxBuffer: 64 * 1024 * 1024 });
  if (out.status !== 0) throw new Error(`autocannon failed: ${out.stderr}`);
  const r = JSON.parse(out.stdout) as { requests: { average: number }; latency: { p50: number; p99: number }; non2xx: number };
  return { rps: Math.round(r.requests.average), p50Ms: r.latency.p50, p99Ms: r.latency.p99, non2xx: r.non2xx };
}

async function median(n: number, f: () => Promise<void>) {
  const times: number[] = [];
  for (let i = 0; i < n; i++) {
    const t = performance.now();
    await f();
    times.push(performance.now() - t);
  }
  times.sort((a, b) => a - b);
  return Math.round(times[Math.floor(n / 2)] * 100) / 100;
}

const gzKb = (files: Iterable<string>) => Math.round(([...new Set(files)].reduce((sum, f) => sum + gzipSync(readFileSync(join('dist', f))).length, 0) / 1024) * 10) / 10;

/** Without a browser: the entry script and what index.html preloads. */
function entryJsGzipKb(): number | null {
  const html = join('dist', 'index.html');
  if (!existsSync(html)) return null;
  const text = readFileSync(html, 'utf8');
  return gzKb([...text.matchAll(/<script[^>]+src="\/([^"]+\.js)"/g), ...text.matchAll(/<link[^>]+rel="modulepreload"[^>]+href="\/([^"]+\.js)"/g)].map((m) => m[1]));
}

/** Today's LCP, and the JavaScript the sign-in page and the Today page actually load (gzip of each file). */
async function browserFigures(base: string): Promise<{ lcp: number | null; signInKb: number | null; todayKb: number | null }> {
  if (!existsSync(CHROMIUM)) return { lcp: null, signInKb: null, todayKb: null };
  const { chromium } = await import('playwright-core');
  const ctx = await chromium.launchPersistentContext(mkdtempSync(join(dir, 'chromium-')), {
    executablePath: CHROMIUM,
    headless: true,
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
    viewport: { width: 390, height: 844 },
  });
  try {
    const page = await ctx.newPage();
    let loaded: string[] = [];
    page.on('response', (r) => {
      const path = new URL(r.url()).pathname;
      if (path.endsWith('.js')) loaded.push(path.slice(1));
    });
    await page.goto(`${base}/sign-in`, { waitUntil: 'networkidle' });
    const signInKb = gzKb(loaded);
    await page.getByLabel('E-mail').fill('teacher0@bench.test');
    await page.getByLabel('Password').fill(BENCH_PASSWORD);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL('**/today');
    const runs: number[] = [];
    loaded = [];
    await page.goto(`${base}/today`, { waitUntil: 'networkidle' });
    const todayKb = gzKb(loaded);
    for (let i = 0; i < 3; i++) {
      await page.goto(`${base}/today`, { waitUntil: 'networkidle' });
      runs.push(
        await page.evaluate(
          () => new Promise<number>((resolve) => new PerformanceObserver((list) => { const e = list.getEntries(); resolve(e[e.length - 1].startTime); }).observe({ type: 'largest-contentful-paint', buffered: true })),
        ),
      );
    }
    runs.sort((a, b) => a - b);
    return { lcp: Math.round(runs[1]), signInKb, todayKb };
  } finally {
    await ctx.close();
  }
}

async function main() {
  const now = new Date();
  if (!existsSync(join('dist', 'index.html'))) {
    log('building the client…');
    spawnSync('npx', ['vite', 'build'], { stdio: 'ignore' });
  }
  log(`building the ${quick ? 'quick' : 'full'} studio…`);
  const file = join(dir, 'bench.sqlite');
  const { counts } = await buildStudio(file, size, now);
  log(`  ${JSON.stringify(counts)}`);
  const base = await startServer(file, basePort);
  const cookie = await signIn(base, 'reception@bench.test');

  const monday = new Date(now);
  monday.setUTCDate(monday.getUTCDate() - ((monday.getUTCDay() + 6) % 7));
  monday.setUTCHours(0, 0, 0, 0);
  const week = `from=${monday.toISOString()}&to=${new Date(monday.getTime() + 7 * 86_400_000).toISOString()}`;
  const dayStart = new Date(now);
  dayStart.setUTCHours(0, 0, 0, 0);
  const day = `from=${dayStart.toISOString()}&to=${new Date(dayStart.getTime() + 86_400_000).toISOString()}`;
  const pairs: Record<string, [string, string]> = {
    sessionsWeek: [`/api/sessions?${week}`, `/api/bench/baseline/sessions?${week}`],
    today: ['/api/today', `/api/bench/baseline/today?${day}`],
    points: ['/api/points', '/api/bench/baseline/points'],
  };
  const endpoints: Record<string, Load & { baselineRps: number; ratio: number }> = {};
  for (const [name, [real, baseline]] of Object.entries(pairs)) {
    log(`loading ${name}…`);
    autocannon(base + real, cookie, 1); // warm-up
    const r = autocannon(base + real, cookie, seconds);
    const b = autocannon(base + baseline, cookie, seconds);
    endpoints[name] = { ...r, baselineRps: b.rps, ratio: Math.round((r.rps / b.rps) * 100) / 100 };
  }

  // Booking check at two calendar sizes: the same check, with ten or a thousand times the history.
  log('booking check…');
  const small = quick ? 100 : 1000;
  const large = quick ? 10_000 : 100_000;
  const bfile = join(dir, 'booking.sqlite');
  await buildStudio(bfile, { ...QUICK, weeks: Math.ceil(small / QUICK.classesPerWeek / 1.5), inspections: 100, faults: 10 }, now);
  growSessions(bfile, small, now);
  const bbase = await startServer(bfile, basePort + 1);
  const bcookie = await signIn(bbase, 'reception@bench.test');
  const slot = new Date(now.getTime() + 3 * 86_400_000);
  slot.setUTCHours(20, 30, 0, 0);
  const check = `${bbase}/api/sessions/availability?roomId=1&classTypeId=1&instructorId=4&startsAt=${slot.toISOString()}&endsAt=${new Date(slot.getTime() + 3600_000).toISOString()}`;
  const ask = async () => {
    const r = await fetch(check, { headers: { cookie: bcookie } });
    if (!r.ok) throw new Error(`booking check answered ${r.status}`);
    await r.arrayBuffer();
  };
  await median(20, ask);
  const ms1k = await median(100, ask);
  growSessions(bfile, large, now);
  await median(20, ask);
  const ms100k = await median(100, ask);

  log('bundle and Today LCP…');
  const figures = await browserFigures(base);
  const initial = figures.signInKb !== null && figures.todayKb !== null ? Math.max(figures.signInKb, figures.todayKb) : entryJsGzipKb();
  const bundle = { initialJsGzipKb: initial, signInJsGzipKb: figures.signInKb, todayJsGzipKb: figures.todayKb };
  const todayLcpMs = figures.lcp;

  const rows = [
    ['endpoint', 'rps', 'p50 ms', 'p99 ms', 'baseline rps', 'ratio'],
    ...Object.entries(endpoints).map(([n, e]) => [n, e.rps, e.p50Ms, e.p99Ms, e.baselineRps, e.ratio]),
  ];
  console.log(`\nLoftwise bench (${quick ? 'quick' : 'full'}; ${JSON.stringify(counts)}; 50 connections, ${seconds}s each)`);
  for (const r of rows) console.log(r.map((c, i) => String(c).padEnd(i === 0 ? 14 : 13)).join(''));
  console.log(`booking check: ${ms1k} ms with ${small.toLocaleString('en')} sessions, ${ms100k} ms with ${large.toLocaleString('en')} (ratio ${Math.round((ms100k / ms1k) * 100) / 100})`);
  console.log(`initial JS: sign-in page ${bundle.signInJsGzipKb ?? '?'} KB, Today page ${bundle.todayJsGzipKb ?? '?'} KB gzip (larger: ${bundle.initialJsGzipKb} KB); Today LCP: ${todayLcpMs ?? 'n/a (no Chromium)'} ms`);
  console.log(JSON.stringify({ endpoints, bookingCheck: { ms1k, ms100k, ratio: Math.round((ms100k / ms1k) * 100) / 100 }, bundle, todayLcpMs }));
}

main()
  .catch((err) => {
    console.error(err);
    process.exitCode = 1;
  })
  .finally(() => {
    for (const c of children) c.kill('SIGTERM');
    setTimeout(() => rmSync(dir, { recursive: true, force: true }), 500).unref();
  });
