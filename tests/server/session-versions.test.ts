import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import { as, createTestApp, signIn, type TestContext } from '../helpers/app';
import { makeUser } from '../helpers/factories';

// A session cookie copied before the person's sessions were ended (sign-out, password reset,
// deactivation, role change) must not work afterwards, nor be renewed by GET /auth/session.
let ctx: TestContext;
beforeEach(async () => {
  ctx = await createTestApp();
});
afterEach(async () => ctx.close());

/** The Cookie header a browser would send, as someone who copied it would replay it. */
const cookieOf = (res: request.Response) =>
  ([] as string[])
    .concat(res.headers['set-cookie'] ?? [])
    .map((c) => c.split(';')[0])
    .filter((c) => c.includes('authjs.session-token='))
    .join('; ');

async function signedInCopy(email: string) {
  const { agent, res, ok } = await signIn(ctx.app, email);
  expect(ok).toBe(true);
  return { agent, copied: cookieOf(res) };
}
const meWith = (cookie: string) => request(ctx.app).get('/api/me').set('Cookie', cookie);
const sessionsEnded = async (userId: number) =>
  (await ctx.db('audit_entries').where({ action: 'user.sessions_ended', entity: 'user', entity_id: userId }).orderBy('id')).map((r) => JSON.parse(r.after_json).reason);

describe('ending sessions', () => {
  it('answers 401 to a cookie copied before sign-out, and GET /auth/session does not renew it', async () => {
    const rigger = await makeUser(ctx.db, { role: 'rigger' });
    const { agent, copied } = await signedInCopy(rigger.email);
    expect((await meWith(copied)).status).toBe(200);
    const renewed = await request(ctx.app).get('/auth/session').set('Cookie', copied);
    expect(renewed.body?.user?.email).toBe(rigger.email);

    const csrf = await agent.get('/auth/csrf');
    await agent.post('/auth/signout').type('form').send({ csrfToken: csrf.body.csrfToken });

    expect((await meWith(copied)).status).toBe(401);
    const stale = await request(ctx.app).get('/auth/session').set('Cookie', copied);
    expect(stale.body?.user).toBeUndefined();
    expect(([] as string[]).concat(stale.headers['set-cookie'] ?? []).filter((c) => /authjs\.session-token=[^;]+/.test(c))).toEqual([]);
    expect(await sessionsEnded(rigger.id)).toEqual(['signed_out']);
  });

  it('answers 401 to a cookie copied before the owner reset the password; the new password signs in', async () => {
    const owner = await as(ctx, 'owner');
    const instructor = await makeUser(ctx.db, { role: 'instructor' });
    const { copied } = await signedInCopy(instructor.email);
    expect((await owner.post(`/api/users/${instructor.id}/password`).send({ password: 'a-brand-new-password' })).status).toBe(200);
    expect((await meWith(copied)).status).toBe(401);
    expect((await request(ctx.app).get('/auth/session').set('Cookie', copied)).body?.user).toBeUndefined();
    expect((await signIn(ctx.app, instructor.email, 'a-brand-new-password')).ok).toBe(true);
    expect(await sessionsEnded(instructor.id)).toEqual(['password_reset']);
    expect(await ctx.db('audit_entries').where({ action: 'user.password_reset', entity_id: instructor.id }).first('actor_id')).toEqual({ actor_id: owner.user.id });
  });

  it('answers 401 to a cookie copied before deactivation, still after reactivation', async () => {
    const owner = await as(ctx, 'owner');
    const reception = await makeUser(ctx.db, { role: 'reception' });
    const { copied } = await signedInCopy(reception.email);
    await owner.patch(`/api/users/${reception.id}`).send({ active: false });
    expect((await meWith(copied)).status).toBe(401);
    await owner.patch(`/api/users/${reception.id}`).send({ active: true });
    expect((await meWith(copied)).status).toBe(401);
    expect((await request(ctx.app).get('/auth/session').set('Cookie', copied)).body?.user).toBeUndefined();
    expect((await signIn(ctx.app, reception.email)).ok).toBe(true);
    expect(await sessionsEnded(reception.id)).toEqual(['deactivated']);
  });

  it('answers 401 to a cookie copied before a role change', async () => {
    const owner = await as(ctx, 'owner');
    const person = await makeUser(ctx.db, { role: 'reception' });
    const { copied } = await signedInCopy(person.email);
    await owner.patch(`/api/users/${person.id}`).send({ role: 'instructor' });
    expect((await meWith(copied)).status).toBe(401);
    expect(await sessionsEnded(person.id)).toEqual(['role_changed']);
  });

  it('keeps sessions through a change of name, and a stale cookie signing out ends nothing more', async () => {
    const owner = await as(ctx, 'owner');
    const rigger = await makeUser(ctx.db, { role: 'rigger' });
    const first = await signedInCopy(rigger.email);
    await owner.patch(`/api/users/${rigger.id}`).send({ name: 'Renamed Rigger' });
    expect((await meWith(first.copied)).status).toBe(200);
    const csrf = await first.agent.get('/auth/csrf');
    await first.agent.post('/auth/signout').type('form').send({ csrfToken: csrf.body.csrfToken });
    const second = await signedInCopy(rigger.email);
    // Replaying the old, already-ended cookie's sign-out does not end the new session.
    const replay = request.agent(ctx.app);
    const replayCsrf = await replay.get('/auth/csrf');
    await replay.post('/auth/signout').set('Cookie', [first.copied, ...([] as string[]).concat(replayCsrf.headers['set-cookie'] ?? []).map((c) => c.split(';')[0])].join('; ')).type('form').send({ csrfToken: replayCsrf.body.csrfToken });
    expect((await meWith(second.copied)).status).toBe(200);
    expect(await sessionsEnded(rigger.id)).toEqual(['signed_out']);
  });

  it('refuses a cookie issued before session versions existed', async () => {
    const rigger = await makeUser(ctx.db, { role: 'rigger' });
    const { encode } = await import('@auth/core/jwt');
    const cookie = async (token: Record<string, unknown>) =>
      `authjs.session-token=${await encode({ token: { sub: String(rigger.id), email: rigger.email, ...token }, secret: 'test-secret-test-secret-test-secret-123', salt: 'authjs.session-token' })}`;
    expect((await meWith(await cookie({ sv: 1 }))).status).toBe(200);
    expect((await meWith(await cookie({}))).status).toBe(401);
  });
});
