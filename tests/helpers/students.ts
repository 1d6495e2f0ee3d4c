import request from 'supertest';
import type { Db } from '../../server/db/knex';
import { APP_URL, withOrigin, type TestContext } from './app';
import { studentEmailKey } from '../../shared/schemas/my';

let seq = 0;

/** A student on the studio's books (no account yet: one is made at the first sign-in by link). */
export async function insertStudent(db: Db, o: { name?: string; email?: string; phone?: string | null } = {}) {
  seq += 1;
  const email = o.email ?? `student-${seq}-${process.pid}@example.test`;
  const now = new Date().toISOString();
  const [row] = await db('students')
    .insert({ name: o.name ?? `Student ${seq}`, email, email_key: studentEmailKey(email), phone: o.phone ?? null, emergency_name: null, emergency_phone: null, merged_into_id: null, created_at: now, updated_at: now })
    .returning('id');
  return { id: (row as { id: number }).id, email, name: o.name ?? `Student ${seq}` };
}

/** The sign-in link queued in the outbox for an address, newest first (the fake SMTP would carry it). */
export async function linkFor(db: Db, email: string): Promise<string | null> {
  const rows = (await db('outbox_messages').where({ kind: 'sign_in_link' }).orderBy('id', 'desc').select('recipients_json', 'text_body')) as Array<{ recipients_json: string; text_body: string }>;
  const row = rows.find((r) => (JSON.parse(r.recipients_json) as string[]).includes(studentEmailKey(email)));
  const match = row?.text_body.match(/https?:\/\/\S+\/auth\/callback\/nodemailer\?\S+/);
  return match ? match[0] : null;
}

/** Asks for a link as the sign-in page does (Auth.js's e-mail flow with its CSRF token). */
export async function askForLink(agent: ReturnType<typeof request.agent>, email: string) {
  const csrf = await agent.get('/auth/csrf');
  return agent.post('/auth/signin/nodemailer').type('form').send({ email, csrfToken: csrf.body.csrfToken, callbackUrl: APP_URL + '/my/bookings' });
}

/** Signs a student in by the e-mail link, end to end: ask, read the link from the outbox, follow it. */
export async function signInByLink(ctx: TestContext, email: string) {
  const agent = request.agent(ctx.app);
  await askForLink(agent, email);
  const link = await linkFor(ctx.db, email);
  if (!link) return { agent, ok: false, link, ...withOrigin(agent) };
  const url = new URL(link);
  const res = await agent.get(url.pathname + url.search);
  const ok = ([] as string[]).concat(res.headers['set-cookie'] ?? []).some((c) => c.includes('authjs.session-token='));
  return { agent, ok, link, res, ...withOrigin(agent) };
}

/** A signed-in student (a students row and its account, made by following the link). */
export async function asStudent(ctx: TestContext, o: { name?: string; email?: string } = {}) {
  const student = await insertStudent(ctx.db, o);
  const session = await signInByLink(ctx, student.email);
  if (!session.ok) throw new Error(`could not sign in as student ${student.email}`);
  const user = (await ctx.db('users').where({ student_id: student.id }).first('id')) as { id: number };
  return { student, user, ...session };
}
