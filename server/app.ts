import express, { type Express } from 'express';
import helmet from 'helmet';
import { existsSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { createRequire } from 'node:module';
import type { Db } from './db/knex';
import type { Clock } from './clock';
import type { Mailer } from './mail/transport';
import type { Mailbox } from './mail/fake-smtp';
import { ApiRouter, type RouteDeclaration } from './http/route';
import { authConfig, authenticate, authRoutes, requireSameOrigin, requireSignedIn } from './http/auth';
import { signInGuard } from './http/sign-in-guard';
import { signInCountersRepository } from './modules/staff/sign-in-counters.repository';
import { apiNotFound, errorHandler } from './http/error-handler';
import { staffRepository } from './modules/staff/staff.repository';
import { staffService } from './modules/staff/staff.service';
import { staffRoutes } from './modules/staff/staff.router';
import { studioRepository, type StudioRepository } from './modules/studio/studio.repository';
import { studioService } from './modules/studio/studio.service';
import { studioRoutes } from './modules/studio/studio.router';
import { policyPreviewService } from './modules/studio/policy-preview.service';
import { mailboxRoutes } from './modules/mail/mailbox.router';
import { auditRepository } from './modules/audit/audit.repository';
import { rigRepository } from './modules/rig/rig.repository';
import { rigService } from './modules/rig/rig.service';
import { rigRoutes } from './modules/rig/rig.router';
import { documentsService } from './modules/documents/documents.service';
import { documentsRepository } from './modules/documents/documents.repository';
import { documentsRoutes } from './modules/documents/documents.router';
import { classTypesRepository } from './modules/class-types/class-types.repository';
import { classTypesService } from './modules/class-types/class-types.service';
import { classTypesRoutes } from './modules/class-types/class-types.router';
import { auditRoutes } from './modules/audit/audit.router';
import { auditService } from './modules/audit/audit.service';
import { faultsRepository } from './modules/faults/faults.repository';
import { faultsService } from './modules/faults/faults.service';
import { faultsRoutes } from './modules/faults/faults.router';
import { inspectionsRepository } from './modules/inspections/inspections.repository';
import { inspectionsService } from './modules/inspections/inspections.service';
import { inspectionsRoutes } from './modules/inspections/inspections.router';
import { todayService } from './modules/today/today.service';
import { todayRoutes } from './modules/today/today.router';
import { outboxService } from './modules/outbox/outbox.service';
import { outboxRoutes } from './modules/outbox/outbox.router';
import { sessionsRepository } from './modules/sessions/sessions.repository';
import { sessionsService } from './modules/sessions/sessions.service';
import { sessionsRoutes } from './modules/sessions/sessions.router';
import { sessionRecords } from './modules/sessions/session-records';
import { studentsRepository } from './modules/students/students.repository';
import { studentsService } from './modules/students/students.service';
import { studentsRoutes } from './modules/students/students.router';
import { placesRepository } from './modules/places/places.repository';
import { placesService } from './modules/places/places.service';
import { placesRoutes } from './modules/places/places.router';
import { benchBaselineRoutes } from './modules/bench/baseline.router';
import { dataVersion } from './db/data-version';
import { keptPerVersion } from './db/kept-reads';
import { snapshotSource } from './modules/rig/point-snapshots';
import { derivedCache, noDerivedCache } from './db/derived-cache';
import { heavyWork } from './http/heavy-work';
import { DEFAULT_PERSON_LIMITS, personLimiters, type PersonLimits } from './http/person-limits';
import { signInLinkGuard, studentAccounts, studentEmailProvider } from './modules/my/student-sign-in';
import { feedsService } from './modules/feeds/feeds.service';
import { feedRoute, feedsRoutes } from './modules/feeds/feeds.router';
import { publicService } from './modules/public/public.service';
import { publicRoutes } from './modules/public/public.router';
import { myService } from './modules/my/my.service';
import { myRepository } from './modules/my/my.repository';
import { myRoutes } from './modules/my/my.router';

export interface AppDeps {
  db: Db;
  clock: Clock;
  mailer: Mailer;
  /** The built-in mail catcher, when SMTP_URL is unset. */
  /** The built-in mail catcher's messages (in this process, or the cluster primary's). */
  fakeSmtp?: Mailbox | null;
  appUrl: string;
  authSecret: string;
  /** The audit chain's HMAC key, kept outside the database (AUDIT_KEY or data/.audit-key). */
  auditKey: string;
  uploadDir: string;
  /** The built client, served with SPA fallback when present. */
  clientDir?: string | null;
  log?: (err: unknown) => void;
  /** Benchmark only: the database file for the baseline routes of `npm run bench`. */
  benchBaselineDbFile?: string | null;
  /** Proxy hops in front of the server (TRUST_PROXY); 0 when it serves browsers directly. */
  trustProxyHops?: number;
  /** Keep derived statuses per data version (default true); false works every answer out afresh. */
  cacheDerived?: boolean;
  /**
   * Read the policy and the rig's snapshots once per data version (default true; server/db/kept-reads.ts);
   * false reads them afresh for every request, as the bench's "reloaded" figures do.
   */
  keepReads?: boolean;
  /** How long a "Moved" e-mail waits for the desk's Undo (default UNDO_WINDOW_MS). */
  moveNoticeDelayMs?: number;
  /** Per-person limits on fault reports and uploads (server/http/person-limits.ts). */
  personLimits?: Partial<PersonLimits>;
}

export interface LoftwiseApp extends Express {
  locals: Express['locals'] & { routes: RouteDeclaration[] };
}

const LEXEND_FILES = dirname(createRequire(import.meta.url).resolve('@fontsource/lexend/files/lexend-latin-400-normal.woff2'));

export function createApp(deps: AppDeps): LoftwiseApp {
  const log = deps.log ?? ((err) => console.error(err));
  const app = express() as LoftwiseApp;
  app.disable('x-powered-by');
  // Trust X-Forwarded-For only from the number of proxy hops configured (none by default), so a
  // forged header cannot choose the address the sign-in limiter counts.
  app.set('trust proxy', deps.trustProxyHops ?? 0);
  app.use(
    helmet({
      contentSecurityPolicy: {
        useDefaults: true,
        directives: {
          'default-src': ["'self'"],
          'script-src': ["'self'"],
          'style-src': ["'self'", "'unsafe-inline'"],
          'img-src': ["'self'", 'data:', 'blob:'],
          'font-src': ["'self'"],
          'connect-src': ["'self'"],
          'frame-ancestors': ["'none'"],
          'form-action': ["'self'"],
          'object-src': ["'none'"],
          'upgrade-insecure-requests': null,
        },
      },
      referrerPolicy: { policy: 'same-origin' },
      crossOriginEmbedderPolicy: false,
    }),
  );

  const { db, clock } = deps;
  const audit = auditRepository(db, deps.auditKey);
  const staffRepo = staffRepository(db);
  const staff = staffService(staffRepo, clock, { db, audit });
  // Statuses derived from the records and the time, kept per data version (server/db/derived-cache.ts).
  const version = dataVersion(db);
  // The policy and the rig's snapshots are read once per data version (server/db/kept-reads.ts).
  const keptVersion = deps.keepReads === false ? null : version;
  const studioRecords = studioRepository(db);
  const keptStudio = keptPerVersion(db, keptVersion, (trx) => studioRecords.get(trx));
  const studioRepo: StudioRepository = { ...studioRecords, get: (trx?: Db) => keptStudio.get(trx) };
  // The outbox: every e-mail goes through it (PRODUCT.md §5). Services that tell someone of a change
  // (sessions: outbox.notifySessionChange, faults: outbox.faultOpened) write to it in their own
  // transaction; the worker sends. Students' sign-in links go the same way.
  const outbox = outboxService({ db, clock, studio: studioRepo, appUrl: deps.appUrl, undoWindowMs: deps.moveNoticeDelayMs, audit });
  const accounts = studentAccounts(db, clock);
  const auth = authConfig({
    secret: deps.authSecret,
    appUrl: deps.appUrl,
    staff: staffRepo,
    signedOut: (id) => staff.signedOut(id),
    students: {
      provider: studentEmailProvider({ db, clock, appUrl: deps.appUrl, studio: studioRepo, outbox, accounts }),
      adapter: accounts.adapter(),
      mayReceiveLink: (email) => accounts.mayReceiveLink(email),
    },
  });

  // Sign-in passes the guard (one value per field, limits counted in the database) before Auth.js.
  app.post(
    '/auth/callback/credentials',
    ...signInGuard({ counters: signInCountersRepository(db), clock, secret: deps.authSecret, trustProxyHops: deps.trustProxyHops ?? 0, log: (m) => log(new Error(m)) }),
  );
  // A student's "e-mail me a link": one value per field, links per address and e-mail limited.
  app.post('/auth/signin/nodemailer', ...signInLinkGuard({ counters: signInCountersRepository(db), clock, secret: deps.authSecret }));
  app.use('/auth', authRoutes(auth));

  const derived = deps.cacheDerived === false ? noDerivedCache : derivedCache({ version, clock });
  // Heavy answers worked out afresh (calendar ranges, Today, the rig list) one at a time, in pieces (server/http/heavy-work.ts).
  const heavy = heavyWork();
  app.locals.heavy = heavy;
  const rigRepo = rigRepository(db);
  const snapshots = snapshotSource(db, rigRepo, keptVersion);
  const docs = documentsService({ repo: documentsRepository(db), clock, uploadDir: deps.uploadDir, audit });
  const classTypesRepo = classTypesRepository(db);
  const classTypes = classTypesService({ db, repo: classTypesRepo, audit, clock });
  const rig = rigService({ db, rig: rigRepo, audit, studio: studioRepo, clock, classProfiles: classTypes, derived, heavy, snapshots });
  const faults = faultsService({ db, faults: faultsRepository(db), rig: rigRepo, audit, docs, clock, notifier: outbox });
  const inspectionsRepo = inspectionsRepository(db);
  // What each class kept of its points as it started (PRODUCT.md §10); the exports read them too.
  const records = sessionRecords({ db, rig: rigRepo, studio: studioRepo });
  const inspections = inspectionsService({ db, repo: inspectionsRepo, rig: rigRepo, studio: studioRepo, audit, faults, clock, records });

  const limits = personLimiters({ ...DEFAULT_PERSON_LIMITS, ...deps.personLimits } satisfies PersonLimits);
  const api = new ApiRouter('/api');
  staffRoutes(api, staff);
  studioRoutes(api, studioService(studioRepo, clock, { db, audit }), policyPreviewService({ db, studio: studioRepo, rig: rigRepo, sessions: sessionsRepository(db), classTypes: classTypesRepo, clock }));
  mailboxRoutes(api, deps.fakeSmtp ?? null);
  outboxRoutes(api, outbox);
  rigRoutes(api, rig, docs, db, records, limits);
  documentsRoutes(api, docs);
  classTypesRoutes(api, classTypes);
  faultsRoutes(api, faults, docs, limits);
  inspectionsRoutes(api, inspections);
  auditRoutes(api, audit, auditService({ audit, rig: rigRepo, inspections: inspectionsRepo }));
  todayRoutes(api, todayService({ db, rig: rigRepo, studio: studioRepo, inspections: inspectionsRepo, clock, derived, heavy, snapshots }));
  // Students and their places (PRODUCT.md §11): a change to a class tells its instructor (outbox)
  // and then its students, who also move with their points (places).
  const sessionsRepo = sessionsRepository(db);
  const studentsRepo = studentsRepository(db);
  const placesRepo = placesRepository(db);
  const places = placesService({ db, repo: placesRepo, students: studentsRepo, sessions: sessionsRepo, rig: rigRepo, studio: studioRepo, audit, clock, undoWindowMs: deps.moveNoticeDelayMs });
  const students = studentsService({ db, repo: studentsRepo, places: placesRepo, studio: studioRepo, audit, clock });
  const notifier = {
    async sessionChanged(trx: Db, change: Parameters<typeof places.sessionChanged>[1]) {
      await outbox.sessionChanged(trx, change);
      await places.sessionChanged(trx, change);
    },
  };
  const sessions = sessionsService({ db, repo: sessionsRepo, rig: rigRepo, classTypes: classTypesRepo, studio: studioRepo, audit, clock, notifier, derived, records, heavy, places: placesRepo, snapshots });
  sessionsRoutes(api, sessions);
  studentsRoutes(api, students);
  placesRoutes(api, places);
  app.locals.students = students;
  app.locals.places = places;
  // The student's side (PRODUCT.md §11): their own data through the places and students services,
  // their calendar feeds, the public timetable.
  myRoutes(api, myService({ clock, studio: studioRepo, repo: myRepository(db), accounts: staffRepo, studentRecords: studentsRepo, placeRecords: placesRepo, places, students }));
  const feeds = feedsService({ db, clock, appUrl: deps.appUrl, studio: studioRepo, accounts: staffRepo, sessions });
  feedsRoutes(api, feeds);

  if (deps.benchBaselineDbFile) benchBaselineRoutes(api, deps.benchBaselineDbFile);

  app.get('/api/health', (_req, res) => void res.json({ status: 'ok' }));
  publicRoutes(app, publicService({ db, clock, studio: studioRepo, sessions }));
  feedRoute(app, feeds);
  app.use(
    '/api',
    express.json({ limit: '200kb' }),
    // The person is read for every request; the read is kept per data version, so a role change or a
    // deactivation (a write) applies to the very next request.
    authenticate(auth, { withSessionVersion: (id) => derived.get(`user|${id}`, async () => ({ value: await staffRepo.withSessionVersion(id), holdsAt: () => true })) }),
    requireSignedIn,
    requireSameOrigin(deps.appUrl),
    api.router,
    apiNotFound,
  );
  app.locals.routes = api.routes;

  // The printable log is served by the API, outside the built client: it takes Lexend from the app's own copy.
  app.use('/fonts', express.static(LEXEND_FILES, { index: false, maxAge: '30d' }), (_req: express.Request, res: express.Response) => void res.status(404).json({ error: { code: 'not_found', message: 'There is no such font file.' } }));
  if (deps.clientDir && existsSync(join(deps.clientDir, 'index.html'))) {
    app.use(express.static(deps.clientDir, { index: false, maxAge: '1h' }));
    app.get(/^\/(?!api\/|auth\/).*/, (_req, res) => res.sendFile(join(deps.clientDir!, 'index.html')));
  }
  app.use(errorHandler(log));
  return app;
}
