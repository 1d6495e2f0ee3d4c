import { afterEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import { createApp } from '../../server/app';
import { APP_URL, createTestApp, TEST_AUDIT_KEY, type TestContext } from '../helpers/app';
import { makeUser, TEST_PASSWORD } from '../helpers/factories';
import type { LoftwiseApp } from '../../server/app';

// Limits are [studio choice] values, set out in DEVELOPERS.md ("Sign-in limits"): 10 failures per
// account and address, 30 per address, and per account over all addresses only slowing, refusing
// addresses the account never signed in from once 100 have failed, all in 15-minute windows.
let ctx: TestContext;
afterEach(async () => ctx?.close());

const sessionCookie = (res: request.Response) => ([] as string[]).concat(res.headers['set-cookie'] ?? []).some((c) => /authjs\.session-token=[^;]+/.test(c));

/** One sign-in attempt from `address` (the app trusts one proxy hop), with a raw form body when given a string. */
async function attempt(app: LoftwiseApp, address: string, form: Record<string, string> | ((csrf: string) => string)) {
  const agent = request.agent(app);
  const csrf = (await agent.get('/auth/csrf').set('X-Forwarded-For', address)).body.csrfToken as string;
  const body = typeof form === 'function' ? form(csrf) : new URLSearchParams({ ...form, csrfToken: csrf, callbackUrl: APP_URL + '/' }).toString();
  const res = await agent.post('/auth/callback/credentials').set('X-Forwarded-For', address).type('form').send(body);
  return { res, status: res.status, signedIn: sessionCookie(res) };
}
const proxied = () => createTestApp({ deps: { trustProxyHops: 1 } });

describe('one value per field', () => {
  it('refuses a form with the e-mail twice with 400, before Auth.js, and signs nobody in', async () => {
    ctx = await proxied();
    const rigger = await makeUser(ctx.db, { role: 'rigger' });
    const twice = await attempt(ctx.app, '198.51.100.1', (csrf) => `email=x123&email=${encodeURIComponent(rigger.email)}&password=${TEST_PASSWORD}&csrfToken=${csrf}`);
    expect(twice.status).toBe(400);
    expect(twice.res.body.error.code).toBe('invalid_sign_in');
    expect(twice.signedIn).toBe(false);
    const passwordTwice = await attempt(ctx.app, '198.51.100.1', (csrf) => `email=${encodeURIComponent(rigger.email)}&password=wrong&password=${TEST_PASSWORD}&csrfToken=${csrf}`);
    expect(passwordTwice.status).toBe(400);
    expect(passwordTwice.signedIn).toBe(false);
  });

  it('refuses JSON whose e-mail is not text', async () => {
    ctx = await proxied();
    const rigger = await makeUser(ctx.db, { role: 'rigger' });
    const agent = request.agent(ctx.app);
    const csrf = (await agent.get('/auth/csrf')).body.csrfToken;
    for (const email of [['x', rigger.email], { value: rigger.email }, 7]) {
      const res = await agent.post('/auth/callback/credentials').send({ email, password: TEST_PASSWORD, csrfToken: csrf });
      expect(res.status).toBe(400);
      expect(sessionCookie(res)).toBe(false);
    }
  });

  it('keeps a locked account locked whatever the spelling or repetition of its e-mail', async () => {
    ctx = await proxied();
    const rigger = await makeUser(ctx.db, { role: 'rigger' });
    const spellings = [rigger.email, rigger.email.toUpperCase(), `  ${rigger.email}  `, `\t${rigger.email.replace('r', 'R')}`];
    for (let i = 0; i < 10; i++) expect((await attempt(ctx.app, '198.51.100.2', { email: spellings[i % spellings.length], password: `guess-${i}` })).status).not.toBe(429);
    for (const email of spellings) {
      const right = await attempt(ctx.app, '198.51.100.2', { email, password: TEST_PASSWORD });
      expect(right.status).toBe(429);
      expect(right.signedIn).toBe(false);
    }
    const trick = await attempt(ctx.app, '198.51.100.2', (csrf) => `email=x123&email=${encodeURIComponent(rigger.email)}&password=${TEST_PASSWORD}&csrfToken=${csrf}`);
    expect(trick.signedIn).toBe(false);
  });
});

describe('whose failures count', () => {
  it('lets the right password in from another address after 11 wrong ones from one address', async () => {
    ctx = await proxied();
    const owner = await makeUser(ctx.db, { role: 'owner' });
    const statuses: number[] = [];
    for (let i = 0; i < 11; i++) statuses.push((await attempt(ctx.app, '203.0.113.50', { email: owner.email, password: `typo-${i}` })).status);
    expect(statuses.slice(0, 10)).not.toContain(429);
    expect(statuses[10]).toBe(429);
    const started = Date.now();
    const elsewhere = await attempt(ctx.app, '198.51.100.77', { email: owner.email, password: TEST_PASSWORD });
    expect(elsewhere.signedIn).toBe(true);
    // Slowed a little, never refused.
    expect(Date.now() - started).toBeLessThan(3_000);
    // The address that guessed stays refused, even with the right password.
    expect((await attempt(ctx.app, '203.0.113.50', { email: owner.email, password: TEST_PASSWORD })).status).toBe(429);
  });

  it('lets everyone behind one address keep signing in when one of them keeps mistyping', async () => {
    ctx = await proxied();
    const typist = await makeUser(ctx.db, { role: 'instructor' });
    const colleague = await makeUser(ctx.db, { role: 'reception' });
    for (let i = 0; i < 15; i++) await attempt(ctx.app, '192.0.2.10', { email: typist.email, password: `typo-${i}` });
    expect((await attempt(ctx.app, '192.0.2.10', { email: colleague.email, password: TEST_PASSWORD })).signedIn).toBe(true);
  });

  it('keeps guessing one account from many addresses bounded, but not for the addresses its owner signs in from', async () => {
    ctx = await proxied();
    const owner = await makeUser(ctx.db, { role: 'owner' });
    expect((await attempt(ctx.app, '198.51.100.200', { email: owner.email, password: TEST_PASSWORD })).signedIn).toBe(true);
    // 100 wrong guesses from ten addresses, ten each: none refused until an address reaches its own limit.
    const rounds = await Promise.all(
      Array.from({ length: 10 }, async (_, a) => {
        const out: number[] = [];
        for (let i = 0; i < 10; i++) out.push((await attempt(ctx.app, `203.0.113.${a + 1}`, { email: owner.email, password: `guess-${a}-${i}` })).status);
        return out;
      }),
    );
    expect(rounds.flat()).not.toContain(429);
    // A new address is now refused, even with the right password …
    expect((await attempt(ctx.app, '203.0.113.99', { email: owner.email, password: 'guess-more' })).status).toBe(429);
    expect((await attempt(ctx.app, '198.51.100.201', { email: owner.email, password: TEST_PASSWORD })).status).toBe(429);
    const trick = await attempt(ctx.app, '198.51.100.202', (csrf) => `email=x123&email=${encodeURIComponent(owner.email)}&password=${TEST_PASSWORD}&csrfToken=${csrf}`);
    expect(trick.signedIn).toBe(false);
    // … while the owner's own address still signs in.
    expect((await attempt(ctx.app, '198.51.100.200', { email: owner.email, password: TEST_PASSWORD })).signedIn).toBe(true);
  }, 60_000);

  it('does not count sign-ins that succeed', async () => {
    ctx = await proxied();
    const rigger = await makeUser(ctx.db, { role: 'rigger' });
    for (let i = 0; i < 9; i++) await attempt(ctx.app, '198.51.100.3', { email: rigger.email, password: `guess-${i}` });
    for (let i = 0; i < 5; i++) expect((await attempt(ctx.app, '198.51.100.3', { email: rigger.email, password: TEST_PASSWORD })).signedIn).toBe(true);
    expect((await attempt(ctx.app, '198.51.100.3', { email: rigger.email, password: 'guess-10' })).status).not.toBe(429);
    expect((await attempt(ctx.app, '198.51.100.3', { email: rigger.email, password: TEST_PASSWORD })).status).toBe(429);
  });

  it('counts an IPv6 client as its /64, since it holds every address in it', async () => {
    ctx = await proxied();
    const rigger = await makeUser(ctx.db, { role: 'rigger' });
    for (let i = 0; i < 10; i++) await attempt(ctx.app, `2001:db8:7:7::${(i + 1).toString(16)}`, { email: rigger.email, password: `guess-${i}` });
    expect((await attempt(ctx.app, '2001:db8:7:7:ffff::99', { email: rigger.email, password: TEST_PASSWORD })).status).toBe(429);
    expect((await attempt(ctx.app, '2001:db8:7:8::1', { email: rigger.email, password: TEST_PASSWORD })).signedIn).toBe(true);
  });

  it('lets the address try again once the 15-minute window has passed', async () => {
    ctx = await proxied();
    const rigger = await makeUser(ctx.db, { role: 'rigger' });
    for (let i = 0; i < 10; i++) await attempt(ctx.app, '198.51.100.4', { email: rigger.email, password: `guess-${i}` });
    expect((await attempt(ctx.app, '198.51.100.4', { email: rigger.email, password: TEST_PASSWORD })).status).toBe(429);
    ctx.clock.advance(15 * 60_000 + 1);
    expect((await attempt(ctx.app, '198.51.100.4', { email: rigger.email, password: TEST_PASSWORD })).signedIn).toBe(true);
  });
});

describe('across processes', () => {
  it('counts failures in the database, so a second app on the same file refuses the eleventh', async () => {
    ctx = await proxied();
    const second = createApp({ db: ctx.db, clock: ctx.clock, mailer: { send: async () => undefined, close: () => undefined }, appUrl: APP_URL, authSecret: 'test-secret-test-secret-test-secret-123', auditKey: TEST_AUDIT_KEY, uploadDir: ctx.dir, trustProxyHops: 1, log: () => undefined });
    const rigger = await makeUser(ctx.db, { role: 'rigger' });
    for (let i = 0; i < 10; i++) await attempt(i % 2 ? second : ctx.app, '198.51.100.5', { email: rigger.email, password: `guess-${i}` });
    expect((await attempt(second, '198.51.100.5', { email: rigger.email, password: TEST_PASSWORD })).status).toBe(429);
    expect((await attempt(ctx.app, '198.51.100.5', { email: rigger.email, password: TEST_PASSWORD })).status).toBe(429);
  });

  it('keeps no typed e-mail or address readable in the counters', async () => {
    ctx = await proxied();
    await attempt(ctx.app, '198.51.100.6', { email: 'my-password-typed-here@example.test', password: 'x' });
    const rows = await ctx.db('sign_in_counters').select('key');
    expect(rows.length).toBeGreaterThan(0);
    expect(JSON.stringify(rows)).not.toMatch(/password-typed|198\.51/);
  });
});
