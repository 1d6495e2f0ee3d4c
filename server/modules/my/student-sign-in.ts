import { createHash, createHmac } from 'node:crypto';
import express, { type RequestHandler } from 'express';
import type { Adapter, AdapterUser, VerificationToken } from '@auth/core/adapters';
import Nodemailer from '@auth/core/providers/nodemailer';
import type { Db } from '../../db/knex';
import type { Clock } from '../../clock';
import type { StudioRepository } from '../studio/studio.repository';
import type { SignInCountersRepository } from '../staff/sign-in-counters.repository';
import type { OutboxService } from '../outbox/outbox.service';
import { addressKey } from '../../http/sign-in-guard';
import { signInLinkMessage } from '../../mail/templates/sign-in-link';
import { studentEmailKey } from '../../../shared/schemas/my';

/**
 * Students sign in by an e-mail link (PRODUCT.md §11): Auth.js's Nodemailer provider, whose
 * `sendVerificationRequest` queues the link in the outbox, over a small Knex adapter that knows
 * only what the e-mail flow needs. A student's account is a `users` row of role `student` linked
 * to its `students` row (users.student_id), made at the first sign-in. Staff keep the password flow.
 */

/** Link e-mails per address and per e-mail in 15 minutes ([studio choice]): bounds mail-bombing an inbox. */
export const SIGN_IN_LINK_POLICY = { windowMs: 15 * 60_000, perEmail: 5, perAddress: 20, maxAgeSeconds: 30 * 60 } as const;

interface StudentUserRow {
  id: number;
  email: string;
  name: string;
  role: string;
  active: number | boolean;
  session_version: number;
  student_id: number | null;
}

export type StudentAdapterUser = AdapterUser & { sessionVersion: number };

const toAdapterUser = (r: StudentUserRow): StudentAdapterUser => ({
  id: String(r.id),
  email: r.email,
  name: r.name,
  emailVerified: null,
  sessionVersion: Number(r.session_version),
});

export function studentAccounts(db: Db, clock: Clock) {
  /** The student an address belongs to, if any (not merged into another). */
  const studentByEmail = (email: string, trx: Db = db) =>
    trx('students').where({ email_key: studentEmailKey(email) }).whereNull('merged_into_id').orderBy('id').first('id', 'name', 'email') as Promise<{ id: number; name: string; email: string } | undefined>;
  const userByEmail = (email: string, trx: Db = db) => trx<StudentUserRow>('users').where({ email }).first();
  const userById = (id: number, trx: Db = db) => trx<StudentUserRow>('users').where({ id }).first();

  return {
    studentByEmail,
    /** Whether an address may receive a sign-in link: an active student account, or a student without one yet. */
    async mayReceiveLink(email: string): Promise<boolean> {
      const user = await userByEmail(email);
      if (user) return user.role === 'student' && Boolean(user.active);
      return Boolean(await studentByEmail(email));
    },

    adapter(): Adapter {
      return {
        async getUserByEmail(email) {
          const row = await userByEmail(email);
          // Staff never sign in by link: their accounts are invisible to the e-mail flow.
          return row && row.role === 'student' ? toAdapterUser(row) : null;
        },
        async getUser(id) {
          const n = Number(id);
          const row = Number.isInteger(n) && n > 0 ? await userById(n) : undefined;
          return row && row.role === 'student' ? toAdapterUser(row) : null;
        },
        async createUser(user) {
          // Only for a student the studio knows: a link to any other address is never sent, and
          // a forged callback for one makes no account.
          const student = await studentByEmail(user.email);
          if (!student) throw new Error('No student has this e-mail address.');
          const now = clock.now().toISOString();
          const [row] = await db('users')
            .insert({
              email: user.email,
              name: student.name.slice(0, 120),
              role: 'student',
              // No password: a student can never pass the credentials flow (argon2 refuses this).
              password_hash: '!student',
              active: true,
              digest_opt_out: true,
              student_id: student.id,
              created_at: now,
              updated_at: now,
            })
            .returning('*');
          return toAdapterUser(row as StudentUserRow);
        },
        async updateUser(user) {
          const row = await userById(Number(user.id));
          if (!row) throw new Error('No such account.');
          return toAdapterUser(row);
        },
        async createVerificationToken(token) {
          await db('verification_tokens').insert({ identifier: token.identifier, token: token.token, expires: token.expires.toISOString() });
          // Expired tokens go as new ones come, so the table holds only live links.
          await db('verification_tokens').where('expires', '<', new Date().toISOString()).delete();
          return token;
        },
        async useVerificationToken({ identifier, token }): Promise<VerificationToken | null> {
          const query = db('verification_tokens').where({ token });
          if (identifier) query.andWhere({ identifier });
          const row = (await query.first()) as { identifier: string; token: string; expires: string } | undefined;
          if (!row) return null;
          // Used once: whoever deletes it first signs in.
          const deleted = await db('verification_tokens').where({ identifier: row.identifier, token: row.token }).delete();
          return deleted ? { identifier: row.identifier, token: row.token, expires: new Date(row.expires) } : null;
        },
      };
    },
  };
}
export type StudentAccounts = ReturnType<typeof studentAccounts>;

export interface StudentLinkDeps {
  db: Db;
  clock: Clock;
  appUrl: string;
  studio: StudioRepository;
  outbox: Pick<OutboxService, 'enqueue'>;
  accounts: StudentAccounts;
}

/**
 * The e-mail provider. The link Auth.js builds names the host the request came to; the one e-mailed
 * names APP_URL instead, so a forged Host header cannot send a student a link to someone else's site.
 * An address that belongs to no student gets no e-mail, and the page says the same either way.
 */
export function studentEmailProvider(deps: StudentLinkDeps) {
  return Nodemailer({
    id: 'nodemailer',
    // Never used: the message goes through the outbox (sendVerificationRequest below).
    server: { host: '127.0.0.1', port: 25 },
    maxAge: SIGN_IN_LINK_POLICY.maxAgeSeconds,
    normalizeIdentifier: (raw: string) => studentEmailKey(raw ?? ''),
    async sendVerificationRequest({ identifier, url, expires, token }) {
      if (!(await deps.accounts.mayReceiveLink(identifier))) return;
      const built = new URL(url);
      const link = new URL(built.pathname + built.search, deps.appUrl);
      const callback = link.searchParams.get('callbackUrl');
      if (callback) link.searchParams.set('callbackUrl', new URL(new URL(callback, deps.appUrl).pathname, deps.appUrl).toString());
      const { name: studioName, policy } = await deps.studio.get();
      const mail = signInLinkMessage({ studioName, timeZone: policy.timeZone, url: link.toString(), expires });
      const key = createHash('sha256').update(token).digest('hex').slice(0, 32);
      await deps.outbox.enqueue(deps.db, { kind: 'sign_in_link', uniqueKey: `sign_in_link:${key}`, to: [identifier], ...mail });
    },
  });
}

/**
 * In front of `POST /auth/signin/nodemailer`: each field once and as text (else 400, never reaching
 * Auth.js), and at most SIGN_IN_LINK_POLICY links per e-mail and per address in a window, counted
 * in the database for every address typed (so a 429 says nothing about whether it is a student's).
 */
export function signInLinkGuard(deps: { counters: SignInCountersRepository; clock: Clock; secret: string }): RequestHandler[] {
  const fields = ['email', 'csrfToken', 'callbackUrl'] as const;
  const key = (...parts: string[]) => createHmac('sha256', deps.secret).update(['link', ...parts].join('\u0000')).digest('hex');
  const guard: RequestHandler = async (req, res, next) => {
    const body: unknown = req.body;
    if (!body || typeof body !== 'object' || Array.isArray(body)) return badForm(res);
    const kept: Record<string, string> = {};
    for (const name of fields) {
      const value = (body as Record<string, unknown>)[name];
      if (value === undefined) continue;
      if (typeof value !== 'string' || value.length > 2000) return badForm(res);
      kept[name] = value;
    }
    const email = studentEmailKey(kept.email ?? '').slice(0, 254);
    if (!/^[^\s@",]+@[^\s@",]+$/.test(email)) {
      return void res.status(400).json({ error: { code: 'validation_failed', message: 'Enter an e-mail address such as name@example.test', details: { source: 'body', fields: { email: 'Enter an e-mail address such as name@example.test' } } } });
    }
    req.body = { ...kept, email };
    const keys = [key('email', email), key('address', addressKey(req.ip))];
    const now = deps.clock.now();
    const verdict = await deps.counters.checkAndAdd(keys, keys, now, new Date(now.getTime() + SIGN_IN_LINK_POLICY.windowMs), (counter) => {
      const blocking = [counter(keys[0]).count >= SIGN_IN_LINK_POLICY.perEmail ? counter(keys[0]) : null, counter(keys[1]).count >= SIGN_IN_LINK_POLICY.perAddress ? counter(keys[1]) : null].filter((c) => c !== null);
      const until = Math.max(...blocking.map((c) => Date.parse(c.expiresAt!)), 0);
      return { refused: blocking.length > 0, retryAfterSeconds: (until - now.getTime()) / 1000 };
    });
    if (verdict.refused) {
      return void res
        .set('Retry-After', String(Math.max(1, Math.ceil(verdict.retryAfterSeconds))))
        .status(429)
        .json({ error: { code: 'rate_limited', message: 'Too many sign-in links asked for. Wait 15 minutes, then ask again.' } });
    }
    next();
  };
  return [express.urlencoded({ extended: false, limit: '10kb', parameterLimit: 20 }), express.json({ limit: '10kb' }), guard];
}

function badForm(res: express.Response) {
  res.status(400).json({ error: { code: 'invalid_sign_in', message: 'Send the e-mail once, as text.' } });
}
