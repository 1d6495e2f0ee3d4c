import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp, type LoftwiseApp } from '../../server/app';
import { seedDemoIfEmpty } from '../../seeds';
import { DEMO_PASSWORD } from '../../seeds/01-studio-and-staff';
import { createDb } from '../../server/db/knex';
import { APP_URL, createTestApp, TEST_AUDIT_KEY, signIn, withOrigin, type TestContext } from '../helpers/app';

/*
 * The calendar, Today and the rig list keep what they derive per data version (server/db/
 * derived-cache.ts), and every app keeps the policy and the rig's snapshots it reads per data
 * version (server/db/kept-reads.ts). A second app on the same database works every answer out
 * afresh from records read afresh; a third works every answer out afresh from the kept reads (the
 * bench's cold server). Through time passing and records changing, all three must answer alike,
 * byte for byte.
 */

const HOUR = 3_600_000;

let ctx: TestContext;
let fresh: LoftwiseApp;
let keptOnly: LoftwiseApp;
type Agent = ReturnType<typeof withOrigin>;
const cached: Record<string, Agent> = {};
const uncached: Record<string, Agent> = {};
const fromKept: Record<string, Agent> = {};

async function agent(app: LoftwiseApp, email: string) {
  const { agent, ok } = await signIn(app, email, DEMO_PASSWORD);
  if (!ok) throw new Error(`sign-in failed for ${email}`);
  return withOrigin(agent);
}

beforeAll(async () => {
  ctx = await createTestApp({ now: '2026-12-01T08:30:00Z' });
  await seedDemoIfEmpty(ctx.db, ctx.clock.now(), TEST_AUDIT_KEY);
  const deps = { db: ctx.db, clock: ctx.clock, mailer: { send: async () => undefined, close: () => undefined }, appUrl: APP_URL, authSecret: 'test-secret-test-secret-test-secret-123', auditKey: TEST_AUDIT_KEY, uploadDir: join(ctx.dir, 'uploads'), log: () => undefined };
  fresh = createApp({ ...deps, cacheDerived: false, keepReads: false });
  keptOnly = createApp({ ...deps, cacheDerived: false });
  for (const role of ['reception', 'instructor', 'rigger']) {
    cached[role] = await agent(ctx.app, `${role}@loftwise.test`);
    uncached[role] = await agent(fresh, `${role}@loftwise.test`);
    fromKept[role] = await agent(keptOnly, `${role}@loftwise.test`);
  }
}, 60_000);

afterAll(async () => {
  await ctx?.close();
});

/** The reads a studio makes all day: the week's calendar, Today for two roles, the rig list. */
function reads(now: Date): Array<[role: string, url: string]> {
  const monday = new Date(now);
  monday.setUTCDate(monday.getUTCDate() - ((monday.getUTCDay() + 6) % 7));
  monday.setUTCHours(0, 0, 0, 0);
  const week = `from=${monday.toISOString()}&to=${new Date(monday.getTime() + 7 * 24 * HOUR).toISOString()}`;
  return [
    ['reception', `/api/sessions?${week}`],
    ['instructor', '/api/today'],
    ['reception', '/api/today'],
    ['rigger', '/api/points'],
  ];
}

async function expectAlike(step: string) {
  for (const [role, url] of reads(ctx.clock.now())) {
    // Twice through the cached app: the second answer comes from the cache when it holds.
    await cached[role].get(url);
    const a = await cached[role].get(url);
    const b = await uncached[role].get(url);
    const c = await fromKept[role].get(url);
    expect(a.status, `${step}: ${url}`).toBe(200);
    expect(a.text, `${step}: ${role} ${url}`).toBe(b.text);
    expect(c.text, `${step}: ${role} ${url} (kept reads)`).toBe(b.text);
  }
}

/** A write through another connection to the same database (a second server, a maintenance script). */
async function throughAnotherConnection(write: (db: ReturnType<typeof createDb>) => Promise<unknown>) {
  const other = createDb(ctx.dbTarget, { poolMax: 1 });
  try {
    await write(other);
  } finally {
    await other.destroy();
  }
}

/** A small deterministic generator, so a failure replays. */
function lcg(seed: number) {
  let x = seed;
  return () => ((x = (x * 1_103_515_245 + 12_345) % 2 ** 31) / 2 ** 31);
}

describe('derived answers kept per data version', () => {
  it('sees a change committed by another connection to the same database at once', async () => {
    const list = async () => (await cached.rigger.get('/api/points')).body as Array<{ id: number; label: string; status: { status: string; reasons: Array<{ code: string }> } }>;
    const target = (await list()).find((p) => p.status.status !== 'blocked');
    expect(target, 'an unblocked point').toBeDefined();
    await list();
    await throughAnotherConnection((other) => other('points').where({ id: target!.id }).update({ in_service: false }));
    const after = (await list()).find((p) => p.id === target!.id)!;
    expect(after.status.status).toBe('blocked');
    expect(after.status.reasons.map((r) => r.code)).toContain('out_of_service');
  });
  it('reads the rig and the policy again after another connection’s commit, with no answer kept', async () => {
    const point = async (id: number) => (await fromKept.rigger.get(`/api/points/${id}`)).body as { id: number; status: { status: string; reasons: Array<{ code: string }> } };
    const list = (await fromKept.rigger.get('/api/points')).body as Array<{ id: number; status: { status: string } }>;
    const target = list.find((p) => p.status.status !== 'blocked');
    expect(target, 'an unblocked point').toBeDefined();
    expect((await point(target!.id)).status.status).not.toBe('blocked');
    await throughAnotherConnection((other) => other('points').where({ id: target!.id }).update({ in_service: false }));
    const after = await point(target!.id);
    expect(after.status.status).toBe('blocked');
    expect(after.status.reasons.map((r) => r.code)).toContain('out_of_service');
    await throughAnotherConnection((other) => other('points').where({ id: target!.id }).update({ in_service: true }));
    expect((await point(target!.id)).status.status).not.toBe('blocked');

    const studio = async () => (await fromKept.reception.get('/api/studio')).body as { name: string; policy: { requiredFactor: number } };
    const before = await studio();
    await throughAnotherConnection(async (other) => {
      const row = (await other('studios').first('policy_json')) as { policy_json: string };
      await other('studios').update({ policy_json: JSON.stringify({ ...JSON.parse(row.policy_json), requiredFactor: before.policy.requiredFactor + 1 }) });
    });
    expect((await studio()).policy.requiredFactor).toBe(before.policy.requiredFactor + 1);
    await throughAnotherConnection(async (other) => {
      const row = (await other('studios').first('policy_json')) as { policy_json: string };
      await other('studios').update({ policy_json: JSON.stringify({ ...JSON.parse(row.policy_json), requiredFactor: before.policy.requiredFactor }) });
    });
    expect((await studio()).policy.requiredFactor).toBe(before.policy.requiredFactor);
  });
  it('serves a point as blocked the instant its clearance runs out', async () => {
    const before = (await cached.rigger.get('/api/points')).body as Array<{ id: number; status: { status: string; clearedUntil: string | null; reasons: Array<{ code: string }> } }>;
    const open = before.find((p) => p.status.status !== 'blocked' && p.status.clearedUntil);
    expect(open, 'a cleared point to watch').toBeDefined();
    ctx.clock.set(new Date(Date.parse(open!.status.clearedUntil!) - 1));
    await cached.rigger.get('/api/points');
    const still = ((await cached.rigger.get('/api/points')).body as typeof before).find((p) => p.id === open!.id)!;
    expect(still.status.status).not.toBe('blocked');
    ctx.clock.set(open!.status.clearedUntil!);
    const after = ((await cached.rigger.get('/api/points')).body as typeof before).find((p) => p.id === open!.id)!;
    expect(after.status.status).toBe('blocked');
    expect(after.status.reasons.map((r) => r.code)).toContain('inspection_lapsed');
  });

  it('answer as a fresh computation would, through time passing and records changing', async () => {
    const random = lcg(20261202);
    await expectAlike('start');
    for (let step = 1; step <= 40; step++) {
      const roll = random();
      const points = (await cached.rigger.get('/api/points')).body as Array<{ id: number; status: { status: string; clearedUntil: string | null } }>;
      if (roll < 0.45) {
        // Time passes: minutes, hours or days; sometimes exactly up to a clearance's end.
        const ends = points.map((p) => p.status.clearedUntil).filter((u): u is string => u !== null && Date.parse(u) > ctx.clock.now().getTime());
        if (random() < 0.3 && ends.length) ctx.clock.set(ends[Math.floor(random() * ends.length)]);
        else ctx.clock.advance(Math.floor(random() ** 3 * 72 * HOUR) + 60_000);
      } else if (roll < 0.65) {
        const p = points[Math.floor(random() * points.length)];
        expect((await cached.rigger.post('/api/faults').send({ pointId: p.id, severity: 'medium', description: `Checked at step ${step}: clamp bolt loose` })).status).toBe(201);
      } else if (roll < 0.8) {
        const open = (await cached.rigger.get('/api/faults?status=open')).body.items as Array<{ id: number }>;
        if (open.length) {
          const f = open[Math.floor(random() * open.length)];
          expect((await cached.rigger.post(`/api/faults/${f.id}/resolve`).send({ resolution: 'no_fault_found', note: 'Looked again; sound' })).status).toBe(200);
        }
      } else {
        const week = (await cached.reception.get(reads(ctx.clock.now())[0][1])).body as Array<{ id: number; cancelled: boolean; startsAt: string }>;
        const live = week.filter((s) => !s.cancelled && Date.parse(s.startsAt) > ctx.clock.now().getTime());
        if (live.length) {
          const s = live[Math.floor(random() * live.length)];
          expect((await cached.reception.post(`/api/sessions/${s.id}/cancel`).send({ reason: 'Instructor unwell', scope: 'this' })).status).toBe(200);
        }
      }
      await expectAlike(`step ${step} at ${ctx.clock.now().toISOString()}`);
    }
  }, 120_000);
});

describe('the data version', () => {
  it('moves with a write that matters and with another connection’s commit, not with mail bookkeeping', async () => {
    const { dataVersion } = await import('../../server/db/data-version');
    const version = dataVersion(ctx.db);
    const v0 = await version.current();
    expect(await version.current()).toBe(v0);
    await ctx.db.transaction(async (trx) => {
      await trx('outbox_messages').where('id', -1).update({ last_error: null });
      await trx('sign_in_counters').insert({ key: 'k'.repeat(64), count: 1, expires_at: '2026-12-01T11:00:00.000Z' });
    });
    expect(await version.current(), 'an outbox and sign-in counter transaction').toBe(v0);
    // A row that changes moves it (a statement that matches no row changes nothing).
    const point = (await ctx.db('points').first('id', 'updated_at')) as { id: number; updated_at: string };
    await ctx.db.transaction(async (trx) => {
      await trx('points').where('id', point.id).update({ updated_at: point.updated_at });
    });
    const v1 = await version.current();
    expect(v1, 'a write to points').not.toBe(v0);
    await throughAnotherConnection((other) => other('users').whereIn('id', other('users').min('id')).update({ name: other.raw("name || ' '") }));
    expect(await version.current(), 'any commit by another connection').not.toBe(v1);
  });
});

describe('the data version during a transaction', () => {
  it('never reports a number that a transaction still open may take back', async () => {
    const { dataVersion } = await import('../../server/db/data-version');
    const version = dataVersion(ctx.db);
    const v0 = await version.current();
    const point = (await ctx.db('points').first('id', 'updated_at')) as { id: number; updated_at: string };
    let asked: Promise<string> | undefined;
    await ctx.db
      .transaction(async (trx) => {
        await trx('points').where('id', point.id).update({ updated_at: point.updated_at });
        asked = version.current();
        throw new Error('taken back');
      })
      .catch(() => undefined);
    // Had it said v0 + 1, a later commit reaching v0 + 1 would serve what was kept under it.
    expect(await asked).toBe(v0);
  });
});

describe('the derived cache itself', () => {
  const clock = { now: () => new Date('2026-12-01T10:00:00Z') };
  const fixedVersion = { current: async () => 'v' };
  const answer = (n: number) => async () => ({ value: Array.from({ length: n }, (_, i) => i), holdsAt: () => true, weight: n });

  it('works an answer out once for many callers at the same moment, then keeps it', async () => {
    const { derivedCache } = await import('../../server/db/derived-cache');
    const cache = derivedCache({ version: fixedVersion, clock });
    let computed = 0;
    const compute = async () => (computed++, { value: { n: 1 }, holdsAt: () => true });
    await Promise.all(Array.from({ length: 10 }, () => cache.get('k', compute)));
    await cache.get('k', compute);
    expect(computed).toBe(1);
  });

  it('holds at most its bound in rows, oldest out first, and never an answer larger than the bound', async () => {
    const { derivedCache } = await import('../../server/db/derived-cache');
    const cache = derivedCache({ version: fixedVersion, clock, maxWeight: 10 });
    let computed = 0;
    const counted = (n: number) => async () => (computed++, await answer(n)());
    await cache.get('a', counted(4));
    await cache.get('b', counted(4));
    await cache.get('c', counted(4)); // a goes
    await cache.get('b', counted(4));
    await cache.get('c', counted(4));
    expect(computed).toBe(3);
    await cache.get('a', counted(4));
    expect(computed).toBe(4);
    await cache.get('huge', counted(11));
    await cache.get('huge', counted(11));
    expect(computed).toBe(6);
  });

  it('drops an answer the moment it no longer holds', async () => {
    const { derivedCache } = await import('../../server/db/derived-cache');
    let t = 0;
    const cache = derivedCache({ version: fixedVersion, clock: { now: () => new Date(t) } });
    let computed = 0;
    const compute = async () => (computed++, { value: { at: t }, holdsAt: (now: Date) => now.getTime() < 100 });
    await cache.get('k', compute);
    t = 99;
    await cache.get('k', compute);
    t = 100;
    await cache.get('k', compute);
    expect(computed).toBe(2);
  });
});
