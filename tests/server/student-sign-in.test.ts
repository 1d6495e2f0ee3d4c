import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import ICAL from 'ical.js';
import { APP_URL, as, createTestApp, signIn, type TestContext } from '../helpers/app';
import { makePoint, makeRoom, makeStandardPath, makeUser } from '../helpers/factories';
import { askForLink, asStudent, insertStudent, linkFor, signInByLink } from '../helpers/students';

let ctx: TestContext;
beforeEach(async () => {
  ctx = await createTestApp({ now: '2026-12-01T10:00:00Z' });
});
afterEach(async () => ctx.close());

/** A room with cleared fabric points, a silks class type and an instructor (as in sessions.test.ts). */
async function studio(n = 2) {
  const roomId = await makeRoom(ctx.db, `Loft ${Math.random().toString(36).slice(2, 7)}`);
  const points: number[] = [];
  for (let i = 0; i < n; i++) {
    const p = await makePoint(ctx.db, { roomId, clearedAt: '2026-11-30T10:00:00Z', structuralRatingKn: 30 });
    const ids = await makeStandardPath(ctx.db, p.id, { apparatus: { kind: 'fabric', inspectedUntil: '2027-01-30T00:00:00Z' } });
    for (const g of ids) await ctx.db('gear_items').where({ id: g }).update({ inspected_until: '2027-01-30T00:00:00Z' });
    points.push(p.id);
  }
  const [ct] = await ctx.db('class_types').insert({ name: 'Silks basics', apparatus: 'fabric', duration_minutes: 60, capacity: 8, performers_per_point: 1, created_at: new Date().toISOString() }).returning('id');
  const instructor = await makeUser(ctx.db, { role: 'instructor', name: 'Ines Instructor', email: 'ines.instructor@example.test' });
  const desk = await as(ctx, 'reception', { name: 'Rita Reception', email: 'rita.desk@example.test' });
  const book = async (startsAt: string, endsAt: string) => {
    const res = await desk.post('/api/sessions').send({ classTypeId: (ct as { id: number }).id, instructorId: instructor.id, roomId, startsAt, endsAt, pointIds: points });
    if (res.status !== 201) throw new Error(`booking failed: ${res.status} ${JSON.stringify(res.body)}`);
    return res.body.id as number;
  };
  return { roomId, points, instructor, desk, book };
}

describe('students sign in by an e-mail link', () => {
  it('queues a link for a student, signs them in by it once, and makes their account linked to the student', async () => {
    const s = await insertStudent(ctx.db, { name: 'Sasha Student', email: 'Sasha.Student@Example.test' });
    const agent = request.agent(ctx.app);
    const asked = await askForLink(agent, 'sasha.student@example.test');
    expect(asked.status).toBe(302);
    expect(new URL(asked.headers.location).pathname).toBe('/auth/verify-request');
    const link = await linkFor(ctx.db, s.email);
    expect(link).not.toBeNull();
    // The link names the app's own origin, whatever Host the request came with.
    expect(link!.startsWith(`${APP_URL}/auth/callback/nodemailer?`)).toBe(true);
    // Only a hash of the token is kept.
    const token = new URL(link!).searchParams.get('token')!;
    expect(JSON.stringify(await ctx.db('verification_tokens').select())).not.toContain(token);

    const url = new URL(link!);
    const followed = await agent.get(url.pathname + url.search);
    expect(followed.status).toBe(302);
    const me = await agent.get('/api/me');
    expect(me.status).toBe(200);
    expect(me.body).toMatchObject({ role: 'student', name: 'Sasha Student', email: 'sasha.student@example.test' });
    const user = await ctx.db('users').where({ id: me.body.id }).first();
    expect(user.student_id).toBe(s.id);

    // A link works once.
    const again = await request.agent(ctx.app).get(url.pathname + url.search);
    expect(String(again.headers.location)).toContain('error=Verification');
  });

  it('answers an unknown address exactly as a student’s, and e-mails it nothing', async () => {
    await insertStudent(ctx.db, { email: 'known@example.test' });
    const known = await askForLink(request.agent(ctx.app), 'known@example.test');
    const unknown = await askForLink(request.agent(ctx.app), 'nobody@example.test');
    expect(unknown.status).toBe(known.status);
    const where = (l: string) => { const u = new URL(l); return u.pathname + u.search; };
    expect(where(unknown.headers.location)).toBe(where(known.headers.location));
    expect(await linkFor(ctx.db, 'nobody@example.test')).toBeNull();
    expect(await linkFor(ctx.db, 'known@example.test')).not.toBeNull();
  });

  it('never signs staff in by link, and never lets a student through the password form', async () => {
    const staff = await makeUser(ctx.db, { role: 'owner', email: 'owner.link@example.test' });
    await askForLink(request.agent(ctx.app), staff.email);
    expect(await linkFor(ctx.db, staff.email)).toBeNull();
    const { student } = await asStudent(ctx, { email: 'pw@example.test' });
    const pw = await signIn(ctx.app, student.email, '!student');
    expect(pw.ok).toBe(false);
  });

  it('limits links per address typed (429), whether or not it is a student’s', async () => {
    const agent = request.agent(ctx.app);
    for (let i = 0; i < 5; i++) expect((await askForLink(agent, 'flood@example.test')).status).toBe(302);
    const sixth = await askForLink(agent, 'flood@example.test');
    expect(sixth.status).toBe(429);
    expect(sixth.body.error.code).toBe('rate_limited');
  });

  it('refuses a form with a repeated e-mail field before Auth.js sees it', async () => {
    const agent = request.agent(ctx.app);
    const csrf = await agent.get('/auth/csrf');
    const res = await agent.post('/auth/signin/nodemailer').type('form').send(`email=a@example.test&email=b@example.test&csrfToken=${csrf.body.csrfToken}`);
    expect(res.status).toBe(400);
  });

  it('ends a student’s session on deactivation, as for staff', async () => {
    const st = await asStudent(ctx);
    expect((await st.get('/api/me')).status).toBe(200);
    await ctx.db('users').where({ id: st.user.id }).update({ active: false });
    expect((await st.get('/api/me')).status).toBe(401);
    // And no new link goes to a deactivated account.
    const before = await ctx.db('outbox_messages').where({ kind: 'sign_in_link' }).count({ n: '*' });
    await askForLink(request.agent(ctx.app), st.student.email);
    expect(await ctx.db('outbox_messages').where({ kind: 'sign_in_link' }).count({ n: '*' })).toEqual(before);
  });

  it('signs a student out everywhere when they sign out', async () => {
    const st = await asStudent(ctx);
    const csrf = await st.agent.get('/auth/csrf');
    await st.agent.post('/auth/signout').type('form').send({ csrfToken: csrf.body.csrfToken });
    const second = await signInByLink(ctx, st.student.email);
    expect(second.ok).toBe(true);
    expect((await second.get('/api/me')).status).toBe(200);
  });
});

describe('a signed-in student and the staff side', () => {
  it('gets 403 on staff routes such as the schedule, the rig and the student list', async () => {
    const st = await asStudent(ctx);
    for (const path of ['/api/sessions?from=2026-12-01T00:00:00Z&to=2026-12-08T00:00:00Z', '/api/points', '/api/users', '/api/today', '/api/instructors', '/api/me/preferences', '/api/students', '/api/sessions/1/bookings']) {
      expect((await st.get(path)).status, path).toBe(403);
    }
    expect((await st.post('/api/faults').send({ description: 'x', severity: 'low' })).status).toBe(403);
  });
});

describe('GET /api/public/timetable', () => {
  it('answers without sign-in with upcoming classes and places left, and holds no names or e-mail addresses', async () => {
    const s = await studio(2);
    const id = await s.book('2026-12-03T18:00:00Z', '2026-12-03T19:00:00Z');
    await insertStudent(ctx.db, { name: 'Paloma Private', email: 'paloma.private@example.test' });
    const res = await request(ctx.app).get('/api/public/timetable?from=2026-12-01T00:00:00Z&to=2026-12-08T00:00:00Z');
    expect(res.status).toBe(200);
    expect(res.body).toEqual([{ sessionId: id, className: 'Silks basics', apparatus: 'fabric', startsAt: '2026-12-03T18:00:00.000Z', endsAt: '2026-12-03T19:00:00.000Z', placesLeft: 2 }]);
    const text = JSON.stringify(res.body);
    for (const secret of ['Ines', 'Rita', 'Paloma', '@', 'Loft ']) expect(text).not.toContain(secret);
  });

  it('refuses a missing, reversed or too long range with 400', async () => {
    for (const q of ['', '?from=2026-12-01T00:00:00Z', '?from=2026-12-08T00:00:00Z&to=2026-12-01T00:00:00Z', '?from=2026-12-01T00:00:00Z&to=2027-03-01T00:00:00Z', '?from=x&to=y']) {
      const res = await request(ctx.app).get(`/api/public/timetable${q}`);
      expect(res.status, q).toBe(400);
      expect(res.body.error.code).toBeDefined();
    }
  });

  it('leaves out cancelled and started classes', async () => {
    const s = await studio(1);
    const past = await s.book('2026-12-01T08:00:00Z', '2026-12-01T09:00:00Z').catch(() => null);
    const cancelled = await s.book('2026-12-04T18:00:00Z', '2026-12-04T19:00:00Z');
    await s.desk.post(`/api/sessions/${cancelled}/cancel`).send({ reason: 'Instructor ill' });
    const res = await request(ctx.app).get('/api/public/timetable?from=2026-11-30T00:00:00Z&to=2026-12-08T00:00:00Z');
    expect(res.status).toBe(200);
    const ids = res.body.map((c: { sessionId: number }) => c.sessionId);
    expect(ids).not.toContain(cancelled);
    if (past !== null) expect(ids).not.toContain(past);
  });
});

describe('iCalendar feeds', () => {
  it('gives an instructor a private feed that parses as iCalendar and lists their next classes; a renewed or revoked token answers 404', async () => {
    const s = await studio(2);
    const a = await s.book('2026-12-03T18:00:00Z', '2026-12-03T19:00:00Z');
    const b = await s.book('2026-12-05T10:00:00Z', '2026-12-05T11:00:00Z');
    const { agent } = await signIn(ctx.app, 'ines.instructor@example.test');
    const post = (p: string) => agent.post(p).set('Origin', APP_URL);
    expect((await agent.get('/api/my/feed')).body).toEqual({ active: false, createdAt: null });
    const made = await post('/api/my/feed');
    expect(made.status).toBe(201);
    const url = new URL(made.body.url);
    expect(url.pathname).toMatch(/^\/ical\/[A-Za-z0-9_-]+\.ics$/);
    // Only the token's hash is kept.
    const token = url.pathname.slice('/ical/'.length, -'.ics'.length);
    expect(JSON.stringify(await ctx.db('calendar_feeds').select())).not.toContain(token);

    const feed = await request(ctx.app).get(url.pathname);
    expect(feed.status).toBe(200);
    expect(feed.headers['content-type']).toContain('text/calendar');
    const cal = new ICAL.Component(ICAL.parse(feed.text));
    const events = cal.getAllSubcomponents('vevent').map((v) => new ICAL.Event(v));
    expect(events.map((e) => e.summary)).toEqual(['Silks basics', 'Silks basics']);
    expect(events.map((e) => e.startDate.toJSDate().toISOString()).sort()).toEqual(['2026-12-03T18:00:00.000Z', '2026-12-05T10:00:00.000Z']);
    expect(events[0].location).toMatch(/^Loft /);
    const points = await ctx.db('points').whereIn('id', s.points).orderBy('id').pluck('label');
    for (const label of points) expect(events[0].description).toContain(label);
    expect(events.map((e) => e.uid).sort()).toEqual([`session-${a}@loftwise`, `session-${b}@loftwise`].sort());

    // Renewing replaces the URL: the old one answers 404.
    const renewed = await post('/api/my/feed');
    expect((await request(ctx.app).get(url.pathname)).status).toBe(404);
    const second = new URL(renewed.body.url).pathname;
    expect((await request(ctx.app).get(second)).status).toBe(200);
    // Revoking turns it off.
    expect((await agent.delete('/api/my/feed').set('Origin', APP_URL)).status).toBe(204);
    expect((await request(ctx.app).get(second)).status).toBe(404);
    expect((await agent.get('/api/my/feed')).body.active).toBe(false);
  });

  it('answers 404 for made-up tokens and for a deactivated instructor’s feed', async () => {
    expect((await request(ctx.app).get('/ical/not-a-real-token-at-all-000000.ics')).status).toBe(404);
    expect((await request(ctx.app).get('/ical/x.ics')).status).toBe(404);
    const instructor = await as(ctx, 'instructor');
    const made = await instructor.post('/api/my/feed');
    await ctx.db('users').where({ id: instructor.user.id }).update({ active: false });
    expect((await request(ctx.app).get(new URL(made.body.url).pathname)).status).toBe(404);
  });

  it('keeps feeds to instructors and students', async () => {
    const rigger = await as(ctx, 'rigger');
    expect((await rigger.post('/api/my/feed')).status).toBe(403);
  });
});

describe('/api/my: the student\'s own bookings and waiver', () => {
  it('books themself, sees only their own bookings, signs the waiver, cancels; another student\'s booking is 404', async () => {
    const s = await studio(1);
    const id = await s.book('2026-12-03T18:00:00Z', '2026-12-03T19:00:00Z');
    const owner = await as(ctx, 'owner');
    expect((await owner.post('/api/waivers').send({ text: 'I take part at my own risk and follow the instructor at all times.' })).status).toBe(201);
    const ann = await asStudent(ctx, { name: 'Ann Able', email: 'ann.able@example.test' });
    const bob = await asStudent(ctx, { name: 'Bob Baker', email: 'bob.baker@example.test' });

    const booked = await ann.post('/api/my/bookings').send({ sessionId: id });
    expect(booked.status).toBe(201);
    expect(booked.body).toMatchObject({ status: 'booked', pointId: s.points[0] });
    expect(booked.body.warnings.map((w: { code: string }) => w.code)).toEqual(['waiver_missing']);
    // The one place is taken: Bob is waitlisted.
    const waiting = await bob.post('/api/my/bookings').send({ sessionId: id });
    expect(waiting.body).toMatchObject({ status: 'waitlisted', position: 1 });
    // The public timetable counts it.
    expect((await request(ctx.app).get('/api/public/timetable?from=2026-12-01T00:00:00Z&to=2026-12-08T00:00:00Z')).body[0].placesLeft).toBe(0);

    const mine = await ann.get('/api/my/bookings');
    expect(mine.status).toBe(200);
    expect(mine.body).toHaveLength(1);
    expect(mine.body[0]).toMatchObject({ id: booked.body.id, sessionId: id, className: 'Silks basics', status: 'booked', canCancel: true, cancelBefore: '2026-12-03T06:00:00.000Z' });
    expect(JSON.stringify(mine.body)).not.toContain('Bob');
    expect((await bob.get('/api/my/bookings')).body.map((b: { id: number }) => b.id)).toEqual([waiting.body.id]);

    // Another student's booking: not found, and nothing changes.
    const other = await bob.post(`/api/my/bookings/${booked.body.id}/cancel`).send({});
    expect(other.status).toBe(404);
    expect((await ctx.db('places').where({ id: booked.body.id }).first()).status).toBe('booked');
    // Nor can a student pick another student through the body.
    expect((await bob.post('/api/my/bookings').send({ sessionId: id, studentId: ann.student.id })).status).not.toBe(201);

    // The waiver: read, sign by typing the full name.
    const waiver = await ann.get('/api/my/waiver');
    expect(waiver.body).toMatchObject({ current: { version: 1 }, accepted: null, valid: false });
    expect((await ann.post('/api/my/waiver').send({ version: 1, fullName: '' })).status).toBe(400);
    const signed = await ann.post('/api/my/waiver').send({ version: 1, fullName: 'Ann Able' });
    expect(signed.status).toBe(201);
    expect((await ann.get('/api/my/waiver')).body).toMatchObject({ valid: true, accepted: { version: 1 } });
    expect((await ann.get('/api/my/profile')).body).toMatchObject({ name: 'Ann Able', email: 'ann.able@example.test', waiverValid: true, cancelCutoffHours: 12 });

    // Cancel: the place goes to Bob.
    const cancelled = await ann.post(`/api/my/bookings/${booked.body.id}/cancel`).send({});
    expect(cancelled.status).toBe(200);
    expect(cancelled.body.status).toBe('cancelled');
    expect((await bob.get('/api/my/bookings')).body[0]).toMatchObject({ status: 'booked' });
  });

  it('refuses a student\'s cancel after the policy\'s cut-off with 409, and changes nothing', async () => {
    const s = await studio(1);
    const id = await s.book('2026-12-01T20:00:00Z', '2026-12-01T21:00:00Z');
    const st = await asStudent(ctx);
    const booked = await st.post('/api/my/bookings').send({ sessionId: id });
    expect(booked.status).toBe(201);
    expect((await st.get('/api/my/bookings')).body[0].canCancel).toBe(false);
    const res = await st.post(`/api/my/bookings/${booked.body.id}/cancel`).send({});
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('cancel_cutoff_passed');
    expect((await ctx.db('places').where({ id: booked.body.id }).first()).status).toBe('booked');
  });

  it('gives a student a feed of their bookings', async () => {
    const s = await studio(1);
    const id = await s.book('2026-12-03T18:00:00Z', '2026-12-03T19:00:00Z');
    const st = await asStudent(ctx);
    await st.post('/api/my/bookings').send({ sessionId: id });
    const made = await st.post('/api/my/feed');
    expect(made.status).toBe(201);
    const feed = await request(ctx.app).get(new URL(made.body.url).pathname);
    expect(feed.status).toBe(200);
    const events = new ICAL.Component(ICAL.parse(feed.text)).getAllSubcomponents('vevent').map((v) => new ICAL.Event(v));
    expect(events.map((e) => e.summary)).toEqual(['Silks basics']);
    expect(events[0].description).toContain('Your point:');
  });
});
