import type { Db } from '../db/knex';
import type { Clock } from '../clock';
import type { Mailer } from './transport';
import { studioRepository, type StudioRepository } from '../modules/studio/studio.repository';
import { cycleContext } from './context';
import { scheduleReminders } from './reminders';
import { detectAtRisk } from './at-risk';
import { scheduleDigests } from './digest';
import { deliverDue } from './deliver';
import { sessionRecords } from '../modules/sessions/session-records';
import { rigRepository } from '../modules/rig/rig.repository';
import { workerLeaseRepository } from '../modules/outbox/worker-lease.repository';

export interface MailCycleSummary {
  /** Booked points of classes that started since the last cycle, recorded as they stood (PRODUCT.md §10). */
  sessionPointsRecorded: number;
  remindersQueued: number;
  /** Reminder moments replaced by a single catch-up reminder. */
  remindersSkipped: number;
  atRiskAlerts: number;
  atRiskCleared: number;
  digestsQueued: number;
  /** Riggers whose digest had nothing to say today. */
  digestsSkipped: number;
  sent: number;
  /** Failed attempts that will be tried again after a back-off. */
  retrying: number;
  /** Messages given up after the last attempt. */
  failed: number;
  /** Reminders and alerts dropped before sending because their session moved, was cancelled or began. */
  dropped: number;
  /** A step that threw; the other steps still ran. */
  errors: string[];
}

export interface MailWorkerDeps {
  db: Db;
  mailer: Mailer;
  clock: Clock;
  /** Read every cycle, so a policy the owner edits applies at once. */
  studio?: Pick<StudioRepository, 'get'>;
  appUrl: string;
  /** How long a message being sent stays claimed (OUTBOX_LEASE_SECONDS; default LEASE_MS, 5 min). */
  leaseMs?: number;
  log?: (err: unknown) => void;
}

/** One cycle: schedule due reminders, detect sessions turning at risk, the digest when due, then send. */
export async function runMailCycle(deps: MailWorkerDeps, stopping: () => boolean = () => false): Promise<MailCycleSummary> {
  const log = deps.log ?? ((err) => console.error('Mail worker:', err));
  const studio = await (deps.studio ?? studioRepository(deps.db)).get();
  const ctx = cycleContext(deps.db, deps.clock.now(), studio, deps.appUrl);
  const summary: MailCycleSummary = {
    sessionPointsRecorded: 0,
    remindersQueued: 0,
    remindersSkipped: 0,
    atRiskAlerts: 0,
    atRiskCleared: 0,
    digestsQueued: 0,
    digestsSkipped: 0,
    sent: 0,
    retrying: 0,
    failed: 0,
    dropped: 0,
    errors: [],
  };
  // Each step on its own: a bad row in one must not stop the others, least of all the sending.
  const step = async (name: string, run: () => Promise<void>) => {
    try {
      await run();
    } catch (err) {
      log(err);
      summary.errors.push(`${name}: ${err instanceof Error ? err.message : String(err)}`);
    }
  };
  // First, before anything else this cycle reads or writes: the record of each class that has
  // started since the last cycle, so it holds the rig as it stood at the start within one cycle.
  await step('session records', async () => {
    summary.sessionPointsRecorded = await sessionRecords({ db: deps.db, rig: rigRepository(deps.db), studio: studioRepository(deps.db) }).keepStarted(deps.clock.now());
  });
  await step('reminders', async () => {
    const r = await scheduleReminders(ctx);
    summary.remindersQueued = r.queued;
    summary.remindersSkipped = r.skipped;
  });
  await step('at-risk', async () => {
    const r = await detectAtRisk(ctx);
    summary.atRiskAlerts = r.alerts;
    summary.atRiskCleared = r.cleared;
  });
  await step('digest', async () => {
    const r = await scheduleDigests(ctx);
    summary.digestsQueued = r.queued;
    summary.digestsSkipped = r.skipped;
  });
  await step('send', async () => {
    Object.assign(summary, await deliverDue(ctx, deps.mailer, deps.clock, { stopping, leaseMs: deps.leaseMs }));
  });
  return summary;
}

export interface MailWorker {
  /** Runs one full cycle after any cycle in progress, and resolves with what it did. */
  runOnce(): Promise<MailCycleSummary>;
  /**
   * No further cycles; the one in progress stops sending after its current message. Resolves when
   * it has, or after `graceMs` at most (a slow SMTP server must not hold up a shutdown; a message
   * cut off mid-send stays `sending` and goes again once its lease runs out).
   */
  stop(graceMs?: number): Promise<void>;
}

/**
 * The mail worker inside the server process (PRODUCT.md §5): a cycle at start and every
 * `intervalMs` (OUTBOX_INTERVAL_SECONDS; default 15 s). Cycles never overlap: a tick that finds one
 * running is skipped. Everything it decides is in the database, so a restart picks up where it stopped.
 */
export function startMailWorker(deps: MailWorkerDeps & { intervalMs?: number; lease?: { holder: string } }): MailWorker {
  const intervalMs = deps.intervalMs ?? 15_000;
  let running: Promise<MailCycleSummary> | null = null;
  let chain: Promise<unknown> = Promise.resolve();
  let stopped = false;
  // With `lease`, a timed cycle runs only while this process holds the mail lease (several
  // processes on one database: one sends). Wall-clock time, renewed each cycle; a holder that
  // stops renewing is replaced after three intervals.
  const leases = deps.lease ? workerLeaseRepository(deps.db) : null;
  const leaseMs = Math.max(3 * intervalMs, 3_000);
  const cycle = (): Promise<MailCycleSummary> => {
    const next = chain.then(() => runMailCycle(deps, () => stopped));
    running = next;
    chain = next.catch(() => undefined).finally(() => {
      if (running === next) running = null;
    });
    return next;
  };

  let ticking = false;
  const tick = () => {
    if (stopped || running || ticking) return;
    if (!leases) {
      cycle().catch((err) => (deps.log ?? console.error)(err));
      return;
    }
    ticking = true;
    leases
      .hold('mail', deps.lease!.holder, new Date(), leaseMs)
      .then((held) => (held && !stopped && !running ? cycle() : undefined))
      .catch((err) => (deps.log ?? console.error)(err))
      .finally(() => (ticking = false));
  };
  tick();
  const timer = setInterval(tick, intervalMs);
  timer.unref();

  return {
    runOnce: () => cycle(),
    async stop(graceMs = 10_000) {
      stopped = true;
      clearInterval(timer);
      let grace: NodeJS.Timeout | undefined;
      await Promise.race([chain, new Promise((resolve) => (grace = setTimeout(resolve, graceMs)))]);
      clearTimeout(grace);
      await leases?.release('mail', deps.lease!.holder).catch(() => undefined);
    },
  };
}
