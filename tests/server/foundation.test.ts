import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import { as, createTestApp, signIn, type TestContext } from '../helpers/app';
import { makeUser } from '../helpers/factories';

let ctx: TestContext;
beforeEach(async () => {
  ctx = await createTestApp();
});
afterEach(async () => ctx.close());

describe('GET /api/health', () => {
  it('answers ok without signing in', async () => {
    const res = await request(ctx.app).get('/api/health');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ status: 'ok' });
  });
});

describe('signed out', () => {
  it.each(['/api/me', '/api/users', '/api/nope', '/api/points/1', '/api/'])('answers 401 with the error shape for %s', async (path) => {
    const res = await request(ctx.app).get(path);
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('unauthenticated');
  });
  it('answers 401 to a POST before looking at its Origin or body', async () => {
    const res = await request(ctx.app).post('/api/users').send({ nonsense: true });
    expect(res.status).toBe(401);
  });
});

describe('sign-in', () => {
  it('signs in with the right password and GET /api/me names the person', async () => {
    const u = await makeUser(ctx.db, { role: 'rigger', name: 'Test Rigger' });
    const { agent, ok } = await signIn(ctx.app, u.email);
    expect(ok).toBe(true);
    const me = await agent.get('/api/me');
    expect(me.status).toBe(200);
    expect(me.body).toMatchObject({ id: u.id, email: u.email, name: 'Test Rigger', role: 'rigger' });
  });

  it('answers a wrong password and an unknown e-mail the same way, without a session', async () => {
    const u = await makeUser(ctx.db, { role: 'owner' });
    const wrong = await signIn(ctx.app, u.email, 'not-the-password');
    const unknown = await signIn(ctx.app, 'nobody@example.test', 'not-the-password');
    expect(wrong.ok).toBe(false);
    expect(unknown.ok).toBe(false);
    expect(wrong.res.status).toBe(unknown.res.status);
    const path = (loc: string) => new URL(loc).pathname + new URL(loc).search;
    expect(path(wrong.res.headers.location)).toBe(path(unknown.res.headers.location));
  });

  it('limits failed sign-ins per account, and does not count successful ones', async () => {
    const u = await makeUser(ctx.db, { role: 'owner' });
    for (let i = 0; i < 12; i++) expect((await signIn(ctx.app, u.email)).ok).toBe(true);
    const statuses: number[] = [];
    for (let i = 0; i < 11; i++) statuses.push((await signIn(ctx.app, u.email, 'wrong-password')).res.status);
    expect(statuses.slice(0, 10).every((s) => s !== 429)).toBe(true);
    expect(statuses[10]).toBe(429);
    // Now even the right password waits out the window for this account.
    expect((await signIn(ctx.app, u.email)).res.status).toBe(429);
  });

  it('limits failed sign-ins per address across accounts (30 [studio choice]), whatever X-Forwarded-For says', async () => {
    const csrfAgent = request.agent(ctx.app);
    const statuses: number[] = [];
    for (let i = 0; i < 31; i++) {
      const csrf = await csrfAgent.get('/auth/csrf');
      const res = await csrfAgent
        .post('/auth/callback/credentials')
        .set('X-Forwarded-For', `203.0.113.${i}`)
        .type('form')
        .send({ email: `nobody${i}@example.test`, password: 'x', csrfToken: csrf.body.csrfToken });
      statuses.push(res.status);
    }
    expect(statuses.slice(0, 30).every((s) => s !== 429)).toBe(true);
    expect(statuses[30]).toBe(429);
  });

  it('refuses a deactivated account on its very next request, even with a valid cookie', async () => {
    const owner = await as(ctx, 'owner');
    const victim = await makeUser(ctx.db, { role: 'instructor' });
    const { agent } = await signIn(ctx.app, victim.email);
    expect((await agent.get('/api/me')).status).toBe(200);
    const off = await owner.patch(`/api/users/${victim.id}`).send({ active: false });
    expect(off.status).toBe(200);
    expect((await agent.get('/api/me')).status).toBe(401);
  });

  it('applies a role change on the next request: the old session ends, and the next sign-in carries the new role', async () => {
    const owner = await as(ctx, 'owner');
    const who = await makeUser(ctx.db, { role: 'instructor' });
    const { agent } = await signIn(ctx.app, who.email);
    expect((await agent.get('/api/users')).status).toBe(403);
    await owner.patch(`/api/users/${who.id}`).send({ role: 'reception' });
    expect((await agent.get('/api/me')).status).toBe(401);
    const again = await signIn(ctx.app, who.email);
    expect((await again.agent.get('/api/me')).body.role).toBe('reception');
    expect((await again.agent.get('/api/users')).status).toBe(200);
  });

  it('ends the session on sign-out', async () => {
    const u = await makeUser(ctx.db, { role: 'rigger' });
    const { agent } = await signIn(ctx.app, u.email);
    const csrf = await agent.get('/auth/csrf');
    await agent.post('/auth/signout').type('form').send({ csrfToken: csrf.body.csrfToken });
    expect((await agent.get('/api/me')).status).toBe(401);
  });

  it('sets the session cookie HttpOnly and SameSite=Lax', async () => {
    const u = await makeUser(ctx.db, { role: 'rigger' });
    const { res } = await signIn(ctx.app, u.email);
    const cookie = ([] as string[]).concat(res.headers['set-cookie']).find((c) => c.includes('authjs.session-token='))!;
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
  });
});

describe('POST /api/users', () => {
  it('creates a staff member for the owner (201 with id) who can then sign in', async () => {
    const owner = await as(ctx, 'owner');
    const res = await owner.post('/api/users').send({ email: 'New.Person@Example.test', name: 'New Person', role: 'instructor', password: 'a-long-password' });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ id: expect.any(Number), email: 'new.person@example.test', role: 'instructor', active: true });
    expect(res.body.passwordHash).toBeUndefined();
    expect((await signIn(ctx.app, 'new.person@example.test', 'a-long-password')).ok).toBe(true);
  });

  it('refuses an instructor with 403 whatever the body', async () => {
    const instructor = await as(ctx, 'instructor');
    expect((await instructor.post('/api/users').send({})).status).toBe(403);
    expect((await instructor.post('/api/users').send({ email: 'a@b.test', name: 'A', role: 'owner', password: 'xxxxxxxxxxxx' })).status).toBe(403);
  });

  it('answers 400 with a message per field for a bad body, and creates nobody', async () => {
    const owner = await as(ctx, 'owner');
    const before = await ctx.db('users').count({ n: '*' });
    const res = await owner.post('/api/users').send({ email: 'not-an-email', name: '', role: 'boss', password: 'short' });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid_request');
    expect(Object.keys(res.body.error.details.fields).sort()).toEqual(['email', 'name', 'password', 'role']);
    expect(await ctx.db('users').count({ n: '*' })).toEqual(before);
  });

  it('answers 409 for an e-mail already in use', async () => {
    const owner = await as(ctx, 'owner');
    const body = { email: 'twice@example.test', name: 'Twice', role: 'rigger', password: 'a-long-password' };
    expect((await owner.post('/api/users').send(body)).status).toBe(201);
    const again = await owner.post('/api/users').send(body);
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('email_taken');
  });

  it('answers 403 to a request from a foreign Origin or none, and changes nothing', async () => {
    const owner = await as(ctx, 'owner');
    const body = { email: 'csrf@example.test', name: 'X', role: 'rigger', password: 'a-long-password' };
    const foreign = await owner.agent.post('/api/users').set('Origin', 'http://evil.example').send(body);
    const none = await owner.agent.post('/api/users').send(body);
    expect(foreign.status).toBe(403);
    expect(none.status).toBe(403);
    expect(foreign.body.error.code).toBe('bad_origin');
    expect(await ctx.db('users').where({ email: 'csrf@example.test' }).first()).toBeUndefined();
  });

  it('answers 400, not 500, for malformed JSON', async () => {
    const owner = await as(ctx, 'owner');
    const res = await owner.post('/api/users').set('Content-Type', 'application/json').send('{"email":');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid_json');
  });
});

describe('PATCH /api/users/:id', () => {
  it('keeps at least one active owner', async () => {
    const owner = await as(ctx, 'owner');
    const res = await owner.patch(`/api/users/${owner.user.id}`).send({ role: 'rigger' });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('last_owner');
  });
  it('answers 404 for an unknown person and 400 for a bad id', async () => {
    const owner = await as(ctx, 'owner');
    expect((await owner.patch('/api/users/99999').send({ name: 'X' })).status).toBe(404);
    expect((await owner.patch('/api/users/abc').send({ name: 'X' })).status).toBe(400);
  });
});

describe('signed in, unknown API path', () => {
  it('answers a JSON 404', async () => {
    const rigger = await as(ctx, 'rigger');
    const res = await rigger.get('/api/definitely-not-here');
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('not_found');
  });
});

describe('security headers', () => {
  it('sends a strict Content-Security-Policy, nosniff and a referrer policy', async () => {
    const res = await request(ctx.app).get('/api/health');
    const csp = res.headers['content-security-policy'];
    expect(csp).toContain("frame-ancestors 'none'");
    expect(csp).toMatch(/script-src 'self'(;|$)/);
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['referrer-policy']).toBe('same-origin');
  });
});


describe('PATCH /api/me/preferences', () => {
  it('lets anyone opt out of the daily digest for themselves, and nothing else', async () => {
    const rigger = await as(ctx, 'rigger');
    expect((await rigger.get('/api/me/preferences')).body).toEqual({ digestOptOut: false });
    const res = await rigger.patch('/api/me/preferences').send({ digestOptOut: true });
    expect(res.body).toEqual({ digestOptOut: true });
    expect((await rigger.patch('/api/me/preferences').send({ digestOptOut: true, role: 'owner' })).status).toBe(400);
    expect((await rigger.get('/api/me')).body.role).toBe('rigger');
  });
});
