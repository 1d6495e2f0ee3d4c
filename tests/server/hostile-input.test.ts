import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { createHash } from 'node:crypto';
import type request from 'supertest';
import { tableNames } from '../../server/db/dialect';
import { APP_URL, createTestApp, signIn, type TestContext } from '../helpers/app';
import { makeGear, makePoint, makeStandardPath, makeUser } from '../helpers/factories';
import { roles, type Role } from '../../shared/schemas/vocabulary';

// Generated bodies, queries and path parameters against every mutating route, as every role:
// never a 5xx, always the documented error shape, and a refused request changes nothing.
const RUNS_PER_ROUTE = 200;

let ctx: TestContext;
const agents = {} as Record<Role, ReturnType<typeof request.agent>>;
let tables: string[] = [];

beforeAll(async () => {
  ctx = await createTestApp({ now: '2026-12-01T10:00:00Z' });
  for (const role of roles) {
    const u = await makeUser(ctx.db, { role });
    agents[role] = (await signIn(ctx.app, u.email)).agent;
  }
  const p = await makePoint(ctx.db, { clearedAt: '2026-11-30T10:00:00Z' });
  await makeStandardPath(ctx.db, p.id);
  await makeGear(ctx.db, { kind: 'swivel' });
  await ctx.db('class_types').insert({ name: 'Silks', apparatus: 'fabric', duration_minutes: 60, capacity: 8, performers_per_point: 1, created_at: new Date().toISOString() });
  tables = (await tableNames(ctx.db)).filter((n) => !n.startsWith('knex_')).sort();
});
afterAll(async () => ctx.close());

async function fingerprint(): Promise<string> {
  const h = createHash('sha256');
  for (const t of tables) h.update(t).update(JSON.stringify(await ctx.db(t).select('*')));
  return h.digest('hex');
}

const fields = ['name', 'email', 'role', 'password', 'active', 'roomId', 'label', 'structure', 'structuralRatingKn', 'apparatus', 'maxPerformers', 'kind', 'material', 'gate', 'majorKn', 'minorKn', 'gateOpenKn', 'wllKn', 'multiDirectional', 'serial', 'links', 'gearId', 'mode', 'threeWay', 'basketOverHalf', 'leg', 'includedAngleDeg', 'reason', 'note', 'items', 'key', 'result', 'notes', 'pointId', 'severity', 'description', 'resolution', 'replacementGearId', 'oldGearStatus', 'classTypeId', 'instructorId', 'startsAt', 'endsAt', 'pointIds', 'rrule', 'skipDays', 'scope', 'policy', 'durationMinutes', 'capacity', 'performersPerPoint', '__proto__', 'constructor'];
const words = ['owner', 'rigger', 'fabric', 'hoop', 'beam', 'carabiner', 'major', 'minor', 'gate_open', 'pass', 'fail', 'attention', 'high', 'low', 'replaced', 'retired', 'drop', 'periodic', 'after_incident', 'this', 'following', 'FREQ=WEEKLY;COUNT=2', '2026-12-03T18:00:00Z', '2026-12-03', '', ' ', '\u0000', '<script>alert(1)</script>', "'; DROP TABLE users; --", '../../etc/passwd', 'a'.repeat(5000)];
const leaf = fc.oneof(
  fc.constantFrom(...words),
  fc.string({ maxLength: 40 }),
  fc.integer({ min: -5, max: 5 }),
  fc.constantFrom(0, 1, 2, 1e308, -1e308, 2 ** 53, 0.5, Number.MAX_SAFE_INTEGER),
  fc.boolean(),
  fc.constant(null),
);
const value = fc.letrec((tie) => ({
  v: fc.oneof({ depthSize: 'small', maxDepth: 3 }, leaf, fc.array(tie('v'), { maxLength: 4 }), fc.dictionary(fc.constantFrom(...fields), tie('v'), { maxKeys: 5 })),
})).v;
const body = fc.oneof(fc.dictionary(fc.constantFrom(...fields), value, { maxKeys: 8 }), value);
const param = fc.oneof(fc.constantFrom('1', '2', '3', '0', '-1', 'abc', '1.5', '99999999999', '%00', '1e3', '%2e%2e'), fc.nat({ max: 30 }).map(String));
const query = fc.dictionary(fc.constantFrom('from', 'to', 'at', 'pointId', 'status', 'scope', 'q'), fc.oneof(fc.string({ maxLength: 20 }), fc.constantFrom('2026-12-01T00:00:00Z', '1')), { maxKeys: 3 });

describe('hostile input on every mutating route', () => {
  it('covers the mutating routes', () => {
    expect(ctx.app.locals.routes.filter((r) => r.method !== 'get').length).toBeGreaterThan(20);
  });

  it(`never answers 5xx, always the error shape, and a refusal changes nothing (${RUNS_PER_ROUTE} cases per route)`, async () => {
    const mutating = ctx.app.locals.routes.filter((r) => r.method !== 'get');
    // The database's fingerprint after a refusal that was checked to change nothing: the next case
    // starts from it instead of reading every table again (halves the reads, most cases are
    // refused). Any other outcome (a success, a failed check) leaves it unknown, read afresh.
    let known: string | null = null;
    for (const route of mutating) {
      await fc.assert(
        fc.asyncProperty(fc.constantFrom(...roles), param, query, body, async (role, id, q, b) => {
          const path = route.path.replace(/:\w+/g, id) + (Object.keys(q).length ? `?${new URLSearchParams(q as Record<string, string>)}` : '');
          const before = known ?? (await fingerprint());
          known = null;
          const res = await agents[role][route.method](path).set('Origin', APP_URL).set('Content-Type', 'application/json').send(JSON.stringify(b) ?? 'null');
          const label = `${role} ${route.method.toUpperCase()} ${path} ${JSON.stringify(b).slice(0, 200)} → ${res.status} ${res.text.slice(0, 200)}`;
          expect(res.status, label).toBeLessThan(500);
          if (res.status >= 400) {
            expect(res.body?.error?.code, label).toEqual(expect.any(String));
            expect(res.body?.error?.message, label).toEqual(expect.any(String));
            const after = await fingerprint();
            expect(after, label).toBe(before);
            known = after;
          }
        }),
        { numRuns: RUNS_PER_ROUTE },
      );
    }
  }, 600_000);
});
