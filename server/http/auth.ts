import type { RequestHandler } from 'express';
import { ExpressAuth, type ExpressAuthConfig } from '@auth/express';
import Credentials from '@auth/express/providers/credentials';
import { getToken } from '@auth/core/jwt';
import rateLimit from 'express-rate-limit';
import express from 'express';
import type { Role } from '../../shared/schemas/vocabulary';
import { signInSchema } from '../../shared/schemas/staff';
import type { StaffRepository } from '../modules/staff/staff.repository';
import { verifyPassword } from '../modules/staff/passwords';

export interface CurrentUser {
  id: number;
  email: string;
  name: string;
  role: Role;
}

declare module 'express-serve-static-core' {
  interface Request {
    user?: CurrentUser;
  }
}

export interface AuthOptions {
  secret: string;
  appUrl: string;
  staff: StaffRepository;
}

const SESSION_HOURS = 12;

export function authConfig({ secret, appUrl, staff }: AuthOptions): ExpressAuthConfig {
  return {
    secret,
    trustHost: true,
    basePath: '/auth',
    useSecureCookies: appUrl.startsWith('https:'),
    session: { strategy: 'jwt', maxAge: SESSION_HOURS * 3600 },
    pages: { signIn: '/sign-in', error: '/sign-in' },
    providers: [
      Credentials({
        credentials: { email: { label: 'E-mail' }, password: { label: 'Password', type: 'password' } },
        async authorize(raw) {
          const parsed = signInSchema.safeParse(raw);
          if (!parsed.success) return null;
          const account = await staff.credentialsByEmail(parsed.data.email);
          const ok = await verifyPassword(account?.passwordHash ?? null, parsed.data.password);
          if (!account || !ok || !account.active) return null;
          return { id: String(account.id), email: account.email, name: account.name };
        },
      }),
    ],
    callbacks: {
      jwt({ token, user }) {
        if (user?.id) token.sub = user.id;
        return token;
      },
    },
    logger: { error: () => undefined, warn: () => undefined },
  };
}

/**
 * Failed sign-ins are limited per address and per account; a sign-in that sets a session cookie
 * is not counted. `trust proxy` is 1, so a forged X-Forwarded-For cannot pick the address.
 */
export function signInLimiters(): RequestHandler[] {
  const succeeded = (_req: express.Request, res: express.Response) => {
    const cookies = ([] as string[]).concat((res.getHeader('set-cookie') as string[] | string | undefined) ?? []);
    return cookies.some((c) => /authjs\.session-token=[^;]+/.test(c));
  };
  const common = {
    windowMs: 15 * 60 * 1000,
    limit: 10,
    standardHeaders: 'draft-7' as const,
    legacyHeaders: false,
    skipSuccessfulRequests: true,
    requestWasSuccessful: succeeded,
    handler: (_req: express.Request, res: express.Response) => {
      res.status(429).json({ error: { code: 'rate_limited', message: 'Too many failed sign-ins. Wait 15 minutes and try again.' } });
    },
  };
  return [
    express.urlencoded({ extended: false, limit: '10kb' }),
    express.json({ limit: '10kb' }),
    rateLimit({ ...common, identifier: 'address' }),
    rateLimit({
      ...common,
      identifier: 'account',
      keyGenerator: (req) => `account:${String((req.body as { email?: unknown })?.email ?? '').trim().toLowerCase().slice(0, 254)}`,
    }),
  ];
}

export function authRoutes(config: ExpressAuthConfig): RequestHandler {
  return ExpressAuth(config);
}

/**
 * Decoding a session cookie (key derivation and decryption) costs about a millisecond, and a
 * browser sends the same cookie with every request; the decoded token is kept per Cookie header
 * until the token's own expiry. Only the token is kept: the person is still read on every request.
 */
export function tokenCache(max = 2_000, nowSeconds = () => Date.now() / 1000) {
  const cache = new Map<string, { sub?: string; exp?: number } | null>();
  return async (cookieHeader: string | undefined, decode: () => Promise<{ sub?: string; exp?: number } | null>) => {
    if (!cookieHeader) return null;
    const hit = cache.get(cookieHeader);
    if (hit !== undefined) {
      if (hit && typeof hit.exp === 'number' && hit.exp > nowSeconds()) return hit;
      cache.delete(cookieHeader);
    }
    const token = await decode();
    if (token && typeof token.exp === 'number' && token.exp > nowSeconds()) {
      if (cache.size >= max) cache.delete(cache.keys().next().value as string);
      cache.set(cookieHeader, { sub: token.sub, exp: token.exp });
    }
    return token;
  };
}

/**
 * Reads the session cookie and loads the person from the database on every request, so a
 * deactivated account or a changed role takes effect at once.
 */
export function authenticate(config: ExpressAuthConfig, staff: Pick<StaffRepository, 'byId'>): RequestHandler {
  const secureCookie = Boolean(config.useSecureCookies);
  const tokens = tokenCache();
  return async (req, _res, next) => {
    const token = await tokens(req.headers.cookie, () =>
      getToken({ req: { headers: req.headers as Record<string, string> }, secret: config.secret as string, secureCookie }).catch(() => null),
    );
    const id = token?.sub ? Number(token.sub) : NaN;
    if (Number.isInteger(id) && id > 0) {
      const user = await staff.byId(id);
      if (user?.active) req.user = { id: user.id, email: user.email, name: user.name, role: user.role };
    }
    next();
  };
}

export const requireSignedIn: RequestHandler = (req, res, next) => {
  if (req.user) return next();
  res.status(401).json({ error: { code: 'unauthenticated', message: 'Sign in to continue.' } });
};

/** State-changing API requests must come from our own pages (PRODUCT.md §6). */
export function requireSameOrigin(appUrl: string): RequestHandler {
  return (req, res, next) => {
    if (['GET', 'HEAD', 'OPTIONS'].includes(req.method)) return next();
    if (req.get('origin') === appUrl) return next();
    res.status(403).json({ error: { code: 'bad_origin', message: 'This request did not come from the Loftwise app.' } });
  };
}
