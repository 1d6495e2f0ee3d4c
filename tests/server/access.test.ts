import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { APP_URL, createTestApp, signIn, type TestContext } from '../helpers/app';
import { makeUser } from '../helpers/factories';
import { roles, type Role } from '../../shared/schemas/vocabulary';
import { allows } from '../../server/http/route';
import { asStudent } from '../helpers/students';

// Routes outside the access declarations, on purpose.
const PUBLIC_API = ['get /api/health', 'get /api/public/timetable', 'get /api/public/studio'];

let ctx: TestContext;
const agents = {} as Record<Role, ReturnType<typeof request.agent>>;

beforeAll(async () => {
  ctx = await createTestApp();
  for (const role of roles) {
    if (role === 'student') {
      // Students sign in by e-mail link only (PRODUCT.md §11).
      agents.student = (await asStudent(ctx)).agent;
      continue;
    }
    const u = await makeUser(ctx.db, { role });
    const { agent, ok } = await signIn(ctx.app, u.email);
    if (!ok) throw new Error('sign-in failed');
    agents[role] = agent;
  }
});
afterAll(async () => ctx.close());

type Layer = { route?: { path: string; methods: Record<string, boolean> }; handle?: { stack?: Layer[] } };
// Top-level routes keep their own path; the one nested router with routes is the API's, under /api.
function routeLayers(stack: Layer[], prefix: string): string[] {
  return stack.flatMap((l) =>
    l.route
      ? Object.keys(l.route.methods).map((m) => `${m} ${prefix}${l.route!.path}`)
      : l.handle?.stack
        ? routeLayers(l.handle.stack, '/api')
        : [],
  );
}

describe('access declarations', () => {
  it('declares an access rule for every API route that is registered', () => {
    const declared = new Set(ctx.app.locals.routes.map((r) => `${r.method} ${r.path}`));
    const appStack = (ctx.app as unknown as { router: { stack: Layer[] } }).router.stack;
    const registered = routeLayers(appStack, '').filter((key) => key.split(' ')[1].startsWith('/api'));
    // The walk must see the declared routes themselves, or it would prove nothing.
    expect(registered.filter((k) => declared.has(k)).length).toBe(declared.size);
    const undeclared = registered
      .filter((key) => !declared.has(key) && !PUBLIC_API.includes(key));
    expect(undeclared).toEqual([]);
    expect(ctx.app.locals.routes.length).toBeGreaterThan(5);
  });

  it('lets everyone signed in read the instructors, and keeps the staff list to the desk', () => {
    const access = (key: string) => ctx.app.locals.routes.find((r) => `${r.method} ${r.path}` === key)?.access;
    expect(access('get /api/instructors')).toBe('signed_in');
    expect(access('get /api/users')).toEqual(['owner', 'reception']);
  });

  it('keeps students to their own routes: every staff route is closed to them', () => {
    const open = ctx.app.locals.routes.filter((r) => allows(r.access, 'student')).map((r) => `${r.method} ${r.path}`);
    expect(open.length).toBeGreaterThan(0);
    for (const key of open) expect(key, key).toMatch(/^(get|post|put|patch|delete) \/api\/(me|my\/.*)$/);
    expect(ctx.app.locals.routes.filter((r) => r.access === 'signed_in').every((r) => !allows(r.access, 'student'))).toBe(true);
  });

  it('lets the desk and the owner add, rename and retire class types, and everyone read them', () => {
    const access = (key: string) => ctx.app.locals.routes.find((r) => `${r.method} ${r.path}` === key)?.access;
    expect(access('post /api/class-types')).toEqual(['reception', 'owner']);
    expect(access('patch /api/class-types/:id')).toEqual(['reception', 'owner']);
    expect(access('get /api/class-types')).toBe('signed_in');
  });

  it('lets riggers and instructors mount an apparatus (a changeover), and no one else', () => {
    const access = (key: string) => ctx.app.locals.routes.find((r) => `${r.method} ${r.path}` === key)?.access;
    expect(access('post /api/points/:id/apparatus')).toEqual(['rigger', 'instructor']);
  });

  it('declares the students and places routes for exactly their roles (PRODUCT.md §11)', () => {
    const access = (key: string) => ctx.app.locals.routes.find((r) => `${r.method} ${r.path}` === key)?.access;
    const desk = ['reception', 'owner'];
    expect(access('get /api/students')).toEqual(['reception', 'owner', 'instructor']);
    expect(access('post /api/students')).toEqual(desk);
    expect(access('get /api/students/:id')).toEqual(['reception', 'owner', 'instructor']);
    expect(access('patch /api/students/:id')).toEqual(desk);
    expect(access('post /api/students/:id/merge')).toEqual(['owner']);
    expect(access('post /api/students/:id/waiver')).toEqual(desk);
    expect(access('get /api/waivers')).toBe('signed_in');
    expect(access('post /api/waivers')).toEqual(['owner']);
    expect(access('post /api/sessions/:id/bookings')).toEqual(desk);
    // Staff, every role of it (PRODUCT.md §11): the rigger's Today board names the students on each point too.
    expect(access('get /api/sessions/:id/bookings')).toBe('signed_in');
    expect(access('post /api/bookings/:id/cancel')).toEqual(desk);
    expect(access('post /api/bookings/:id/check-in')).toEqual(['instructor', 'reception', 'owner']);
    expect(access('post /api/bookings/:id/move')).toEqual(desk);
  });

  it('answers every declared route 401 when signed out', async () => {
    for (const r of ctx.app.locals.routes) {
      const path = r.path.replace(/:\w+/g, '1');
      const res = await request(ctx.app)[r.method](path).set('Origin', APP_URL).send({});
      expect(res.status, `${r.method} ${r.path}`).toBe(401);
    }
  });

  for (const role of roles) {
    it(`lets ${role} through exactly the routes declared for it, before looking at the body`, async () => {
      for (const r of ctx.app.locals.routes) {
        const path = r.path.replace(/:\w+/g, '1');
        const res = await agents[role][r.method](path).set('Origin', APP_URL).send({ junk: '\u0000'.repeat(3) });
        const label = `${role} ${r.method.toUpperCase()} ${r.path} → ${res.status}`;
        if (allows(r.access, role)) expect([401, 403], label).not.toContain(res.status);
        else expect(res.status, label).toBe(403);
        expect(res.status, label).toBeLessThan(500);
      }
    });
  }
});
