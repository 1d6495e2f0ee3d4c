import cluster, { type Worker } from 'node:cluster';
import { randomUUID } from 'node:crypto';
import type { Server } from 'node:http';
import { resolve } from 'node:path';
import { loadConfig, type Config } from './config';
import { createDb, migrate } from './db/knex';
import { createApp } from './app';
import { systemClock } from './clock';
import { startFakeSmtp, type CaughtMessage, type FakeSmtp, type Mailbox } from './mail/fake-smtp';
import { smtpMailer } from './mail/transport';
import { startMailWorker } from './mail/worker';
import { seedDemoIfEmpty } from '../seeds';
import { keyAuditChain } from './modules/audit/chain-upgrade';
import { sessionRecords } from './modules/sessions/session-records';
import { rigRepository } from './modules/rig/rig.repository';
import { studioRepository } from './modules/studio/studio.repository';

/** Resolves once the server listens; rejects (EADDRINUSE, EACCES…) when it cannot. */
function listen(app: ReturnType<typeof createApp>, port: number): Promise<Server> {
  return new Promise((resolvePromise, reject) => {
    const server = app.listen(port);
    server.once('error', reject);
    server.once('listening', () => {
      server.off('error', reject);
      // An idle keep-alive connection is closed after 65 s, not Node's 5 s: a client sending on a
      // connection at the moment the server closes it gets "socket hang up" (seen in a browser test
      // reusing a connection idle for about 5 s). Longer than the usual proxy's 60 s, and the
      // headers timeout above it, as Node requires.
      server.keepAliveTimeout = 65_000;
      server.headersTimeout = 66_000;
      resolvePromise(server);
    });
  });
}

function cannotListen(err: unknown, port: number): string {
  const code = (err as { code?: string })?.code;
  if (code === 'EADDRINUSE') return `Loftwise cannot start: port ${port} is already in use (is another Loftwise running?). Stop it or set PORT to a free port.`;
  if (code === 'EACCES') return `Loftwise cannot start: this user may not listen on port ${port}. Set PORT to a port above 1023.`;
  return `Loftwise cannot start: listening on port ${port} failed (${err instanceof Error ? err.message : String(err)}).`;
}

/** Migrates and, into an empty database, seeds the demo studio: once, before any process serves. */
async function prepareDatabase(config: Config): Promise<void> {
  const db = createDb(config.dbTarget);
  try {
    await migrate(db);
    // Entries chained before the key existed are re-chained under it once (see chain-upgrade.ts).
    await keyAuditChain(db, config.auditKey, config.auditChainMarker);
    if (config.seed === 'demo' && (await seedDemoIfEmpty(db, systemClock.now(), config.auditKey))) console.log('Loaded the demo studio into the empty database.');
  } finally {
    await db.destroy();
  }
}

const databaseName = (config: Config) => (config.databaseUrl ? `PostgreSQL at ${new URL(config.databaseUrl).host}${new URL(config.databaseUrl).pathname}` : `SQLite file ${config.dbFile}`);

/**
 * WEB_CONCURRENCY=N: this process (the primary) prepares the database, runs the built-in mail
 * catcher when no SMTP_URL is set, and forks N server processes sharing the port; one that dies
 * is replaced. The mail worker runs in whichever holds the database lease (server/mail/worker.ts).
 */
async function runPrimary(config: Config): Promise<void> {
  await prepareDatabase(config);
  const fakeSmtp = config.smtpUrl ? null : await startFakeSmtp();
  if (fakeSmtp) console.log(`Built-in mail catcher on ${fakeSmtp.url}; read it on the Mailbox page.`);
  console.log(`Starting ${config.processes} server processes on the ${databaseName(config)}.`);
  let stopping = false;
  const fork = (): Worker => {
    const worker = cluster.fork({ LOFTWISE_CLUSTER_WORKER: '1', ...(fakeSmtp ? { LOFTWISE_CATCHER_URL: fakeSmtp.url } : {}) });
    // The Mailbox page in a worker asks the primary's catcher.
    worker.on('message', (m: { type?: string; id?: number }) => {
      if (m?.type === 'mailbox') worker.send({ type: 'mailbox', id: m.id, messages: fakeSmtp?.messages() ?? [] });
    });
    return worker;
  };
  let listening = 0;
  cluster.on('listening', () => {
    if (++listening === config.processes) console.log(`Loftwise is serving on ${config.appUrl} (port ${config.port}, ${config.processes} processes).`);
  });
  const started = Date.now();
  cluster.on('exit', (worker, code) => {
    if (stopping) return;
    // A process that could not even start (port taken) would fail again: stop everything.
    if (code === 1 && Date.now() - started < 30_000) {
      console.error('A server process could not start; stopping.');
      void stop('exit', 1);
      return;
    }
    console.error(`A server process ended (${code ?? 'signal'}); starting another.`);
    fork();
  });
  for (let i = 0; i < config.processes; i++) fork();
  const stop = async (signal: string, exitCode = 0) => {
    if (stopping) return;
    stopping = true;
    console.log(`${signal}: stopping the server processes.`);
    const workers = Object.values(cluster.workers ?? {}).filter((w): w is Worker => Boolean(w));
    await Promise.all(
      workers.map(
        (w) =>
          new Promise<void>((r) => {
            if (w.isDead()) return r();
            w.once('exit', () => r());
            w.process.kill('SIGTERM');
          }),
      ),
    );
    await fakeSmtp?.close();
    process.exit(exitCode);
  };
  process.on('SIGINT', () => void stop('SIGINT'));
  process.on('SIGTERM', () => void stop('SIGTERM'));
}

/** A worker's view of the primary's catcher, over the cluster's IPC channel. */
function primaryMailbox(): Mailbox {
  let next = 0;
  const waiting = new Map<number, (m: CaughtMessage[]) => void>();
  process.on('message', (m: { type?: string; id?: number; messages?: CaughtMessage[] }) => {
    if (m?.type === 'mailbox' && typeof m.id === 'number') {
      waiting.get(m.id)?.(m.messages ?? []);
      waiting.delete(m.id);
    }
  });
  return {
    messages: () =>
      new Promise<CaughtMessage[]>((r) => {
        const id = next++;
        waiting.set(id, r);
        process.send!({ type: 'mailbox', id });
      }),
  };
}

/** One server process: the only one (it prepares the database itself), or a cluster worker. */
async function runServer(config: Config): Promise<void> {
  const inCluster = cluster.isWorker && process.env.LOFTWISE_CLUSTER_WORKER === '1';
  if (!inCluster) await prepareDatabase(config);
  const db = createDb(config.dbTarget);

  const catcherUrl = inCluster ? (process.env.LOFTWISE_CATCHER_URL ?? null) : null;
  const fakeSmtp: FakeSmtp | null = config.smtpUrl || catcherUrl ? null : await startFakeSmtp();
  const mailbox: Mailbox | null = catcherUrl ? primaryMailbox() : fakeSmtp;
  const mailer = smtpMailer(config.smtpUrl ?? catcherUrl ?? fakeSmtp!.url, config.mailFrom);
  const app = createApp({
    db,
    clock: systemClock,
    mailer,
    fakeSmtp: mailbox,
    appUrl: config.appUrl,
    authSecret: config.authSecret,
    auditKey: config.auditKey,
    uploadDir: config.uploadDir,
    clientDir: resolve('dist'),
    trustProxyHops: config.trustProxyHops,
    moveNoticeDelayMs: config.moveNoticeDelayMs,
    cacheDerived: config.cacheDerived,
    keepReads: config.keepReads,
    benchBaselineDbFile: process.env.LOFTWISE_BENCH_BASELINE === '1' && !config.databaseUrl ? config.dbFile : null,
  });
  // Classes that started while the server was down are recorded before any request can change the rig.
  await sessionRecords({ db, rig: rigRepository(db), studio: studioRepository(db) }).keepStarted(systemClock.now(), 'all');
  // Listen before anything runs in the background: a server that cannot take its port says so
  // and exits, rather than sending mail beside the one that holds it.
  const server = await listen(app, config.port).catch(async (err) => {
    await fakeSmtp?.close();
    mailer.close();
    await db.destroy();
    throw new Error(cannotListen(err, config.port));
  });
  if (!inCluster) {
    console.log(`Loftwise is serving on ${config.appUrl} (port ${config.port}, ${databaseName(config)}).`);
    if (fakeSmtp) console.log(`Built-in mail catcher on ${fakeSmtp.url}; read it on the Mailbox page.`);
  }
  // The mail worker: reminders, at-risk alerts, the digest, and sending the outbox (PRODUCT.md §5).
  // It runs while this process holds the database's mail lease, so with several processes (on
  // this machine or others) one of them schedules and sends.
  const mailWorker = startMailWorker({
    db,
    mailer,
    clock: systemClock,
    appUrl: config.appUrl,
    intervalMs: config.outboxIntervalMs,
    leaseMs: config.outboxLeaseMs,
    lease: { holder: `${process.pid}.${randomUUID()}` },
  });

  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    if (!inCluster) console.log(`${signal}: finishing requests and closing.`);
    server.close();
    server.closeIdleConnections();
    setTimeout(() => server.closeAllConnections(), 5000).unref();
    await mailWorker.stop();
    mailer.close();
    await fakeSmtp?.close();
    await db.destroy();
    process.exit(0);
  };
  process.on('SIGINT', () => void stop('SIGINT'));
  process.on('SIGTERM', () => void stop('SIGTERM'));
}

async function main() {
  // Everything the server writes (database, WAL, backups, uploads, the secret) is for its own user only.
  process.umask(0o077);
  const config = loadConfig();
  if (cluster.isPrimary && config.processes > 1) return runPrimary(config);
  return runServer(config);
}

main().catch((err) => {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
});
