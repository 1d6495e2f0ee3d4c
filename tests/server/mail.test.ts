import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { APP_URL, as, createTestApp, type TestContext } from '../helpers/app';
import { makeGear, makePoint, makeRoom, makeStandardPath, makeUser } from '../helpers/factories';
import { startFakeSmtp, type FakeSmtp } from '../../server/mail/fake-smtp';
import { smtpMailer, type Mailer } from '../../server/mail/transport';
import { startMailWorker, type MailWorker } from '../../server/mail/worker';
import { LEASE_MS, outboxMessageId } from '../../server/mail/deliver';
import { loadConfig } from '../../server/config';
import { outboxRepository, retryDelayMs, MAX_ATTEMPTS, MAX_DELAY_MS } from '../../server/modules/outbox/outbox.repository';
import { outboxService } from '../../server/modules/outbox/outbox.service';
import { studioRepository } from '../../server/modules/studio/studio.repository';
import { sessionChangeMessage } from '../../server/mail/templates/session-change';
import { UNDO_WINDOW_MS } from '../../shared/schedule/undo';

const FROM = 'Loftwise <no-reply@loftwise.test>';
const HOUR = 3_600_000;
const MINUTE = 60_000;

let ctx: TestContext;
let fake: FakeSmtp;
let mailer: Mailer;
const workers: MailWorker[] = [];
const mailers: Mailer[] = [];
const fakes: FakeSmtp[] = [];

async function newFake(port = 0) {
  const f = await startFakeSmtp(port);
  fakes.push(f);
  return f;
}
/** Takes the SMTP server down; `back()` starts it again on the same port. */
async function smtpDown() {
  const port = fake.port;
  await fake.close();
  return { back: () => newFake(port) };
}
function newMailer(url: string) {
  const m = smtpMailer(url, FROM);
  mailers.push(m);
  return m;
}
/** A worker whose timer never fires during a test: cycles run only when the test asks. */
function worker(m: Mailer = mailer) {
  const w = startMailWorker({ db: ctx.db, mailer: m, clock: ctx.clock, appUrl: APP_URL, intervalMs: 24 * HOUR, log: () => undefined });
  workers.push(w);
  return w;
}

beforeEach(async () => {
  fake = await newFake();
  mailer = newMailer(fake.url);
  ctx = await createTestApp({ now: '2026-12-01T10:00:00Z', deps: { mailer } });
});
afterEach(async () => {
  for (const w of workers.splice(0)) await w.stop();
  for (const m of mailers.splice(0)) m.close();
  for (const f of fakes.splice(0)) await f.close().catch(() => undefined);
  await ctx.close();
});

// ---- the studio, made of real rows

/** A room, a class type and an instructor. Europe/London is on UTC in December. */
async function studio(o: { className?: string; roomName?: string } = {}) {
  const roomId = await makeRoom(ctx.db, o.roomName ?? 'Main Hall');
  const [ct] = await ctx.db('class_types')
    .insert({ name: o.className ?? 'Silks Foundations', apparatus: 'fabric', duration_minutes: 60, capacity: 8, performers_per_point: 1, created_at: new Date().toISOString() })
    .returning('id');
  const instructor = await makeUser(ctx.db, { role: 'instructor', name: 'Ada Instructor' });
  return { roomId, classTypeId: (ct as { id: number }).id, instructor };
}
type Studio = Awaited<ReturnType<typeof studio>>;

/** A point with a plain path, cleared at `clearedAt` (textile sling: cleared for 30 days). */
async function point(s: Studio, label: string, clearedAt: string) {
  const p = await makePoint(ctx.db, { roomId: s.roomId, label, clearedAt, structuralRatingKn: 30 });
  // A fabric hangs on it, inspected well past every class here, so a silks class needs no changeover.
  const gear = await makeStandardPath(ctx.db, p.id, { apparatus: { kind: 'fabric', inspectedUntil: '2027-06-01T00:00:00Z' } });
  return { id: p.id, gear };
}

async function book(s: Studio, startsAt: string, pointIds: number[], minutes = 60) {
  const ends = new Date(new Date(startsAt).getTime() + minutes * MINUTE).toISOString();
  const now = ctx.clock.now().toISOString();
  const [row] = await ctx.db('sessions')
    .insert({ class_type_id: s.classTypeId, instructor_id: s.instructor.id, room_id: s.roomId, starts_at: new Date(startsAt).toISOString(), ends_at: ends, cancelled: false, at_risk: false, created_at: now, updated_at: now })
    .returning('id');
  const id = (row as { id: number }).id;
  if (pointIds.length) await ctx.db('session_points').insert(pointIds.map((p) => ({ session_id: id, point_id: p, starts_at: new Date(startsAt).toISOString(), ends_at: ends, cancelled: false })));
  return id;
}

async function openFault(o: { pointId?: number; gearId?: number; description: string }) {
  const reporter = await makeUser(ctx.db, { role: 'instructor' });
  const [row] = await ctx.db('faults')
    .insert({ point_id: o.pointId ?? null, gear_id: o.gearId ?? null, severity: 'medium', description: o.description, status: 'open', reported_by: reporter.id, reported_at: ctx.clock.now().toISOString() })
    .returning('id');
  return (row as { id: number }).id;
}

const rows = (where: Record<string, unknown> = {}) => ctx.db('outbox_messages').where(where).orderBy('id');
const received = (f: FakeSmtp = fake) => f.messages().slice().reverse(); // oldest first
const linesOf = (text: string) => text.split('\n').map((l) => l.trimEnd());

describe('instructor reminders', () => {
  it('sends one reminder at each lead time (24 h and 2 h), received over SMTP, blocked points first', async () => {
    const s = await studio();
    const a = await point(s, 'A-1', '2026-11-29T10:00:00Z'); // cleared until 29 Dec: cleared
    const b = await point(s, 'B-2', '2026-11-29T10:00:00Z');
    const c = await point(s, 'C-3', '2026-11-05T10:00:00Z'); // cleared until 5 Dec: inside the 7-day window
    await openFault({ pointId: b.id, description: 'Sling frayed at the basket' });
    // Booked days before: on 28 Nov for 1 Dec at 18:00.
    ctx.clock.set('2026-11-28T09:00:00Z');
    await book(s, '2026-12-01T18:00:00Z', [a.id, b.id, c.id], 90);
    const w = worker();

    await w.runOnce();
    expect(received()).toHaveLength(0);

    ctx.clock.set('2026-11-30T18:00:00Z'); // start − 24 h
    expect((await w.runOnce()).remindersQueued).toBe(1);
    ctx.clock.set('2026-12-01T10:00:00Z'); // between the two moments: nothing
    await w.runOnce();
    expect(received()).toHaveLength(1);
    ctx.clock.set('2026-12-01T16:00:30Z'); // start − 2 h (and a cycle later)
    await w.runOnce();
    await w.runOnce();

    const mail = received();
    expect(mail).toHaveLength(2);
    for (const m of mail) expect(m.to).toEqual([s.instructor.email]);
    expect(mail[0].subject).toBe('Reminder: Silks Foundations on Tue 1 Dec at 18:00 in Main Hall (1 point blocked)');
    expect(mail[1].subject).toBe('Reminder: Silks Foundations at 18:00 in Main Hall (1 point blocked)');

    const text = linesOf(mail[1].text);
    expect(text).toContain('Class: Silks Foundations');
    expect(text).toContain('Room: Main Hall');
    expect(text).toContain('Starts: 1 Dec 2026, 18:00');
    expect(text).toContain('Ends: 1 Dec 2026, 19:30');
    const pointLines = text.filter((l) => /^[ABC]-\d/.test(l));
    expect(pointLines).toEqual(['B-2  blocked  Open fault on point B-2: Sling frayed at the basket', 'C-3  expiring  cleared until 5 Dec 2026, 10:00', 'A-1  cleared']);
    expect(text).toContain(`${APP_URL}/today`);

    expect((await rows({ kind: 'reminder' })).map((r) => [r.unique_key, r.state])).toEqual([
      [expect.stringMatching(/^reminder:\d+:2026-12-01T18:00:00.000Z:24$/), 'sent'],
      [expect.stringMatching(/^reminder:\d+:2026-12-01T18:00:00.000Z:2$/), 'sent'],
    ]);
  });

  it('sends exactly one reminder at once for a class booked 100 minutes ahead, never one per missed lead time', async () => {
    const s = await studio();
    const a = await point(s, 'A-1', '2026-11-29T10:00:00Z');
    await book(s, new Date(ctx.clock.now().getTime() + 100 * MINUTE).toISOString(), [a.id]);
    const w = worker();
    await w.runOnce();
    expect(received()).toHaveLength(1);
    expect(received()[0].subject).toBe('Reminder: Silks Foundations at 11:40 in Main Hall');
    expect(linesOf(received()[0].text)).toContain('A-1  cleared');

    const states = Object.fromEntries((await rows({ kind: 'reminder' })).map((r) => [String(r.unique_key).split(':').pop(), r.state]));
    expect(states).toEqual({ '2': 'sent', '24': 'skipped' });

    ctx.clock.advance(30 * MINUTE);
    await w.runOnce();
    ctx.clock.advance(65 * MINUTE);
    await w.runOnce();
    expect(received()).toHaveLength(1);
  });

  it('sends one reminder at once for the new time when a session is moved after its reminder moments', async () => {
    const s = await studio();
    const a = await point(s, 'A-1', '2026-11-29T10:00:00Z');
    const id = await book(s, '2026-12-01T18:00:00Z', [a.id]);
    ctx.clock.set('2026-11-30T18:00:00Z');
    const w = worker();
    await w.runOnce();
    expect(received()).toHaveLength(1);
    // Moved on the day to 11:00, an hour ahead: both of the new start's moments have passed.
    ctx.clock.set('2026-12-01T10:00:00Z');
    await ctx.db('sessions').where({ id }).update({ starts_at: '2026-12-01T11:00:00.000Z', ends_at: '2026-12-01T12:00:00.000Z' });
    await w.runOnce();
    await w.runOnce();
    expect(received().map((m) => m.subject)).toEqual(['Reminder: Silks Foundations on Tue 1 Dec at 18:00 in Main Hall', 'Reminder: Silks Foundations at 11:00 in Main Hall']);
  });

  it('does not resend when the worker runs again or a second worker starts after a restart', async () => {
    const s = await studio();
    const a = await point(s, 'A-1', '2026-11-29T10:00:00Z');
    await book(s, '2026-12-01T11:00:00Z', [a.id]);
    const first = worker();
    await first.runOnce();
    await first.runOnce();
    await first.stop();
    expect(received()).toHaveLength(1);

    // The process restarts: a new worker, a new SMTP connection, the same database.
    const second = worker(newMailer(fake.url));
    await second.runOnce();
    ctx.clock.advance(10 * MINUTE);
    await second.runOnce();
    expect(received()).toHaveLength(1);
    expect(await rows({ state: 'sent' })).toHaveLength(1);
  });

  it('retries a message a crashed worker had claimed, once its lease runs out', async () => {
    const outbox = outboxService({ db: ctx.db, clock: ctx.clock, studio: studioRepository(ctx.db), appUrl: APP_URL });
    await outbox.enqueue(ctx.db, { kind: 'digest', uniqueKey: 'test:crash', to: ['someone@example.test'], subject: 'Hello', text: 'Body', html: '<p>Body</p>' });
    // A worker claims it and dies before sending.
    const claimed = await outboxRepository(ctx.db).claimDue(ctx.clock.now(), 10, LEASE_MS);
    expect(claimed.map((m) => m.uniqueKey)).toEqual(['test:crash']);

    const w = worker();
    await w.runOnce();
    expect(received()).toHaveLength(0); // still leased to the dead worker
    ctx.clock.advance(LEASE_MS);
    await w.runOnce();
    await w.runOnce();
    expect(received().map((m) => m.subject)).toEqual(['Hello']);
  });

  it('sends a message again under the same Message-ID when a crash came between the SMTP server taking it and the row being marked sent', async () => {
    const outbox = outboxService({ db: ctx.db, clock: ctx.clock, studio: studioRepository(ctx.db), appUrl: APP_URL });
    await outbox.enqueue(ctx.db, { kind: 'digest', uniqueKey: 'test:twice', to: ['someone@example.test'], subject: 'Hello', text: 'Body', html: '<p>Body</p>' });
    await outbox.enqueue(ctx.db, { kind: 'digest', uniqueKey: 'test:other', to: ['someone@example.test'], subject: 'Other', text: 'Body', html: '<p>Body</p>' });
    const w = worker();
    await w.runOnce();
    const [twice, other] = await rows();
    // The row as a worker killed right after the SMTP reply leaves it: still `sending`, under its lease.
    await ctx.db('outbox_messages').where({ id: twice.id }).update({ state: 'sending', sent_at: null, lease_until: new Date(ctx.clock.now().getTime() + LEASE_MS).toISOString() });
    ctx.clock.advance(LEASE_MS);
    await w.runOnce();

    const id = outboxMessageId({ id: twice.id, uniqueKey: 'test:twice' }, APP_URL);
    expect(id).toMatch(/^<outbox\.\d+\.[0-9a-f]{16}@127\.0\.0\.1>$/);
    expect(received().map((m) => [m.subject, m.messageId])).toEqual([
      ['Hello', id],
      ['Other', outboxMessageId({ id: other.id, uniqueKey: 'test:other' }, APP_URL)],
      ['Hello', id],
    ]);
    expect(new Set(received().map((m) => m.messageId)).size).toBe(2);
    // A restart on another port keeps it.
    expect(outboxMessageId({ id: twice.id, uniqueKey: 'test:twice' }, 'http://127.0.0.1:4123')).toBe(id);
  });

  it('keeps a message queued with its attempts and error while the SMTP server is down, and sends it once it is back', async () => {
    const s = await studio();
    const a = await point(s, 'A-1', '2026-11-29T10:00:00Z');
    await book(s, '2026-12-01T11:40:00Z', [a.id]);
    const smtp = await smtpDown();

    // Its first cycle runs as it starts; runOnce waits for it and runs another.
    const w = worker();
    await w.runOnce();
    let [row] = await rows({ kind: 'reminder', state: 'queued' });
    expect(row).toMatchObject({ attempts: 1, next_attempt_at: '2026-12-01T10:00:30.000Z' });
    expect(row.last_error).toMatch(/ECONNREFUSED|connect/i);

    // Not tried again before its back-off.
    await w.runOnce();
    [row] = await rows({ id: row.id });
    expect(row.attempts).toBe(1);

    // The server comes back on the same port.
    const back = await smtp.back();
    ctx.clock.advance(retryDelayMs(1));
    const up = await w.runOnce();
    expect(up.sent).toBe(1);
    expect(received(back)).toHaveLength(1);
    expect(received(back)[0].subject).toContain('Reminder: Silks Foundations');
    [row] = await rows({ id: row.id });
    expect(row).toMatchObject({ state: 'sent', attempts: 1, last_error: null });
    await w.runOnce();
    expect(received(back)).toHaveLength(1);
  });

  it('keeps trying a reminder through a 2-hour SMTP outage and delivers it once SMTP is back, before its class', async () => {
    const s = await studio();
    const a = await point(s, 'A-1', '2026-11-29T10:00:00Z');
    const classStart = new Date('2026-12-01T12:30:00Z');
    await book(s, classStart.toISOString(), [a.id]);
    const smtp = await smtpDown();
    const w = worker();
    // Two hours without a mail server, the worker running every minute.
    const end = new Date('2026-12-01T12:00:00Z').getTime();
    while (ctx.clock.now().getTime() < end) {
      await w.runOnce();
      ctx.clock.advance(MINUTE);
    }
    expect(await rows({ kind: 'reminder', state: 'failed' })).toEqual([]);
    const waiting = await rows({ kind: 'reminder', state: 'queued' });
    expect(waiting.length).toBeGreaterThan(0);
    expect(waiting.every((r) => r.attempts > 8)).toBe(true);

    const back = await smtp.back();
    while ((await rows({ kind: 'reminder', state: 'queued' })).length && ctx.clock.now() < classStart) {
      await w.runOnce();
      ctx.clock.advance(MINUTE);
    }
    // Every reminder that waited is delivered within the capped back-off of the server's return, before the class.
    const reminders = await rows({ kind: 'reminder' });
    expect(reminders.filter((r) => r.state !== 'skipped').map((r) => r.state)).toEqual(waiting.map(() => 'sent'));
    expect(received(back)).toHaveLength(waiting.length);
    expect(received(back).every((m) => m.subject.includes('Reminder: Silks Foundations'))).toBe(true);
    expect(reminders.every((r) => r.state === 'skipped' || new Date(r.sent_at).getTime() <= end + MAX_DELAY_MS)).toBe(true);
    expect(ctx.clock.now().getTime()).toBeLessThan(classStart.getTime());
  });

  it('gives a reminder up only when its class begins before the next try; the owner sees it failed on GET /api/outbox', async () => {
    const s = await studio();
    const a = await point(s, 'A-1', '2026-11-29T10:00:00Z');
    const classStart = '2026-12-01T11:50:00Z';
    await book(s, classStart, [a.id]);
    await fake.close();
    const w = worker();
    for (let attempt = 1; attempt <= 100; attempt++) {
      await w.runOnce();
      if ((await rows({ kind: 'reminder', state: 'failed' })).length) break;
      ctx.clock.advance(retryDelayMs(attempt));
    }
    const [row] = await rows({ kind: 'reminder', state: 'failed' });
    expect(row.attempts).toBeGreaterThan(8);
    expect(row.next_attempt_at >= new Date(classStart).toISOString()).toBe(true);
    await w.runOnce();
    expect((await rows({ id: row.id }))[0].attempts).toBe(row.attempts);

    const owner = await as(ctx, 'owner');
    const res = await owner.get('/api/outbox?state=failed');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ items: [expect.objectContaining({ id: row.id, kind: 'reminder', state: 'failed', attempts: row.attempts, to: [s.instructor.email], lastError: expect.any(String) })], nextCursor: null });
    expect(res.body.items[0]).not.toHaveProperty('html');
    expect((await owner.get('/api/outbox?state=nonsense')).status).toBe(400);
    const desk = await as(ctx, 'reception');
    expect((await desk.get('/api/outbox')).status).toBe(403);
  });

  it('gives a message with no class of its own MAX_ATTEMPTS tries, then the owner sends it again from the mailbox (audited)', async () => {
    const s = await studio();
    const a = await point(s, 'A-1', '2026-11-29T10:00:00Z');
    await book(s, '2026-12-03T18:00:00Z', [a.id]);
    const outbox = outboxService({ db: ctx.db, clock: ctx.clock, studio: studioRepository(ctx.db), appUrl: APP_URL });
    await ctx.db.transaction((trx) => outbox.enqueue(trx, { kind: 'digest', uniqueKey: 'digest:test', to: ['rigger@mail.test'], subject: 'Rigging digest', text: 'Nothing due', html: '<p>Nothing due</p>' }));
    const [digest] = await rows({ kind: 'digest' });
    await fake.close();
    const w = worker();
    for (let attempt = 1; attempt <= MAX_ATTEMPTS; attempt++) {
      await w.runOnce();
      ctx.clock.advance(retryDelayMs(attempt));
    }
    expect((await rows({ id: digest.id }))[0]).toMatchObject({ state: 'failed', attempts: MAX_ATTEMPTS });

    const owner = await as(ctx, 'owner');
    const desk = await as(ctx, 'reception');
    expect((await desk.post(`/api/outbox/${digest.id}/resend`)).status).toBe(403);
    const again = await owner.post(`/api/outbox/${digest.id}/resend`);
    expect(again.status).toBe(200);
    expect(again.body).toMatchObject({ id: digest.id, state: 'queued', attempts: 0 });
    expect((await owner.post(`/api/outbox/${digest.id}/resend`)).body.error.code).toBe('not_failed');
    expect(await ctx.db('audit_entries').where({ action: 'outbox.resent', entity_id: digest.id }).count({ n: '*' })).toEqual([{ n: 1 }]);

    const back = await newFake(fake.port);
    await w.runOnce();
    expect(received(back).map((m) => m.subject)).toContain('Rigging digest');
    expect((await rows({ id: digest.id }))[0].state).toBe('sent');
  });

  it('keeps no sign-in link in the outbox once it has gone out or failed for good, and will not send a failed one again', async () => {
    const outbox = outboxService({ db: ctx.db, clock: ctx.clock, studio: studioRepository(ctx.db), appUrl: APP_URL });
    const link = `${APP_URL}/auth/callback/nodemailer?token=secret-token-1&email=s%40mail.test`;
    const mail = (n: number) => ({ kind: 'sign_in_link' as const, uniqueKey: `sign_in_link:${n}`, to: ['s@mail.test'], subject: 'Your sign-in link', text: `Sign in: ${link}`, html: `<a href="${link}">Sign in</a>` });
    await ctx.db.transaction((trx) => outbox.enqueue(trx, mail(1)));
    await ctx.db.transaction((trx) => outbox.enqueue(trx, { kind: 'digest', uniqueKey: 'digest:kept', to: ['r@mail.test'], subject: 'Rigging digest', text: 'Nothing due', html: '<p>Nothing due</p>' }));
    const w = worker();
    await w.runOnce();
    // The student got the link; the row that sent it no longer holds it. Other mail keeps its body.
    expect(received(fake).find((m) => m.subject === 'Your sign-in link')?.text).toContain('secret-token-1');
    const [sent] = await rows({ kind: 'sign_in_link' });
    expect(sent.state).toBe('sent');
    expect(`${sent.text_body}${sent.html_body}`).not.toContain('secret-token-1');
    expect((await rows({ kind: 'digest' }))[0].text_body).toBe('Nothing due');

    await ctx.db.transaction((trx) => outbox.enqueue(trx, mail(2)));
    await fake.close();
    for (let attempt = 1; attempt <= MAX_ATTEMPTS; attempt++) {
      await w.runOnce();
      ctx.clock.advance(retryDelayMs(attempt));
    }
    const failed = (await rows({ kind: 'sign_in_link' })).find((r) => r.state === 'failed')!;
    expect(`${failed.text_body}${failed.html_body}`).not.toContain('secret-token-1');
    const owner = await as(ctx, 'owner');
    const again = await owner.post(`/api/outbox/${failed.id}/resend`);
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('ask_for_new_link');
  });

  it('writes a waiting reminder afresh as it goes out: a fault reported meanwhile and a new instructor', async () => {
    const s = await studio();
    const a = await point(s, 'A-1', '2026-11-29T10:00:00Z');
    const id = await book(s, '2026-12-01T11:40:00Z', [a.id]);
    const smtp = await smtpDown();
    const w = worker();
    await w.runOnce();
    const [queued] = await rows({ kind: 'reminder', state: 'queued' });
    expect(queued.text_body).not.toMatch(/open fault/i);

    // While the SMTP server is down, the point gets a fault and the class another instructor.
    await openFault({ pointId: a.id, description: 'Beam clamp bolt loose' });
    const other = await makeUser(ctx.db, { role: 'instructor', name: 'Bea Cover' });
    await ctx.db('sessions').where({ id }).update({ instructor_id: other.id });

    const back = await smtp.back();
    ctx.clock.advance(retryDelayMs(1));
    expect((await w.runOnce()).sent).toBe(1);
    const [mail] = received(back);
    expect(mail.to).toEqual([other.email]);
    expect(mail.text).toMatch(/A-1[\s\S]*blocked/i);
    expect(mail.text).toContain('Beam clamp bolt loose');
    // The row says what was sent, under the Message-ID it had all along.
    const [row] = await rows({ id: queued.id });
    expect(row).toMatchObject({ state: 'sent', recipients_json: JSON.stringify([other.email]) });
    expect(row.text_body).toBe(mail.text);
    expect(mail.messageId).toBe(outboxMessageId({ id: queued.id, uniqueKey: queued.unique_key }, APP_URL));
  });

  it('drops a waiting reminder whose instructor was deactivated', async () => {
    const s = await studio();
    const a = await point(s, 'A-1', '2026-11-29T10:00:00Z');
    await book(s, '2026-12-01T11:40:00Z', [a.id]);
    const smtp = await smtpDown();
    const w = worker();
    await w.runOnce();
    await ctx.db('users').where({ id: s.instructor.id }).update({ active: false });
    const back = await smtp.back();
    ctx.clock.advance(retryDelayMs(1));
    expect((await w.runOnce()).dropped).toBe(1);
    expect(received(back)).toHaveLength(0);
  });

  it('drops a queued reminder whose session was cancelled before it could go out', async () => {
    const s = await studio();
    const a = await point(s, 'A-1', '2026-11-29T10:00:00Z');
    const id = await book(s, '2026-12-01T11:00:00Z', [a.id]);
    const smtp = await smtpDown();
    const w = worker();
    await w.runOnce();
    await ctx.db('sessions').where({ id }).update({ cancelled: true });
    const back = await smtp.back();
    ctx.clock.advance(HOUR / 2);
    const summary = await w.runOnce();
    expect(summary.dropped).toBe(1);
    expect(received(back)).toHaveLength(0);
    expect((await rows({ kind: 'reminder', state: 'skipped' })).map((r) => r.last_error)).toContain('Not sent: the session was cancelled.');
  });
});

describe('at-risk alerts', () => {
  it('writes a waiting at-risk alert afresh as it goes out: every point in trouble now, to those active now', async () => {
    const s = await studio();
    const desk = await makeUser(ctx.db, { role: 'reception' });
    const rigger = await makeUser(ctx.db, { role: 'rigger' });
    const a = await point(s, 'A-1', '2026-11-29T10:00:00Z');
    const b = await point(s, 'B-1', '2026-11-29T10:00:00Z');
    await book(s, '2026-12-03T18:00:00Z', [a.id, b.id]);
    const smtp = await smtpDown();
    const w = worker();
    await w.runOnce();
    await openFault({ pointId: a.id, description: 'Clamp bolt loose' });
    expect((await w.runOnce()).atRiskAlerts).toBe(1);
    const [queued] = await rows({ kind: 'at_risk', state: 'queued' });
    expect(queued.text_body).not.toContain('Sling frayed');

    // While the SMTP server is down, a second point gets a fault and the rigger leaves.
    await openFault({ pointId: b.id, description: 'Sling frayed' });
    await ctx.db('users').where({ id: rigger.id }).update({ active: false });
    const back = await smtp.back();
    ctx.clock.advance(retryDelayMs(1));
    expect((await w.runOnce()).sent).toBe(1);
    const [mail] = received(back);
    expect(mail.to).toEqual([desk.email]);
    expect(mail.text).toContain('Clamp bolt loose');
    expect(mail.text).toContain('Sling frayed');
    expect((await rows({ id: queued.id }))[0]).toMatchObject({ state: 'sent', recipients_json: JSON.stringify([desk.email]) });
  });

  it('alerts active reception and riggers within one cycle of a fault on a booked point’s gear, once, and again on a relapse', async () => {
    const s = await studio();
    const desk = await makeUser(ctx.db, { role: 'reception' });
    const rigger = await makeUser(ctx.db, { role: 'rigger' });
    await makeUser(ctx.db, { role: 'reception', active: false });
    const a = await point(s, 'A-1', '2026-11-29T10:00:00Z');
    const sessionId = await book(s, '2026-12-03T18:00:00Z', [a.id]);
    const w = worker();
    await w.runOnce();
    expect(received()).toHaveLength(0);

    const swivel = a.gear[3];
    const faultId = await openFault({ gearId: swivel, description: 'Bearing grinds' });
    const summary = await w.runOnce();
    expect(summary.atRiskAlerts).toBe(1);
    const mail = received();
    expect(mail).toHaveLength(1);
    expect(mail[0].to.sort()).toEqual([desk.email, rigger.email].sort());
    expect(mail[0].subject).toBe('At risk: Silks Foundations on Thu 3 Dec at 18:00 in Main Hall');
    expect(mail[0].text).toMatch(/^A-1 {2}Point A-1: Open fault on swivel .+: Bearing grinds$/m);
    expect(mail[0].text).toContain(`${APP_URL}/schedule`);
    expect((await ctx.db('sessions').where({ id: sessionId }).first()).at_risk, 'a boolean column: 1 on SQLite, true on PostgreSQL').toBeTruthy();

    await w.runOnce();
    expect(received()).toHaveLength(1);

    // Resolved: no longer at risk, no mail. A new fault later alerts again.
    await ctx.db('faults').where({ id: faultId }).update({ status: 'resolved' });
    expect((await w.runOnce()).atRiskCleared).toBe(1);
    expect((await ctx.db('sessions').where({ id: sessionId }).first()).at_risk, 'a boolean column: 0 on SQLite, false on PostgreSQL').toBeFalsy();
    await openFault({ pointId: a.id, description: 'Clamp bolt loose' });
    await w.runOnce();
    expect(received()).toHaveLength(2);
    expect(received()[1].text).toContain('Clamp bolt loose');
    // The count of alerts for this class and start, then the points the alert is about.
    expect((await rows({ kind: 'at_risk' })).map((r) => String(r.unique_key).split(':cause:'))).toEqual([[expect.stringMatching(/:1$/), String(a.id)], [expect.stringMatching(/:2$/), String(a.id)]]);
  });
});

describe('at-risk alerts, one per cause', () => {
  const weekly = async (s: Studio, first: string, pointIds: number[], weeks: number) => {
    const ids = [];
    for (let w = 0; w < weeks; w++) ids.push(await book(s, new Date(new Date(first).getTime() + w * 7 * 24 * HOUR).toISOString(), pointIds));
    return ids;
  };

  it('sends one alert per recipient for one fault under a weekly class, listing every date', async () => {
    const s = await studio();
    const desk = await makeUser(ctx.db, { role: 'reception' });
    const rigger = await makeUser(ctx.db, { role: 'rigger' });
    const a = await point(s, 'A-1', '2026-11-29T10:00:00Z');
    const ids = await weekly(s, '2026-12-03T18:00:00Z', [a.id], 5);
    const w = worker();
    await w.runOnce();
    await openFault({ gearId: a.gear[3], description: 'Bearing grinds' });
    const summary = await w.runOnce();
    expect(summary.atRiskAlerts).toBe(1);
    // (The rigger's morning digest goes out in the same cycle; it is not an alert.)
    const alerts = () => received().filter((m) => m.subject.startsWith('At risk'));
    const mail = alerts();
    expect(mail).toHaveLength(1);
    expect(mail[0].to.sort()).toEqual([desk.email, rigger.email].sort());
    expect(mail[0].subject).toBe('At risk: Silks Foundations in Main Hall, 5 classes from Thu 3 Dec');
    for (const day of ['Thu 3 Dec', 'Thu 10 Dec', 'Thu 17 Dec', 'Thu 24 Dec', 'Thu 31 Dec']) expect(linesOf(mail[0].text)).toContain(`${day} 18:00–19:00  Silks Foundations, Main Hall, Ada Instructor`);
    expect(mail[0].text.match(/Bearing grinds/g)).toHaveLength(1);
    // Every date is flagged, so the next cycle says nothing more.
    expect((await ctx.db('sessions').whereIn('id', ids).select('at_risk')).every((r) => Boolean(r.at_risk))).toBe(true);
    await w.runOnce();
    expect(alerts()).toHaveLength(1);
  });

  it('sends one alert per cause: a fault under one weekly class and a failed check under another make two, not one per date', async () => {
    const s = await studio();
    const desk = await makeUser(ctx.db, { role: 'reception' });
    const a = await point(s, 'A-1', '2026-11-29T10:00:00Z');
    const b = await point(s, 'B-1', '2026-11-29T10:00:00Z');
    await weekly(s, '2026-12-03T18:00:00Z', [a.id], 4);
    await weekly(s, '2026-12-04T18:00:00Z', [b.id], 4);
    const w = worker();
    await w.runOnce();
    await openFault({ pointId: a.id, description: 'Clamp bolt loose' });
    await openFault({ pointId: b.id, description: 'Pre-use check failed: sling sheath cut' });
    await w.runOnce();
    const mail = received();
    expect(mail).toHaveLength(2);
    expect(mail.every((m) => m.to.join() === desk.email)).toBe(true);
    expect(mail.map((m) => m.subject).sort()).toEqual(['At risk: Silks Foundations in Main Hall, 4 classes from Fri 4 Dec', 'At risk: Silks Foundations in Main Hall, 4 classes from Thu 3 Dec']);
  });

  it('still sends a waiting grouped alert when its first class is cancelled meanwhile, listing the classes still at risk', async () => {
    const s = await studio();
    await makeUser(ctx.db, { role: 'reception' });
    const a = await point(s, 'A-1', '2026-11-29T10:00:00Z');
    const [first] = await weekly(s, '2026-12-03T18:00:00Z', [a.id], 3);
    const smtp = await smtpDown();
    const w = worker();
    await openFault({ pointId: a.id, description: 'Clamp bolt loose' });
    await w.runOnce();
    await ctx.db('sessions').where({ id: first }).update({ cancelled: true });
    const back = await smtp.back();
    ctx.clock.advance(retryDelayMs(1));
    expect((await w.runOnce()).sent).toBe(1);
    const [mail] = received(back);
    expect(mail.subject).toBe('At risk: Silks Foundations in Main Hall, 2 classes from Thu 10 Dec');
    expect(mail.text).not.toContain('Thu 3 Dec');
  });
});

describe('a fault reported through the API reaches the riggers', () => {
  it('tells the riggers of a fault on a point with no booked class, which raises no at-risk alert', async () => {
    const s = await studio();
    const rigger = await makeUser(ctx.db, { role: 'rigger', name: 'Rory Rigger' });
    await makeUser(ctx.db, { role: 'rigger', active: false });
    const a = await point(s, 'A-1', '2026-11-29T10:00:00Z');
    const instructor = await as(ctx, 'instructor', { name: 'Ivy Instructor' });
    expect((await instructor.post('/api/faults').send({ pointId: a.id, severity: 'medium', description: 'Sling sheath cut' })).status).toBe(201);
    const summary = await worker().runOnce();
    expect(summary.atRiskAlerts).toBe(0);
    const notices = received().filter((m) => m.subject.startsWith('Fault'));
    expect(notices).toHaveLength(1);
    expect(notices[0].to).toEqual([rigger.email]);
    expect(notices[0].subject).toBe('Fault on point A-1 (Main Hall): Sling sheath cut');
    expect(linesOf(notices[0].text)).toContain('Reported by: Ivy Instructor');
    expect(notices[0].text).toContain('No booked class uses this point');
  });

  it('tells the riggers of a high-severity fault even when booked classes raise an at-risk alert too; a medium one is left to the alert', async () => {
    const s = await studio();
    const rigger = await makeUser(ctx.db, { role: 'rigger' });
    const desk = await makeUser(ctx.db, { role: 'reception' });
    const a = await point(s, 'A-1', '2026-11-29T10:00:00Z');
    const b = await point(s, 'B-1', '2026-11-29T10:00:00Z');
    await book(s, '2026-12-03T18:00:00Z', [a.id]);
    await book(s, '2026-12-04T18:00:00Z', [b.id]);
    const instructor = await as(ctx, 'instructor');
    await instructor.post('/api/faults').send({ gearId: a.gear[3], severity: 'high', description: 'Swivel seized' });
    await instructor.post('/api/faults').send({ pointId: b.id, severity: 'medium', description: 'Paint flaking on beam' });
    await worker().runOnce();
    const subjects = received().map((m) => `${m.to.sort().join(',')} ${m.subject}`);
    expect(subjects.filter((x) => x.includes('Fault'))).toEqual([expect.stringMatching(new RegExp(`^${rigger.email} Fault \\(high severity\\) on point A-1 \\(Main Hall\\): Swivel seized$`))]);
    expect(subjects.filter((x) => x.includes('At risk'))).toHaveLength(2);
    expect(subjects.filter((x) => x.includes('At risk')).every((x) => x.startsWith([desk.email, rigger.email].sort().join(',')))).toBe(true);
  });
});

describe('daily digest', () => {
  it('goes once per studio day from 07:00 to riggers, not to those who opted out, listing what comes due', async () => {
    const s = await studio();
    const rigger = await makeUser(ctx.db, { role: 'rigger', name: 'Rita Rigger' });
    const optedOut = await makeUser(ctx.db, { role: 'rigger' });
    await ctx.db('users').where({ id: optedOut.id }).update({ digest_opt_out: true });
    await makeUser(ctx.db, { role: 'rigger', active: false });
    const c = await point(s, 'C-3', '2026-11-05T10:00:00Z'); // cleared until 5 Dec
    await book(s, '2026-12-10T18:00:00Z', [c.id]); // booked past that clearance
    const old = await makeGear(ctx.db, { kind: 'round_sling', material: 'polyester', serial: 'RS-OLD-1' });
    await ctx.db('gear_items').where({ id: old }).update({ manufactured_on: '2016-12-04', service_life_years: 10 });

    ctx.clock.set('2026-12-01T06:59:00Z');
    const w = worker();
    await w.runOnce();
    expect(received()).toHaveLength(0);

    ctx.clock.set('2026-12-01T07:00:00Z');
    await w.runOnce();
    ctx.clock.set('2026-12-01T21:00:00Z');
    await w.runOnce();
    let mail = received();
    expect(mail).toHaveLength(1);
    expect(mail[0].to).toEqual([rigger.email]);
    expect(mail[0].subject).toBe('Rig digest for 1 Dec 2026: 1 point expiring, 1 booking past clearance, 1 gear item at end of life');
    expect(mail[0].text).toContain('C-3 (Main Hall)  cleared until 5 Dec 2026, 10:00');
    expect(mail[0].text).toContain('Silks Foundations, 10 Dec 2026, 18:00, Main Hall  point C-3 is cleared only until 5 Dec 2026, 10:00');
    expect(mail[0].text).toContain('round sling RS-OLD-1  service life ends 4 Dec 2026');

    // A second worker the same day sends nothing; the next day's goes out once.
    await worker(newMailer(fake.url)).runOnce();
    ctx.clock.set('2026-12-02T07:05:00Z');
    await w.runOnce();
    await w.runOnce();
    mail = received();
    expect(mail.map((m) => m.subject.slice(0, 25))).toEqual(['Rig digest for 1 Dec 2026', 'Rig digest for 2 Dec 2026']);
    expect(mail.every((m) => m.to.join() === rigger.email)).toBe(true);
    expect((await rows({ kind: 'digest' })).map((r) => r.unique_key)).toEqual([`digest:${rigger.id}:2026-12-01`, `digest:${rigger.id}:2026-12-02`]);
  });

  it('lists the points awaiting a rigger’s clearance and every open fault, newest first, and counts them in the subject', async () => {
    const s = await studio();
    const rigger = await as(ctx, 'rigger', { name: 'Rita Rigger' });
    const voided = await point(s, 'V-1', '2026-11-28T10:00:00Z');
    const faulted = await point(s, 'F-2', '2026-11-28T10:00:00Z');
    const spare = await makeGear(ctx.db, { kind: 'carabiner', serial: 'CS-SPARE-9' });
    // A new structural rating voids V-1's clearance; F-2 gets an open fault, a spare item another.
    expect((await rigger.patch(`/api/points/${voided.id}`).send({ structuralRatingKn: 25 })).status).toBe(200);
    expect((await rigger.post('/api/faults').send({ pointId: faulted.id, severity: 'medium', description: 'Sling rubbing on the beam edge' })).status).toBe(201);
    ctx.clock.set('2026-12-01T10:05:00Z');
    expect((await rigger.post('/api/faults').send({ gearId: spare, severity: 'low', description: 'Gate sticks when wet' })).status).toBe(201);

    ctx.clock.set('2026-12-01T11:00:00Z');
    await worker().runOnce();
    const digest = received().filter((m) => m.subject.startsWith('Rig digest'));
    expect(digest).toHaveLength(1);
    expect(digest[0].to).toEqual([rigger.user.email]);
    // The fault voided F-2's clearance as well, so both points await a rigger.
    expect(digest[0].subject).toBe('Rig digest for 1 Dec 2026: 2 points awaiting clearance, 2 open faults');
    const text = linesOf(digest[0].text);
    const awaiting = text.indexOf('Points awaiting a rigger’s clearance:');
    expect(text.slice(awaiting + 1, awaiting + 3)).toEqual(['F-2 (Main Hall)  clearance voided 1 Dec 2026, 10:00', 'V-1 (Main Hall)  clearance voided 1 Dec 2026, 10:00']);
    expect(text).toContain('Open faults:');
    const faults = text.slice(text.indexOf('Open faults:') + 1, text.indexOf('Open faults:') + 3);
    expect(faults).toEqual([
      'Carabiner CS-SPARE-9 (in stock), low severity  Gate sticks when wet; reported 1 Dec 2026, 10:05',
      'Point F-2 (Main Hall), medium severity  Sling rubbing on the beam edge; reported 1 Dec 2026, 10:00',
    ]);
    expect(digest[0].html).toContain('Points awaiting a rigger’s clearance');
    expect(digest[0].html).toContain('Gate sticks when wet');
  });

  it('records a day with nothing due as skipped instead of mailing it', async () => {
    const rigger = await makeUser(ctx.db, { role: 'rigger' });
    await worker().runOnce();
    expect(received()).toHaveLength(0);
    expect(await rows({ kind: 'digest' })).toEqual([expect.objectContaining({ unique_key: `digest:${rigger.id}:2026-12-01`, state: 'skipped' })]);
  });
});

describe('instructor told of changes (outbox.notifySessionChange)', () => {
  it('queues the message in the caller’s transaction: a move is told with the old and new times, a rolled-back change tells nothing', async () => {
    const s = await studio();
    const a = await point(s, 'A-1', '2026-11-29T10:00:00Z');
    const id = await book(s, '2026-12-05T18:00:00Z', [a.id]);
    const outbox = outboxService({ db: ctx.db, clock: ctx.clock, studio: studioRepository(ctx.db), appUrl: APP_URL });
    const before = { startsAt: '2026-12-05T18:00:00.000Z', endsAt: '2026-12-05T19:00:00.000Z', instructorId: s.instructor.id, pointIds: [a.id] };

    await expect(
      ctx.db.transaction(async (trx) => {
        await trx('sessions').where({ id }).update({ starts_at: '2026-12-06T18:00:00.000Z', ends_at: '2026-12-06T19:00:00.000Z' });
        await outbox.notifySessionChange(trx, { kind: 'moved', sessionId: id, before });
        throw new Error('the change fails after all');
      }),
    ).rejects.toThrow();
    expect(await rows()).toHaveLength(0);

    await ctx.db.transaction(async (trx) => {
      await trx('sessions').where({ id }).update({ starts_at: '2026-12-06T18:00:00.000Z', ends_at: '2026-12-06T19:00:00.000Z' });
      expect(await outbox.notifySessionChange(trx, { kind: 'moved', sessionId: id, before })).toBe(1);
    });
    await ctx.db.transaction(async (trx) => {
      await trx('sessions').where({ id }).update({ cancelled: true, cancel_reason: 'Roof repairs' });
      await outbox.sessionChanged(trx, { kind: 'cancelled', sessionId: id, before: { ...before, startsAt: '2026-12-06T18:00:00.000Z', endsAt: '2026-12-06T19:00:00.000Z' } });
    });
    // A move is told once its undo window has passed.
    ctx.clock.advance(UNDO_WINDOW_MS);
    await worker().runOnce();
    const mail = received();
    expect(mail.map((m) => m.subject)).toEqual(['Moved: Silks Foundations is now on Sun 6 Dec at 18:00 (was Sat 5 Dec at 18:00)', 'Cancelled: Silks Foundations on Sun 6 Dec at 18:00']);
    expect(mail.every((m) => m.to.join() === s.instructor.email)).toBe(true);
    expect(linesOf(mail[0].text)).toContain('A-1  cleared');
    expect(linesOf(mail[1].text)).toContain('Reason: Roof repairs');
    expect((await rows())[0].unique_key).toMatch(new RegExp(`^change:${id}:moved:2026-12-01T10:00:00.000Z:`));
  });

  it('tells both instructors when the class changes hands, and names the points before a swap', async () => {
    const s = await studio();
    const a = await point(s, 'A-1', '2026-11-29T10:00:00Z');
    const b = await point(s, 'B-2', '2026-11-29T10:00:00Z');
    const id = await book(s, '2026-12-05T18:00:00Z', [a.id]);
    const next = await makeUser(ctx.db, { role: 'instructor', name: 'Bea Instructor' });
    const outbox = outboxService({ db: ctx.db, clock: ctx.clock, studio: studioRepository(ctx.db), appUrl: APP_URL });
    const before = { startsAt: '2026-12-05T18:00:00.000Z', endsAt: '2026-12-05T19:00:00.000Z', instructorId: s.instructor.id, pointIds: [a.id] };
    await ctx.db.transaction(async (trx) => {
      await trx('session_points').where({ session_id: id }).delete();
      await trx('session_points').insert({ session_id: id, point_id: b.id, starts_at: before.startsAt, ends_at: before.endsAt, cancelled: false });
      await outbox.notifySessionChange(trx, { kind: 'points_swapped', sessionId: id, before });
      await trx('sessions').where({ id }).update({ instructor_id: next.id });
      expect(await outbox.notifySessionChange(trx, { kind: 'instructor_changed', sessionId: id, before })).toBe(2);
    });
    await worker().runOnce();
    const bySubject = Object.fromEntries(received().map((m) => [m.subject, m]));
    expect(Object.keys(bySubject).sort()).toEqual(['Points changed: Silks Foundations on Sat 5 Dec at 18:00', 'You no longer teach Silks Foundations on Sat 5 Dec at 18:00', 'You now teach Silks Foundations on Sat 5 Dec at 18:00'].sort());
    const swap = bySubject['Points changed: Silks Foundations on Sat 5 Dec at 18:00'];
    expect(swap.to).toEqual([s.instructor.email]);
    expect(linesOf(swap.text)).toContain('Points before: A-1');
    expect(linesOf(swap.text)).toContain('B-2  cleared');
    expect(bySubject['You now teach Silks Foundations on Sat 5 Dec at 18:00'].to).toEqual([next.email]);
    expect(bySubject['You no longer teach Silks Foundations on Sat 5 Dec at 18:00'].to).toEqual([s.instructor.email]);
  });
});

describe('a move undone within the undo window (the desk’s Undo after a drag)', () => {
  async function movedClass() {
    const s = await studio();
    const a = await point(s, 'A-1', '2026-11-29T10:00:00Z');
    const desk = await as(ctx, 'reception');
    const [ct] = [s.classTypeId];
    const res = await desk.post('/api/sessions').send({ classTypeId: ct, instructorId: s.instructor.id, roomId: s.roomId, pointIds: [a.id], startsAt: '2026-12-05T18:00:00Z', endsAt: '2026-12-05T19:00:00Z' });
    expect(res.status).toBe(201);
    return { s, desk, id: res.body.id as number };
  }
  const moves = () => received().filter((m) => m.subject.startsWith('Moved'));

  it('sends no “Moved” e-mail when the class is moved back within the window', async () => {
    const { desk, id } = await movedClass();
    const w = worker();
    expect((await desk.patch(`/api/sessions/${id}`).send({ startsAt: '2026-12-05T20:00:00Z', endsAt: '2026-12-05T21:00:00Z' })).status).toBe(200);
    await w.runOnce();
    ctx.clock.advance(5_000);
    expect((await desk.patch(`/api/sessions/${id}`).send({ startsAt: '2026-12-05T18:00:00Z', endsAt: '2026-12-05T19:00:00Z' })).status).toBe(200);
    ctx.clock.advance(UNDO_WINDOW_MS);
    await w.runOnce();
    expect(moves()).toHaveLength(0);
    expect((await rows({ kind: 'session_change' })).map((r) => r.state)).toEqual(['skipped']);
  });

  it('sends one “Moved” e-mail from the first time to the last when moved twice within the window, and only after it', async () => {
    const { desk, id } = await movedClass();
    const w = worker();
    await desk.patch(`/api/sessions/${id}`).send({ startsAt: '2026-12-05T20:00:00Z', endsAt: '2026-12-05T21:00:00Z' });
    ctx.clock.advance(5_000);
    await desk.patch(`/api/sessions/${id}`).send({ startsAt: '2026-12-06T18:00:00Z', endsAt: '2026-12-06T19:00:00Z' });
    await w.runOnce();
    expect(moves()).toHaveLength(0);
    ctx.clock.advance(UNDO_WINDOW_MS);
    await w.runOnce();
    expect(moves().map((m) => m.subject)).toEqual(['Moved: Silks Foundations is now on Sun 6 Dec at 18:00 (was Sat 5 Dec at 18:00)']);
  });
});

describe('the Mailbox filters: by kind and by recipient', () => {
  async function enqueueSome() {
    const outbox = outboxService({ db: ctx.db, clock: ctx.clock, studio: studioRepository(ctx.db), appUrl: APP_URL });
    const m = (kind: 'digest' | 'fault' | 'reminder', key: string, to: string[]) => ({ kind, uniqueKey: key, to, subject: `${kind} ${key}`, text: 'Body', html: '<p>Body</p>' });
    await ctx.db.transaction(async (trx) => {
      await outbox.enqueue(trx, m('digest', 'd1', ['rigger@mail.test']));
      await outbox.enqueue(trx, m('fault', 'f1', ['rigger@mail.test', 'second_rigger@mail.test']));
      await outbox.enqueue(trx, m('reminder', 'r1', ['ada@mail.test']));
      await outbox.enqueue(trx, m('fault', 'f2', ['secondXrigger@mail.test']));
    });
  }
  const subjects = (body: { items: Array<{ subject: string }> }) => body.items.map((i) => i.subject);

  it('GET /api/outbox filters on the server by kind and by one recipient (any case), through the pages', async () => {
    await enqueueSome();
    const owner = await as(ctx, 'owner');
    expect(subjects((await owner.get('/api/outbox?kind=fault')).body)).toEqual(['fault f2', 'fault f1']);
    expect(subjects((await owner.get('/api/outbox?to=Rigger@Mail.test')).body)).toEqual(['fault f1', 'digest d1']);
    expect(subjects((await owner.get('/api/outbox?kind=fault&to=rigger@mail.test')).body)).toEqual(['fault f1']);
    // An underscore in the address is a letter, not a LIKE wildcard.
    expect(subjects((await owner.get('/api/outbox?to=second_rigger@mail.test')).body)).toEqual(['fault f1']);
    expect(subjects((await owner.get('/api/outbox?kind=reminder&to=rigger@mail.test')).body)).toEqual([]);
    const first = await owner.get('/api/outbox?to=rigger@mail.test&limit=1');
    expect(subjects(first.body)).toEqual(['fault f1']);
    const next = await owner.get(`/api/outbox?to=rigger@mail.test&limit=1&cursor=${first.body.nextCursor}`);
    expect(subjects(next.body)).toEqual(['digest d1']);
    expect(next.body.nextCursor).toBeNull();
  });

  it('answers 400 in plain words for an unknown kind or a recipient that is no address', async () => {
    const owner = await as(ctx, 'owner');
    const bad = await owner.get('/api/outbox?kind=spam');
    expect(bad.status).toBe(400);
    expect(bad.body.error.details.fields.kind).toBe('Pick a kind of message from the list');
    expect((await owner.get(`/api/outbox?to=${'a'.repeat(300)}`)).status).toBe(400);
    expect((await owner.get('/api/dev/mailbox?kind=spam')).status).toBe(400);
  });

  it('GET /api/dev/mailbox keeps what the catcher received of that kind and for that recipient', async () => {
    await ctx.close();
    ctx = await createTestApp({ now: '2026-12-01T10:00:00Z', deps: { mailer, fakeSmtp: fake } });
    await enqueueSome();
    await worker().runOnce();
    expect(received()).toHaveLength(4);
    expect(received().map((m) => m.kind)).toEqual(['digest', 'fault', 'reminder', 'fault']);
    const owner = await as(ctx, 'owner');
    const faults = await owner.get('/api/dev/mailbox?kind=fault');
    expect(faults.status).toBe(200);
    expect(faults.body.map((m: { subject: string }) => m.subject)).toEqual(['fault f2', 'fault f1']);
    const forRigger = await owner.get('/api/dev/mailbox?to=RIGGER@mail.test');
    expect(forRigger.body.map((m: { subject: string }) => m.subject)).toEqual(['fault f1', 'digest d1']);
    expect((await owner.get('/api/dev/mailbox')).body).toHaveLength(4);
  });
});

describe('mail templates', () => {
  it('escapes every value in the HTML and loads nothing remote', async () => {
    const mail = sessionChangeMessage({
      kind: 'moved',
      studioName: 'Studio <One>',
      timeZone: 'Europe/London',
      appUrl: APP_URL,
      recipientName: '"Ada" & co',
      className: '<script>alert(1)</script>',
      roomName: 'Hall <b>2</b>',
      startsAt: new Date('2026-12-06T18:00:00Z'),
      endsAt: new Date('2026-12-06T19:00:00Z'),
      previous: { startsAt: new Date('2026-12-05T18:00:00Z'), endsAt: new Date('2026-12-05T19:00:00Z') },
      points: [{ label: 'P<1>', status: 'blocked', reasons: ['Open fault on point P<1>: "frayed" & worn'], clearedUntil: null }],
    });
    expect(mail.html).not.toContain('<script>');
    expect(mail.html).not.toContain('<b>2</b>');
    expect(mail.html).toContain('&lt;script&gt;alert(1)&lt;/script&gt;');
    expect(mail.html).toContain('&quot;Ada&quot; &amp; co');
    expect(mail.html).toContain('&quot;frayed&quot; &amp; worn');
    expect(mail.html).not.toMatch(/<img|<link|url\(|src=/i);
    expect(mail.text).toContain('P<1>  blocked  Open fault on point P<1>: "frayed" & worn');
  });
});

describe('mail worker settings (OUTBOX_LEASE_SECONDS, OUTBOX_INTERVAL_SECONDS)', () => {
  const env = { AUTH_SECRET: 'x'.repeat(32), LOFTWISE_DB: ':memory:' };

  it('defaults to a 5-minute lease and a cycle every 15 seconds, and reads both in seconds', () => {
    expect(loadConfig(env)).toMatchObject({ outboxLeaseMs: LEASE_MS, outboxIntervalMs: 15_000 });
    expect(loadConfig({ ...env, OUTBOX_LEASE_SECONDS: '2', OUTBOX_INTERVAL_SECONDS: '1' })).toMatchObject({ outboxLeaseMs: 2_000, outboxIntervalMs: 1_000 });
  });

  it('holds a “Moved” e-mail for the desk’s undo window by default (MOVE_NOTICE_DELAY_SECONDS), and at once when set to 0', () => {
    expect(loadConfig(env).moveNoticeDelayMs).toBe(UNDO_WINDOW_MS);
    expect(loadConfig({ ...env, MOVE_NOTICE_DELAY_SECONDS: '0' }).moveNoticeDelayMs).toBe(0);
    expect(() => loadConfig({ ...env, MOVE_NOTICE_DELAY_SECONDS: '601' })).toThrow(/MOVE_NOTICE_DELAY_SECONDS/);
  });

  it('refuses to start on a value that is not a whole number of seconds in range, naming each variable', () => {
    for (const [lease, interval] of [['0', '1.5'], ['soon', '3601'], ['86401', '-1']]) {
      expect(() => loadConfig({ ...env, OUTBOX_LEASE_SECONDS: lease, OUTBOX_INTERVAL_SECONDS: interval })).toThrow(
        /OUTBOX_LEASE_SECONDS: OUTBOX_LEASE_SECONDS must be a whole number of seconds from 1 to 86400\n.*OUTBOX_INTERVAL_SECONDS: OUTBOX_INTERVAL_SECONDS must be a whole number of seconds from 1 to 3600/,
      );
    }
  });
});
