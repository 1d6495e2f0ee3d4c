import type { Server } from 'node:http';
import { resolve } from 'node:path';
import { loadConfig } from './config';
import { createDb, migrate } from './db/knex';
import { createApp } from './app';
import { systemClock } from './clock';
import { startFakeSmtp } from './mail/fake-smtp';
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

async function main() {
  // Everything the server writes (database, WAL, backups, uploads, the secret) is for its own user only.
  process.umask(0o077);
  const config = loadConfig();
  const db = createDb(config.dbFile);
  await migrate(db);
  // Entries chained before the key existed are re-chained under it once (see chain-upgrade.ts).
  await keyAuditChain(db, config.auditKey, config.auditChainMarker);
  if (config.seed === 'demo' && (await seedDemoIfEmpty(db, systemClock.now(), config.auditKey))) console.log('Loaded the demo studio into the empty database.');

  const fakeSmtp = config.smtpUrl ? null : await startFakeSmtp();
  const mailer = smtpMailer(config.smtpUrl ?? fakeSmtp!.url, config.mailFrom);
  const app = createApp({
    db,
    clock: systemClock,
    mailer,
    fakeSmtp,
    appUrl: config.appUrl,
    authSecret: config.authSecret,
    auditKey: config.auditKey,
    uploadDir: config.uploadDir,
    clientDir: resolve('dist'),
    trustProxyHops: config.trustProxyHops,
    moveNoticeDelayMs: config.moveNoticeDelayMs,
    benchBaselineDbFile: process.env.LOFTWISE_BENCH_BASELINE === '1' ? config.dbFile : null,
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
  console.log(`Loftwise is serving on ${config.appUrl} (port ${config.port}).`);
  if (fakeSmtp) console.log(`Built-in mail catcher on ${fakeSmtp.url}; read it on the Mailbox page.`);
  // The mail worker: reminders, at-risk alerts, the digest, and sending the outbox (PRODUCT.md §5).
  const mailWorker = startMailWorker({ db, mailer, clock: systemClock, appUrl: config.appUrl, intervalMs: config.outboxIntervalMs, leaseMs: config.outboxLeaseMs });

  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    console.log(`${signal}: finishing requests and closing.`);
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

main().catch((err) => {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
});
