import { AsyncLocalStorage } from 'node:async_hooks';
import { createHmac } from 'node:crypto';
import { isIP } from 'node:net';
import express, { type RequestHandler } from 'express';
import type { Clock } from '../clock';
import { normaliseEmail } from '../../shared/schemas/staff';
import type { SignInCountersRepository } from '../modules/staff/sign-in-counters.repository';

/**
 * The sign-in limits (PRODUCT.md §6; the reasons are in DEVELOPERS.md, "Sign-in limits").
 * Failures are counted in a fixed window from the first one:
 * - per account and address: the 11th attempt from that address on that account is refused,
 *   right password or not, until the window ends;
 * - per address, over every account: refused after 30, so spraying many accounts from one
 *   place stays bounded while one person's typos (at most 10) never lock out others there;
 * - per account, over every address: never refused for an address the account signed in from
 *   in the last 30 days; past 10 failures every attempt on the account is slowed a little, and
 *   past 100 (a guess spread over at least ten addresses) addresses it never signed in from are
 *   refused.
 * A sign-in that succeeds takes its attempt back.
 */
export const SIGN_IN_POLICY = {
  windowMs: 15 * 60_000,
  perAccountAndAddress: 10,
  perAddress: 30,
  accountSlowAfter: 10,
  accountSlowStepMs: 100,
  accountSlowMaxMs: 1_000,
  perAccountFromNewAddresses: 100,
  knownAddressDays: 30,
} as const;

/** The fields Auth.js's credentials sign-in takes; anything else is dropped before it. */
const FIELDS = ['email', 'password', 'csrfToken', 'callbackUrl'] as const;

/** What the guard admitted, for `authorize` to find (it runs inside the guarded request). */
export interface SignInAttempt {
  email: string;
  /** Called by `authorize` when the password was right: the attempt is not counted. */
  succeeded(): Promise<void>;
}
const attempts = new AsyncLocalStorage<SignInAttempt>();

/**
 * Sign-in runs only inside a request the guard admitted: Auth.js reached any other way (another
 * path spelling, a future route) finds no attempt and signs nobody in.
 */
export const currentSignInAttempt = (): SignInAttempt | undefined => attempts.getStore();

/**
 * The address counted: the client's as Express sees it under TRUST_PROXY. An IPv6 client
 * controls a whole /64, so it counts as one address.
 */
export function addressKey(ip: string | undefined): string {
  const raw = (ip ?? '').replace(/^::ffff:(?=\d+\.\d+\.\d+\.\d+$)/i, '');
  if (isIP(raw) !== 6) return raw || 'unknown';
  const [head, tail = ''] = raw.toLowerCase().split('::');
  const left = head ? head.split(':') : [];
  const right = tail ? tail.split(':') : [];
  const groups = raw.includes('::') ? [...left, ...Array(8 - left.length - right.length).fill('0'), ...right] : left;
  return `${groups.slice(0, 4).map((g) => g.replace(/^0+(?=.)/, '')).join(':')}::/64`;
}

const refuse = (res: express.Response, retryAfterSeconds: number) => {
  res
    .set('Retry-After', String(Math.max(1, Math.ceil(retryAfterSeconds))))
    .status(429)
    .json({ error: { code: 'rate_limited', message: 'Too many failed sign-ins. Wait 15 minutes and try again.' } });
};

export interface SignInGuardDeps {
  counters: SignInCountersRepository;
  clock: Clock;
  /** Keys the counter hashes, so the table never holds a typed e-mail or an address readable. */
  secret: string;
  trustProxyHops: number;
  log?: (message: string) => void;
}

/**
 * In front of `POST /auth/callback/credentials`: each field must come once and as text (a form
 * with `email` twice, or JSON with an array, is refused with 400 and never reaches Auth.js); the
 * e-mail is normalised once, and Auth.js receives exactly the values that were counted.
 */
export function signInGuard(deps: SignInGuardDeps): RequestHandler[] {
  const policy = SIGN_IN_POLICY;
  const sleep = (ms: number) => new Promise<void>((r) => setTimeout(r, ms));
  const key = (...parts: string[]) => createHmac('sha256', deps.secret).update(parts.join('\u0000')).digest('hex');
  let warnedProxy = false;

  const guard: RequestHandler = async (req, res, next) => {
    const body: unknown = req.body;
    if (!body || typeof body !== 'object' || Array.isArray(body)) return badForm(res);
    const fields: Partial<Record<(typeof FIELDS)[number], string>> = {};
    for (const name of FIELDS) {
      const value = (body as Record<string, unknown>)[name];
      if (value === undefined) continue;
      if (typeof value !== 'string') return badForm(res);
      fields[name] = value;
    }
    const email = normaliseEmail(fields.email ?? '').slice(0, 254);
    // Auth.js sees only the checked fields, with the e-mail as counted.
    req.body = { ...fields, email };

    if (!warnedProxy && deps.trustProxyHops === 0 && req.headers['x-forwarded-for']) {
      warnedProxy = true;
      deps.log?.('Sign-in requests carry X-Forwarded-For but TRUST_PROXY is 0: every client behind that proxy counts as one address. Set TRUST_PROXY to the number of proxies in front of Loftwise.');
    }
    const address = addressKey(req.ip);
    const keys = { pair: key('pair', email, address), address: key('address', address), account: key('account', email), known: key('known', email, address) };
    const now = deps.clock.now();
    const windowEnds = new Date(now.getTime() + policy.windowMs);
    const verdict = await deps.counters.checkAndAdd(Object.values(keys), [keys.pair, keys.address, keys.account], now, windowEnds, (counter) => {
      const account = counter(keys.account);
      const blocking = [
        counter(keys.pair).count >= policy.perAccountAndAddress ? counter(keys.pair) : null,
        counter(keys.address).count >= policy.perAddress ? counter(keys.address) : null,
        account.count >= policy.perAccountFromNewAddresses && counter(keys.known).count === 0 ? account : null,
      ].filter((c) => c !== null);
      const until = Math.max(...blocking.map((c) => Date.parse(c.expiresAt!)), 0);
      const over = account.count + 1 - policy.accountSlowAfter;
      return { refused: blocking.length > 0, retryAfterSeconds: (until - now.getTime()) / 1000, slowMs: over > 0 ? Math.min(policy.accountSlowMaxMs, over * policy.accountSlowStepMs) : 0 };
    });
    if (verdict.refused) return refuse(res, verdict.retryAfterSeconds);
    if (verdict.slowMs > 0) await sleep(verdict.slowMs);

    let settled = false;
    const attempt: SignInAttempt = {
      email,
      async succeeded() {
        if (settled) return;
        settled = true;
        const at = deps.clock.now();
        await deps.counters.takeBack([keys.pair, keys.address, keys.account], keys.known, at, new Date(at.getTime() + policy.knownAddressDays * 86_400_000));
      },
    };
    attempts.run(attempt, () => next());
  };

  return [express.urlencoded({ extended: false, limit: '10kb', parameterLimit: 20 }), express.json({ limit: '10kb' }), guard];
}

function badForm(res: express.Response) {
  res.status(400).json({ error: { code: 'invalid_sign_in', message: 'Send the e-mail and password once each, as text.' } });
}
