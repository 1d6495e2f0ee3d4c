// `npm run bench [-- --quick]`: builds a large studio in a temporary database, serves it with the
// real server on loopback (once with the derived-answer cache, once without: "cold"), loads it
// from a second process (autocannon) and prints figures. The last line is one JSON object; each
// figure carries its target (DEVELOPERS.md, "Benchmarks") and whether it met it.
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import Database from 'better-sqlite3';
import { BENCH_PASSWORD, buildStudio, FULL, growSessions, QUICK } from './build-studio';
import { createDb } from '../../server/db/knex';
import { runMailCycle } from '../../server/mail/worker';
import { sessionRecords } from '../../server/modules/sessions/session-records';
import { rigRepository } from '../../server/modules/rig/rig.repository';
import { studioRepository } from '../../server/modules/studio/studio.repository';
import { systemClock } from '../../server/clock';
import { startFakeSmtp } from '../../server/mail/fake-smtp';

const quick = process.argv.includes('--quick');
// `--only=cold,storm` runs only those parts (mail, endpoints, cold, storm, export, processes, booking, browser).
const onlyArg = process.argv.find((a) => a.startsWith('--only='));
const only = onlyArg ? new Set(onlyArg.slice('--only='.length).split(',')) : null;
const want = (part: string) => only === null || only.has(part);
const size = quick ? QUICK : FULL;
const seconds = quick ? 2 : 8;
const basePort = quick ? 5400 : 5300;
const CHROMIUM = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';
const dir = mkdtempSync(join(tmpdir(), 'loftwise-bench-'));
const children: ChildProcess[] = [];
const log = (s: string) => process.stderr.write(s + '\n');

/** fetch, asked again when a kept-alive socket the server had closed meanwhile fails (a race of keep-alive timeouts). */
async function fetchAgain(url: string, init?: RequestInit): Promise<Response> {
  // Several pooled sockets may have been closed at once (a pause longer than the keep-alive timeout).
  for (let attempt = 1; ; attempt++) {
    try {
      return await fetch(url, init);
    } catch (err) {
      if (attempt >= 4) throw err;
    }
  }
}

/** Mail goes to a catcher in this process, so the server under load does not also parse what it sends. */
let smtpUrl = '';

async function startServer(file: string, port: number, env: Record<string, string> = {}) {
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    env: {
      ...process.env,
      NODE_ENV: 'production',
      PORT: String(port),
      APP_URL: `http://127.0.0.1:${port}`,
      LOFTWISE_DB: file,
      UPLOAD_DIR: join(dir, 'uploads'),
      LOFTWISE_SEED: 'none',
      LOFTWISE_BENCH_BASELINE: '1',
      AUTH_SECRET: 'bench-secret-bench-secret-bench-secret-1',
      SMTP_URL: smtpUrl,
      // The worker's cycle is measured on its own (below); while loading, its first cycle finds nothing to do.
      OUTBOX_INTERVAL_SECONDS: '3600',
      ...env,
    },
    stdio: ['ignore', 'ignore', 'inherit'],
  });
  children.push(child);
  const base = `http://127.0.0.1:${port}`;
  for (let i = 0; i < 600; i++) {
    try {
      if ((await fetch(`${base}/api/health`)).ok) return { base, pid: child.pid!, child };
    } catch {
      /* starting */
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error('bench server did not start');
}

/** Resident memory of a process (Linux), in MB; null elsewhere. */
function rssMb(pid: number): number | null {
  try {
    const m = /VmRSS:\s+(\d+) kB/.exec(readFileSync(`/proc/${pid}/status`, 'utf8'));
    return m ? Math.round(Number(m[1]) / 1024) : null;
  } catch {
    return null;
  }
}

/** A figure beside its target and whether it met it. */
interface Figure {
  value: number | null;
  target: string;
  pass: boolean | null;
}
const atMost = (value: number | null, max: number, unit: string): Figure => ({ value, target: `≤ ${max.toLocaleString('en')} ${unit}`, pass: value === null ? null : value <= max });
const atLeast = (value: number | null, min: number, unit: string): Figure => ({ value, target: `≥ ${min.toLocaleString('en')}${unit}`, pass: value === null ? null : value >= min });
const round = (n: number, digits = 1) => Math.round(n * 10 ** digits) / 10 ** digits;
const pct = (list: number[], p: number) => {
  const s = [...list].sort((a, b) => a - b);
  return s.length ? round(s[Math.min(s.length - 1, Math.floor(p * s.length))]) : null;
};

async function signIn(base: string, email: string): Promise<string> {
  const csrf = await fetchAgain(`${base}/auth/csrf`);
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const cookie = csrf.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ');
  const res = await fetchAgain(`${base}/auth/callback/credentials`, { method: 'POST', redirect: 'manual', headers: { 'Content-Type': 'application/x-www-form-urlencoded', cookie }, body: new URLSearchParams({ email, password: BENCH_PASSWORD, csrfToken }) });
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

/**
 * Waits until nothing is written to the studio for `quietMs`: the data version (the one row of
 * `data_versions`, moved by every committed change) read from the file itself. A server's mail
 * worker runs its first cycle as it starts, and with `--only` (no mail part before) that cycle
 * keeps records and at-risk alerts for the whole studio for several seconds; every commit moves the
 * version, so figures taken meanwhile measured the rig read afresh on each request, not the server
 * at rest. Answers how long it waited.
 */
async function untilQuiet(file: string, quietMs = 3_000, maxMs = 180_000): Promise<number> {
  const db = new Database(file, { readonly: true, fileMustExist: true });
  const read = db.prepare('SELECT version FROM data_versions WHERE id = 1').pluck();
  const started = Date.now();
  try {
    let last = read.get();
    let since = Date.now();
    while (Date.now() - since < quietMs && Date.now() - started < maxMs) {
      await new Promise((r) => setTimeout(r, 200));
      const now = read.get();
      if (now !== last) [last, since] = [now, Date.now()];
    }
    return Date.now() - started;
  } finally {
    db.close();
  }
}

async function median(n: number, f: (i: number) => Promise<void>) {
  const times: number[] = [];
  for (let i = 0; i < n; i++) {
    const t = performance.now();
    await f(i);
    times.push(performance.now() - t);
  }
  times.sort((a, b) => a - b);
  return Math.round(times[Math.floor(n / 2)] * 100) / 100;
}

/** GET with the cookie; throws on anything but 200. Returns the body's size. */
async function get(base: string, cookie: string, path: string): Promise<number> {
  const r = await fetchAgain(base + path, { headers: { cookie } });
  const body = await r.arrayBuffer();
  if (!r.ok) throw new Error(`${path} answered ${r.status}`);
  return body.byteLength;
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
    await page.getByLabel('E-mail', { exact: true }).fill('teacher0@bench.test');
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
  if ((want('browser') || want('endpoints')) && !existsSync(join('dist', 'index.html'))) {
    log('building the client…');
    spawnSync('npx', ['vite', 'build'], { stdio: 'ignore' });
  }
  log(`building the ${quick ? 'quick' : 'full'} studio…`);
  const file = join(dir, 'bench.sqlite');
  const { counts } = await buildStudio(file, size, now);
  log(`  ${JSON.stringify(counts)}`);
  const catcher = await startFakeSmtp(0, { keep: 50 });
  smtpUrl = catcher.url;

  // The mail worker's cycle on the full studio, in this process: the first (every class at risk is
  // found and alerted, the day's digest written and everything sent) and a steady one after it.
  let firstCycleMs: number | null = null;
  let steadyCycleMs: number | null = null;
  if (want('mail')) {
    log('mail worker cycle…');
    const mailDb = createDb(file);
    await sessionRecords({ db: mailDb, rig: rigRepository(mailDb), studio: studioRepository(mailDb) }).keepStarted(now, 'all');
    const mailer = { send: async () => undefined, close: () => undefined };
    const cycleMs = async () => {
      const t = performance.now();
      await runMailCycle({ db: mailDb, mailer, clock: systemClock, appUrl: 'http://127.0.0.1', log: () => undefined });
      return Math.round(performance.now() - t);
    };
    firstCycleMs = await cycleMs();
    steadyCycleMs = Math.min(await cycleMs(), await cycleMs());
    await mailDb.destroy();
    log(`  first ${firstCycleMs} ms, steady ${steadyCycleMs} ms`);
  }

  const cachedServer = await startServer(file, basePort);
  const coldServer = await startServer(file, basePort + 2, { LOFTWISE_DERIVED_CACHE: 'off' });
  const rssBefore = { cached: rssMb(cachedServer.pid), cold: rssMb(coldServer.pid) };
  log(`waiting for the servers' first mail cycles to finish… ${await untilQuiet(file)} ms`);
  const base = cachedServer.base;
  const cookie = await signIn(base, 'reception@bench.test');
  const coldCookie = await signIn(coldServer.base, 'reception@bench.test');

  const monday = new Date(now);
  monday.setUTCDate(monday.getUTCDate() - ((monday.getUTCDay() + 6) % 7));
  monday.setUTCHours(0, 0, 0, 0);
  const rangeOf = (days: number, shiftMinutes = 0) => {
    const from = new Date(monday.getTime() + shiftMinutes * 60_000);
    return `from=${from.toISOString()}&to=${new Date(from.getTime() + days * 86_400_000).toISOString()}`;
  };
  const week = rangeOf(7);
  const dayStart = new Date(now);
  dayStart.setUTCHours(0, 0, 0, 0);
  const day = `from=${dayStart.toISOString()}&to=${new Date(dayStart.getTime() + 86_400_000).toISOString()}`;
  const pairs: Record<string, [string, string]> = {
    sessionsWeek: [`/api/sessions?${week}`, `/api/bench/baseline/sessions?${week}`],
    today: ['/api/today', `/api/bench/baseline/today?${day}`],
    points: ['/api/points', '/api/bench/baseline/points'],
  };
  const endpoints: Record<string, { cached: Load; cold: Load; baselineRps: number; cachedRatio: Figure; coldRatio: Figure; cachedP99Ms: Figure; coldP99Ms: Figure }> = {};
  for (const [name, [real, baseline]] of Object.entries(want('endpoints') ? pairs : {})) {
    log(`loading ${name}…`);
    autocannon(base + real, cookie, 1); // warm-up
    const cached = autocannon(base + real, cookie, seconds);
    const cold = autocannon(coldServer.base + real, coldCookie, seconds);
    const b = autocannon(base + baseline, cookie, seconds);
    endpoints[name] = {
      cached,
      cold,
      baselineRps: b.rps,
      cachedRatio: atLeast(round(cached.rps / b.rps, 2), 0.5, '× baseline'),
      coldRatio: { value: round(cold.rps / b.rps, 2), target: 'shown', pass: null },
      cachedP99Ms: atMost(cached.p99Ms, 50, 'ms'),
      coldP99Ms: { value: cold.p99Ms, target: 'shown (50 connections queue behind one another)', pass: null },
    };
    log(`  ${JSON.stringify({ cached, cold, baselineRps: b.rps })}`);
  }

  // One request at a time on the cold server, each range different (nothing to reuse).
  const widest = 43;
  const n = quick ? 10 : 30;
  const coldGet = (path: string) => get(coldServer.base, coldCookie, path).then(() => undefined);
  const loopDelay = async () => (await (await fetchAgain(`${coldServer.base}/api/bench/loop-delay`, { headers: { cookie: coldCookie } })).json()) as { p50Ms: number; p99Ms: number; maxMs: number; samples: number };
  let cold = null;
  let coldReadsAfresh: Record<string, { value: number; target: string; pass: null }> | null = null;
  if (want('cold')) {
    log('cold answers one at a time…');
    await median(5, (i) => coldGet(`/api/sessions?${rangeOf(7, 7 * 24 * 60 + i)}`));
    cold = {
      weekMs: atMost(await median(n, (i) => coldGet(`/api/sessions?${rangeOf(7, i + 1)}`)), 8, 'ms'),
      widestRangeMs: atMost(await median(n, (i) => coldGet(`/api/sessions?${rangeOf(widest, 100 + i)}`)), 40, 'ms'),
      todayMs: atMost(await median(n, () => coldGet('/api/today')), 8, 'ms'),
      pointsMs: atMost(await median(n, () => coldGet('/api/points')), 8, 'ms'),
      widestRangeDays: widest,
    };
    log(`  ${JSON.stringify(cold)}`);
    // The same with nothing kept at all: the policy and the rig's snapshots read afresh for every
    // request too (LOFTWISE_KEPT_READS=off; server/db/kept-reads.ts). Shown beside, no target: the
    // cold figures above are what a range never asked before costs on the server as shipped.
    const afresh = await startServer(file, basePort + 5, { LOFTWISE_DERIVED_CACHE: 'off', LOFTWISE_KEPT_READS: 'off' });
    const afreshCookie = await signIn(afresh.base, 'reception@bench.test');
    const afreshGet = (path: string) => get(afresh.base, afreshCookie, path).then(() => undefined);
    await median(5, (i) => afreshGet(`/api/sessions?${rangeOf(7, 7 * 24 * 60 + i)}`));
    const shown = (value: number) => ({ value, target: 'shown', pass: null });
    coldReadsAfresh = {
      weekMs: shown(await median(n, (i) => afreshGet(`/api/sessions?${rangeOf(7, 200 + i)}`))),
      widestRangeMs: shown(await median(n, (i) => afreshGet(`/api/sessions?${rangeOf(widest, 300 + i)}`))),
      todayMs: shown(await median(n, () => afreshGet('/api/today'))),
      pointsMs: shown(await median(n, () => afreshGet('/api/points'))),
    };
    afresh.child.kill('SIGTERM');
    log(`  reads afresh: ${JSON.stringify(coldReadsAfresh)}`);
  }

  // The storm: 20 different widest ranges at once on the cold server, while the health check and one
  // point's status are asked one after another; their p99 is the figure.
  const storm = { health: [] as number[], status: [] as number[], heavyMs: [] as number[], loopP99Ms: [] as number[], loopMaxMs: [] as number[] };
  for (let round = 0; round < (want('storm') ? (quick ? 2 : 5) : 0); round++) {
    if (round === 0) log('storm…');
    await loopDelay();
    let done = false;
    const heavy = Promise.all(
      Array.from({ length: 20 }, async (_, i) => {
        const t = performance.now();
        await coldGet(`/api/sessions?${rangeOf(widest, 1000 + round * 100 + i)}`);
        storm.heavyMs.push(performance.now() - t);
      }),
    ).finally(() => (done = true));
    const light = async (list: number[], path: string) => {
      while (!done) {
        const t = performance.now();
        await coldGet(path);
        list.push(performance.now() - t);
        await new Promise((r) => setTimeout(r, 5));
      }
    };
    await Promise.all([heavy, light(storm.health, '/api/health'), light(storm.status, '/api/points/1/status')]);
    const loop = await loopDelay();
    storm.loopP99Ms.push(loop.p99Ms);
    storm.loopMaxMs.push(loop.maxMs);
  }
  const stormFigures = {
    requests: 20,
    rangeDays: widest,
    healthP99Ms: atMost(pct(storm.health, 0.99), 100, 'ms'),
    pointStatusP99Ms: atMost(pct(storm.status, 0.99), 100, 'ms'),
    lightSamples: storm.health.length + storm.status.length,
    heavyP50Ms: pct(storm.heavyMs, 0.5),
    heavyMaxMs: pct(storm.heavyMs, 1),
    // The server's own event-loop delay during the storm (perf_hooks.monitorEventLoopDelay, per round): the worst round's p99 and max.
    loopDelayP99Ms: atMost(storm.loopP99Ms.length ? Math.max(...storm.loopP99Ms) : null, 100, 'ms'),
    loopDelayMaxMs: storm.loopMaxMs.length ? Math.max(...storm.loopMaxMs) : null,
  };
  log(`  ${JSON.stringify(stormFigures)}`);

  if (only && !['export', 'processes', 'booking', 'browser'].some((part) => only.has(part))) {
    // A part of the bench (e.g. `--only=cold,storm`): its figures, and the same one-object last line.
    const mark = (f: Figure) => `${f.value ?? 'n/a'} (${f.target}${f.pass === null ? '' : f.pass ? ', met' : ', NOT met'})`;
    console.log(`\nLoftwise bench (${quick ? 'quick' : 'full'}, only ${[...only].join(', ')}; ${JSON.stringify(counts)})`);
    if (cold) console.log(`cold, one request at a time: week ${mark(cold.weekMs)}, ${widest}-day range ${mark(cold.widestRangeMs)}, Today ${mark(cold.todayMs)}, rig list ${mark(cold.pointsMs)}`);
    if (coldReadsAfresh) console.log(`cold with the policy and the rig read afresh too: week ${coldReadsAfresh.weekMs.value} ms, ${widest}-day range ${coldReadsAfresh.widestRangeMs.value} ms, Today ${coldReadsAfresh.todayMs.value} ms, rig list ${coldReadsAfresh.pointsMs.value} ms`);
    if (storm.health.length) console.log(`storm of 20 different ${widest}-day ranges (cold): health p99 ${mark(stormFigures.healthP99Ms)}, point status p99 ${mark(stormFigures.pointStatusP99Ms)}, server loop delay p99 ${mark(stormFigures.loopDelayP99Ms)} (max ${stormFigures.loopDelayMaxMs} ms); ranges p50 ${stormFigures.heavyP50Ms} ms, slowest ${stormFigures.heavyMaxMs} ms`);
    console.log(JSON.stringify({ mode: quick ? 'quick' : 'full', only: [...only], counts, endpoints, cold, coldReadsAfresh, storm: storm.health.length ? stormFigures : null, mailCycle: steadyCycleMs === null ? null : { firstMs: firstCycleMs, steadyMs: atMost(steadyCycleMs, 1_000, 'ms') } }));
    await catcher.close();
    return;
  }

  // The streamed export of every inspection (20,000 on the full studio), as a rigger: time and the
  // server's resident memory at its peak during the export.
  log('inspection export…');
  const rigger = await signIn(coldServer.base, 'rigger@bench.test');
  const exportRssBefore = rssMb(coldServer.pid);
  let exportPeak = exportRssBefore ?? 0;
  const sampler = setInterval(() => (exportPeak = Math.max(exportPeak, rssMb(coldServer.pid) ?? 0)), 20);
  const exportStart = performance.now();
  const exportUrl = `${coldServer.base}/api/inspections/export.csv`;
  const exportRes = await fetchAgain(exportUrl, { headers: { cookie: rigger } });
  const exportText = await exportRes.text();
  const exportMs = Math.round(performance.now() - exportStart);
  clearInterval(sampler);
  if (!exportRes.ok) throw new Error(`export answered ${exportRes.status}`);
  const exportRows = exportText.split('\n').filter((l) => /^\d/.test(l)).length;
  const exportFigures = {
    inspections: counts.inspections,
    rows: exportRows,
    ms: atMost(exportMs, quick ? 1_000 : 5_000, 'ms'),
    peakRssMb: atMost(exportPeak, 400, 'MB'),
    rssGrowthMb: exportRssBefore === null ? null : exportPeak - exportRssBefore,
  };
  log(`  ${JSON.stringify(exportFigures)}`);

  const rssAfter = { cached: rssMb(cachedServer.pid), cold: rssMb(coldServer.pid) };
  const memory = {
    beforeMb: rssBefore,
    afterMb: rssAfter,
    afterCachedMb: atMost(rssAfter.cached, 400, 'MB'),
    afterColdMb: atMost(rssAfter.cold, 400, 'MB'),
  };

  // Throughput with one process and with two (WEB_CONCURRENCY=2), on the cold week: CPU-bound work.
  log('one process and two…');
  coldServer.child.kill('SIGTERM');
  const pair = await startServer(file, basePort + 3, { LOFTWISE_DERIVED_CACHE: 'off', WEB_CONCURRENCY: '2' });
  const pairCookie = await signIn(pair.base, 'reception@bench.test');
  const single = await startServer(file, basePort + 4, { LOFTWISE_DERIVED_CACHE: 'off' });
  const singleCookie = await signIn(single.base, 'reception@bench.test');
  autocannon(`${single.base}/api/sessions?${week}`, singleCookie, 1);
  const one = autocannon(`${single.base}/api/sessions?${week}`, singleCookie, seconds);
  single.child.kill('SIGTERM');
  autocannon(`${pair.base}/api/sessions?${week}`, pairCookie, 1);
  const two = autocannon(`${pair.base}/api/sessions?${week}`, pairCookie, seconds);
  pair.child.kill('SIGTERM');
  const processes = { endpoint: 'sessionsWeek (cold)', oneRps: one.rps, twoRps: two.rps, ratio: atLeast(round(two.rps / one.rps, 2), 1.5, '× one process') };
  log(`  ${JSON.stringify({ rssBefore, rssAfter, processes })}`);

  // Booking check at two calendar sizes: the same check, with ten or a thousand times the history.
  log('booking check…');
  const small = quick ? 100 : 1000;
  const large = quick ? 10_000 : 100_000;
  const bfile = join(dir, 'booking.sqlite');
  await buildStudio(bfile, { ...QUICK, weeks: Math.ceil(small / QUICK.classesPerWeek / 1.5), inspections: 100, faults: 10 }, now);
  growSessions(bfile, small, now);
  const { base: bbase } = await startServer(bfile, basePort + 1);
  const bcookie = await signIn(bbase, 'reception@bench.test');
  const slot = new Date(now.getTime() + 3 * 86_400_000);
  slot.setUTCHours(20, 30, 0, 0);
  const check = `${bbase}/api/sessions/availability?roomId=1&classTypeId=1&instructorId=4&startsAt=${slot.toISOString()}&endsAt=${new Date(slot.getTime() + 3600_000).toISOString()}`;
  const ask = async () => {
    const r = await fetchAgain(check, { headers: { cookie: bcookie } });
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
  await catcher.close();

  const rows = [
    ['endpoint', 'cached rps', 'p50 ms', 'p99 ms', 'cold rps', 'p50 ms', 'p99 ms', 'baseline rps', 'cached ×', 'cold ×'],
    ...Object.entries(endpoints).map(([name, e]) => [name, e.cached.rps, e.cached.p50Ms, e.cached.p99Ms, e.cold.rps, e.cold.p50Ms, e.cold.p99Ms, e.baselineRps, e.cachedRatio.value, e.coldRatio.value]),
  ];
  const mark = (f: Figure) => `${f.value ?? 'n/a'} (${f.target}${f.pass === null ? '' : f.pass ? ', met' : ', NOT met'})`;
  console.log(`\nLoftwise bench (${quick ? 'quick' : 'full'}; ${JSON.stringify(counts)}; 50 connections, ${seconds}s each)`);
  for (const r of rows) console.log(r.map((c, i) => String(c).padEnd(i === 0 ? 14 : 12)).join(''));
  if (cold) console.log(`cold, one request at a time: week ${mark(cold.weekMs)}, ${widest}-day range ${mark(cold.widestRangeMs)}, Today ${mark(cold.todayMs)}, rig list ${mark(cold.pointsMs)}`);
  if (coldReadsAfresh) console.log(`cold with the policy and the rig read afresh too: week ${coldReadsAfresh.weekMs.value} ms, ${widest}-day range ${coldReadsAfresh.widestRangeMs.value} ms, Today ${coldReadsAfresh.todayMs.value} ms, rig list ${coldReadsAfresh.pointsMs.value} ms`);
  console.log(`storm of 20 different ${widest}-day ranges (cold): health p99 ${mark(stormFigures.healthP99Ms)}, point status p99 ${mark(stormFigures.pointStatusP99Ms)}; ranges p50 ${stormFigures.heavyP50Ms} ms, slowest ${stormFigures.heavyMaxMs} ms`);
  console.log(`resident memory: before ${rssBefore.cached} MB cached / ${rssBefore.cold} MB cold; after ${mark(memory.afterCachedMb)} cached / ${mark(memory.afterColdMb)} cold`);
  console.log(`mail worker cycle: first ${firstCycleMs} ms (every at-risk class found and alerted), then ${mark(atMost(steadyCycleMs, 1_000, 'ms'))}`);
  console.log(`server event-loop delay during the storm: p99 ${mark(stormFigures.loopDelayP99Ms)}, max ${stormFigures.loopDelayMaxMs} ms`);
  console.log(`inspection export (${exportRows.toLocaleString('en')} rows streamed): ${mark(exportFigures.ms)}, server peak ${mark(exportFigures.peakRssMb)} (+${exportFigures.rssGrowthMb} MB)`);
  console.log(`throughput, cold week: one process ${one.rps} rps, two processes ${two.rps} rps, ${mark(processes.ratio)}`);
  console.log(`booking check: ${ms1k} ms with ${small.toLocaleString('en')} sessions, ${ms100k} ms with ${large.toLocaleString('en')} (ratio ${Math.round((ms100k / ms1k) * 100) / 100})`);
  console.log(`initial JS: sign-in page ${bundle.signInJsGzipKb ?? '?'} KB, Today page ${bundle.todayJsGzipKb ?? '?'} KB gzip (larger: ${bundle.initialJsGzipKb} KB); Today LCP: ${todayLcpMs ?? 'n/a (no Chromium)'} ms`);
  console.log(
    JSON.stringify({
      mode: quick ? 'quick' : 'full',
      counts,
      endpoints,
      cold,
      coldReadsAfresh,
      storm: stormFigures,
      memory,
      mailCycle: { firstMs: firstCycleMs, steadyMs: atMost(steadyCycleMs, 1_000, 'ms') },
      export: exportFigures,
      processes,
      bookingCheck: { ms1k, ms100k, ratio: atMost(Math.round((ms100k / ms1k) * 100) / 100, 2, '×') },
      bundle: { ...bundle, initial: atMost(bundle.initialJsGzipKb, 150, 'KB') },
      todayLcpMs: atMost(todayLcpMs, 1_000, 'ms'),
    }),
  );
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
