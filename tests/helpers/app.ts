import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import request from 'supertest';
import { createApp, type AppDeps, type LoftwiseApp } from '../../server/app';
import { createDb, migrate, type Db } from '../../server/db/knex';
import { fixedClock } from '../../server/clock';
import type { Mailer, OutgoingMail } from '../../server/mail/transport';
import type { Role } from '../../shared/schemas/vocabulary';
import { makeUser, TEST_AUDIT_KEY, TEST_PASSWORD } from './factories';
import { freshDatabase } from './database';

export const APP_URL = 'http://127.0.0.1:3999';
export { TEST_AUDIT_KEY } from './factories';

export interface TestContext {
  app: LoftwiseApp;
  db: Db;
  clock: ReturnType<typeof fixedClock>;
  dir: string;
  /** The database's file or URL, for a second connection or a second app on the same records. */
  dbTarget: string;
  sent: OutgoingMail[];
  close(): Promise<void>;
}

/**
 * The real app on a fresh database (a SQLite file; a PostgreSQL database when TEST_DATABASE_URL
 * is set) with real migrations and a clock the test controls.
 */
export async function createTestApp(opts: { now?: string; deps?: Partial<AppDeps> } = {}): Promise<TestContext> {
  const dir = mkdtempSync(join(tmpdir(), 'loftwise-test-'));
  const database = await freshDatabase(dir);
  const db = createDb(database.target, { poolMax: 4 });
  await migrate(db);
  const clock = fixedClock(opts.now ?? '2026-12-01T10:00:00Z');
  const sent: OutgoingMail[] = [];
  const mailer: Mailer = { send: async (m) => void sent.push(m), close: () => undefined };
  const app = createApp({ db, clock, mailer, appUrl: APP_URL, authSecret: 'test-secret-test-secret-test-secret-123', auditKey: TEST_AUDIT_KEY, uploadDir: join(dir, 'uploads'), log: () => undefined, ...opts.deps });
  return {
    app,
    db,
    clock,
    dir,
    dbTarget: database.target,
    sent,
    async close() {
      await db.destroy();
      await database.drop();
      rmSync(dir, { recursive: true, force: true });
    },
  };
}

/** Signs in through Auth.js's real credentials flow and returns an agent carrying the session cookie. */
export async function signIn(app: LoftwiseApp, email: string, password = TEST_PASSWORD) {
  const agent = request.agent(app);
  const csrf = await agent.get('/auth/csrf');
  const res = await agent
    .post('/auth/callback/credentials')
    .type('form')
    .send({ email, password, csrfToken: csrf.body.csrfToken, callbackUrl: APP_URL + '/' });
  const ok = ([] as string[]).concat(res.headers['set-cookie'] ?? []).some((c) => c.includes('authjs.session-token='));
  return { agent, ok, res };
}

/** A signed-in agent for a new user of the role; requests carry our Origin. */
export async function as(ctx: TestContext, role: Role, overrides: { email?: string; name?: string } = {}) {
  const user = await makeUser(ctx.db, { role, ...overrides });
  const { agent, ok } = await signIn(ctx.app, user.email);
  if (!ok) throw new Error(`could not sign in as ${role}`);
  return { user, agent, ...withOrigin(agent) };
}

export function withOrigin(agent: ReturnType<typeof request.agent>) {
  return {
    get: (url: string) => agent.get(url),
    post: (url: string) => agent.post(url).set('Origin', APP_URL),
    put: (url: string) => agent.put(url).set('Origin', APP_URL),
    patch: (url: string) => agent.patch(url).set('Origin', APP_URL),
    del: (url: string) => agent.delete(url).set('Origin', APP_URL),
  };
}
