import type { RequestHandler } from 'express';
import { ExpressAuth, type ExpressAuthConfig } from '@auth/express';
import type { Adapter } from '@auth/core/adapters';
import type { Provider } from '@auth/core/providers';
import Credentials from '@auth/express/providers/credentials';
import { getToken } from '@auth/core/jwt';
import type { Role } from '../../shared/schemas/vocabulary';
import { signInSchema } from '../../shared/schemas/staff';
import type { StaffRepository } from '../modules/staff/staff.repository';
import { verifyPassword } from '../modules/staff/passwords';
import { currentSignInAttempt } from './sign-in-guard';

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
  staff: Pick<StaffRepository, 'credentialsByEmail' | 'withSessionVersion'>;
  /** A current session was signed out: every session of the person ends (server/modules/staff). */
  signedOut: (userId: number) => Promise<void>;
  /**
   * Students' e-mail-link sign-in (server/modules/my/student-sign-in.ts): the provider, the adapter
   * it needs, and whether an address may end up signed in (an active student account, or a student
   * without an account yet).
   */
  students?: { provider: Provider; adapter: Adapter; mayReceiveLink: (email: string) => Promise<boolean> };
}

/** What our session cookie carries besides Auth.js's own claims. */
interface LoftwiseToken {
  sub?: string;
  /** users.session_version when the cookie was issued; the cookie is dead once it moves. */
  sv?: number;
  exp?: number;
}
const versionOf = (token: unknown): number | undefined => {
  const sv = (token as LoftwiseToken | null)?.sv;
  return typeof sv === 'number' ? sv : undefined;
};

const SESSION_HOURS = 12;

export function authConfig({ secret, appUrl, staff, signedOut, students }: AuthOptions): ExpressAuthConfig {
  /** The person a token names, if the token is still theirs to use. */
  const currentHolder = async (token: LoftwiseToken | null) => {
    const id = token?.sub ? Number(token.sub) : NaN;
    if (!Number.isInteger(id) || id <= 0) return null;
    const person = await staff.withSessionVersion(id);
    return person?.active && person.sessionVersion === versionOf(token) ? person : null;
  };
  return {
    secret,
    trustHost: true,
    basePath: '/auth',
    useSecureCookies: appUrl.startsWith('https:'),
    session: { strategy: 'jwt', maxAge: SESSION_HOURS * 3600 },
    pages: { signIn: '/sign-in', error: '/sign-in', verifyRequest: '/sign-in/check-email' },
    ...(students ? { adapter: students.adapter } : {}),
    providers: [
      Credentials({
        credentials: { email: { label: 'E-mail' }, password: { label: 'Password', type: 'password' } },
        async authorize(raw) {
          // Only a request the sign-in guard counted may sign anyone in (server/http/sign-in-guard.ts).
          const attempt = currentSignInAttempt();
          if (!attempt) return null;
          const parsed = signInSchema.safeParse(raw);
          if (!parsed.success || parsed.data.email !== attempt.email) return null;
          const account = await staff.credentialsByEmail(parsed.data.email);
          const ok = await verifyPassword(account?.passwordHash ?? null, parsed.data.password);
          // Students sign in by e-mail link only; their accounts hold no password.
          if (!account || !ok || !account.active || account.role === 'student') return null;
          await attempt.succeeded();
          return { id: String(account.id), email: account.email, name: account.name, sessionVersion: account.sessionVersion };
        },
      }),
      ...(students ? [students.provider] : []),
    ],
    callbacks: {
      async signIn({ user, account, email }) {
        if (account?.type !== 'email') return true;
        // Asking for a link always "succeeds": whether the address is a student's is never shown
        // (no e-mail goes to an address that is not). Following a link signs in only a student.
        if (email?.verificationRequest) return true;
        return Boolean(students && user.email && (await students.mayReceiveLink(user.email)));
      },
      async jwt({ token, user }) {
        if (user?.id) {
          token.sub = user.id;
          token.sv = (user as { sessionVersion?: number }).sessionVersion;
          return token;
        }
        // GET /auth/session renews the cookie: only while it is still the person's current session.
        return (await currentHolder(token)) ? token : null;
      },
    },
    events: {
      async signOut(message) {
        const token = 'token' in message ? (message.token as LoftwiseToken | null) : null;
        // A stale cookie signing out ends nothing more; a current one ends every session of the person.
        const person = await currentHolder(token);
        if (person) await signedOut(person.id);
      },
    },
    logger: { error: () => undefined, warn: () => undefined },
  };
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
  const cache = new Map<string, LoftwiseToken | null>();
  return async (cookieHeader: string | undefined, decode: () => Promise<LoftwiseToken | null>) => {
    if (!cookieHeader) return null;
    const hit = cache.get(cookieHeader);
    if (hit !== undefined) {
      if (hit && typeof hit.exp === 'number' && hit.exp > nowSeconds()) return hit;
      cache.delete(cookieHeader);
    }
    const token = await decode();
    if (token && typeof token.exp === 'number' && token.exp > nowSeconds()) {
      if (cache.size >= max) cache.delete(cache.keys().next().value as string);
      cache.set(cookieHeader, { sub: token.sub, exp: token.exp, sv: versionOf(token) });
    }
    return token;
  };
}

/**
 * Reads the session cookie and loads the person from the database on every request, so a
 * deactivated account or a changed role takes effect at once, and a cookie issued under an
 * older session version (signed out, password reset, deactivated, role changed) is refused.
 */
export function authenticate(config: ExpressAuthConfig, staff: Pick<StaffRepository, 'withSessionVersion'>): RequestHandler {
  const secureCookie = Boolean(config.useSecureCookies);
  const tokens = tokenCache();
  return async (req, _res, next) => {
    const token = await tokens(req.headers.cookie, () =>
      getToken({ req: { headers: req.headers as Record<string, string> }, secret: config.secret as string, secureCookie }).catch(() => null),
    );
    const id = token?.sub ? Number(token.sub) : NaN;
    if (Number.isInteger(id) && id > 0) {
      const user = await staff.withSessionVersion(id);
      if (user?.active && user.sessionVersion === versionOf(token)) req.user = { id: user.id, email: user.email, name: user.name, role: user.role };
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
