import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { APP_URL, as, createTestApp, signIn, withOrigin, type TestContext } from '../helpers/app';
import { todaySchema } from '../../shared/schemas/today';
import { runMailCycle } from '../../server/mail/worker';
import { makePoint, makeRoom, makeStandardPath, makeUser } from '../helpers/factories';

let ctx: TestContext;
beforeEach(async () => {
  ctx = await createTestApp({ now: '2026-12-01T10:00:00Z' });
});
afterEach(async () => ctx.close());

/** A room of cleared points hanging fabrics; a silks class of `performersPerPoint` light performers per point. */
async function studio(n: number, o: { capacity?: number; performersPerPoint?: number } = {}) {
  const roomId = await makeRoom(ctx.db);
  const points: number[] = [];
  for (let i = 0; i < n; i++) {
    const p = await makePoint(ctx.db, { roomId, clearedAt: '2026-11-30T10:00:00Z', structuralRatingKn: 30, maxPerformers: 2 });
    const ids = await makeStandardPath(ctx.db, p.id, { apparatus: { kind: 'fabric', inspectedUntil: '2027-01-30T00:00:00Z' } });
    for (const g of ids) await ctx.db('gear_items').where({ id: g }).update({ inspected_until: '2027-01-30T00:00:00Z' });
    points.push(p.id);
  }
  const [ct] = await ctx.db('class_types').insert({ name: `Silks ${roomId}`, apparatus: 'fabric', duration_minutes: 60, capacity: o.capacity ?? 8, performers_per_point: o.performersPerPoint ?? 1, dynamic_factor: 1, body_mass_kg: 60, created_at: new Date().toISOString() }).returning('id');
  const instructor = await makeUser(ctx.db, { role: 'instructor' });
  return { roomId, points, classTypeId: (ct as { id: number }).id, instructorId: instructor.id, instructor };
}

async function bookClass(desk: Awaited<ReturnType<typeof as>>, s: Awaited<ReturnType<typeof studio>>, pointIds = s.points) {
  const res = await desk.post('/api/sessions').send({ classTypeId: s.classTypeId, instructorId: s.instructorId, roomId: s.roomId, startsAt: '2026-12-03T18:00:00Z', endsAt: '2026-12-03T19:00:00Z', pointIds });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.id as number;
}

let seq = 0;
async function student(desk: Awaited<ReturnType<typeof as>>, name = `Student ${++seq}`) {
  const res = await desk.post('/api/students').send({ name, email: `${name.toLowerCase().replace(/\W+/g, '.')}@example.test` });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as { id: number; name: string; email: string };
}

const mailsTo = async (email: string, kind?: string) => {
  const rows = (await ctx.db('outbox_messages').select('kind', 'recipients_json', 'subject')) as Array<{ kind: string; recipients_json: string; subject: string }>;
  return rows.filter((r) => JSON.parse(r.recipients_json).includes(email) && (!kind || r.kind === kind));
};

describe('capacity and the waitlist (PRODUCT.md §11)', () => {
  it('takes the lesser of the class capacity and performersPerPoint × usable points; past it, waitlists in order', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studio(2, { capacity: 8, performersPerPoint: 1 });
    const sessionId = await bookClass(desk, s);
    const [a, b, c, d] = [await student(desk), await student(desk), await student(desk), await student(desk)];

    const first = await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: a.id });
    expect(first.status).toBe(201);
    expect(first.body).toMatchObject({ status: 'booked', pointId: expect.any(Number) });
    const second = await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: b.id });
    expect(second.body.status).toBe('booked');
    // One student per point: the two go on different points.
    expect(new Set([first.body.pointId, second.body.pointId])).toEqual(new Set(s.points));

    const third = await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: c.id });
    expect(third.status).toBe(201);
    expect(third.body).toMatchObject({ status: 'waitlisted', pointId: null, position: 1 });
    const fourth = await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: d.id });
    expect(fourth.body).toMatchObject({ status: 'waitlisted', position: 2 });

    const session = await desk.get(`/api/sessions/${sessionId}`);
    expect(session.body).toMatchObject({ capacity: 2, placesLeft: 0, booked: 2, waitlisted: 2, withoutFitPlace: [] });

    // The desk may ask not to waitlist.
    const e = await student(desk);
    const refused = await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: e.id, waitlist: false });
    expect(refused.status).toBe(409);
    expect(refused.body.error.code).toBe('session_full');
    expect(await ctx.db('places').where({ student_id: e.id })).toHaveLength(0);
  });

  it('caps at the class capacity when the points give more places', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studio(3, { capacity: 1 });
    const sessionId = await bookClass(desk, s);
    expect((await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: (await student(desk)).id })).body.status).toBe('booked');
    expect((await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: (await student(desk)).id })).body.status).toBe('waitlisted');
    expect((await desk.get(`/api/sessions/${sessionId}`)).body).toMatchObject({ capacity: 1, placesLeft: 0 });
  });

  it('cancelling a booked place promotes the first waitlisted student, who gets exactly one e-mail', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studio(1);
    const sessionId = await bookClass(desk, s);
    const [a, b, c] = [await student(desk), await student(desk), await student(desk)];
    const booked = await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: a.id });
    await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: b.id });
    await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: c.id });
    const bBefore = (await mailsTo(b.email)).length;
    const cBefore = (await mailsTo(c.email)).length;

    const cancelled = await desk.post(`/api/bookings/${booked.body.id}/cancel`).send({});
    expect(cancelled.status).toBe(200);
    expect(cancelled.body.status).toBe('cancelled');

    const list = await desk.get(`/api/sessions/${sessionId}/bookings`);
    const byStudent = new Map(list.body.map((x: { studentId: number }) => [x.studentId, x]));
    expect(byStudent.get(b.id)).toMatchObject({ status: 'booked', pointId: s.points[0] });
    expect(byStudent.get(c.id)).toMatchObject({ status: 'waitlisted', position: 1 });
    expect(byStudent.get(a.id)).toMatchObject({ status: 'cancelled' });
    // Every staff role reads the list (PRODUCT.md §11: staff), a rigger too; a student never.
    const rigger = await as(ctx, 'rigger');
    expect((await rigger.get(`/api/sessions/${sessionId}/bookings`)).body).toEqual(list.body);

    expect(await mailsTo(b.email)).toHaveLength(bBefore + 1);
    expect(await mailsTo(b.email, 'waitlist_place_offered')).toHaveLength(1);
    expect(await mailsTo(c.email)).toHaveLength(cBefore);
    // Cancelling again changes nothing and e-mails no one.
    expect((await desk.post(`/api/bookings/${booked.body.id}/cancel`).send({})).status).toBe(409);
    expect(await mailsTo(b.email, 'waitlist_place_offered')).toHaveLength(1);
  });

  it('refuses a second booking, a cancelled class and a started one with their codes', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studio(2);
    const sessionId = await bookClass(desk, s);
    const a = await student(desk);
    expect((await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: a.id })).status).toBe(201);
    const twice = await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: a.id });
    expect(twice.status).toBe(409);
    expect(twice.body.error.code).toBe('already_booked');

    const b = await student(desk);
    ctx.clock.set('2026-12-03T18:05:00Z');
    const started = await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: b.id });
    expect(started.status).toBe(409);
    expect(started.body.error.code).toBe('session_started');
    ctx.clock.set('2026-12-01T10:00:00Z');

    expect((await desk.post(`/api/sessions/${sessionId}/cancel`).send({ reason: 'Heating broken' })).status).toBe(200);
    const cancelled = await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: b.id });
    expect(cancelled.status).toBe(409);
    expect(cancelled.body.error.code).toBe('session_cancelled');
    // The booked student was told of the cancellation, once.
    expect(await mailsTo(a.email, 'class_cancelled_student')).toHaveLength(1);
  });

  it('books on the point the desk names, and refuses one that cannot take the class with its reasons', async () => {
    const desk = await as(ctx, 'reception');
    const instructor = await as(ctx, 'instructor');
    const s = await studio(2);
    const sessionId = await bookClass(desk, s);
    const named = await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: (await student(desk)).id, pointId: s.points[1] });
    expect(named.body).toMatchObject({ status: 'booked', pointId: s.points[1] });
    const full = await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: (await student(desk)).id, pointId: s.points[1] });
    expect(full.status).toBe(409);
    expect(full.body.error.code).toBe('point_unavailable');

    expect((await instructor.post('/api/faults').send({ pointId: s.points[0], severity: 'low', description: 'Sling looks frayed' })).status).toBe(201);
    const blocked = await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: (await student(desk)).id, pointId: s.points[0] });
    expect(blocked.status).toBe(409);
    expect(blocked.body.error.code).toBe('point_unavailable');
    expect(blocked.body.error.details.reasons.map((r: { code: string }) => r.code)).toContain('fault_open');
  });

  it('sends one booking confirmation per booking and warns waiver_missing without a valid waiver', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studio(1);
    const sessionId = await bookClass(desk, s);
    const a = await student(desk);
    const res = await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: a.id });
    expect(res.body.warnings.map((w: { code: string }) => w.code)).toEqual(['waiver_missing']);
    expect(await mailsTo(a.email, 'booking_confirmed')).toHaveLength(1);
  });
});

describe('when the rig changes', () => {
  it('a fault on a point with two students lists both without a fit place; a swap places them on the new point', async () => {
    const desk = await as(ctx, 'reception');
    const instructor = await as(ctx, 'instructor');
    const s = await studio(3, { performersPerPoint: 2 });
    const [p1, p2, spare] = s.points;
    const sessionId = await bookClass(desk, s, [p1, p2]);
    const [a, b] = [await student(desk, 'Ana Fault'), await student(desk, 'Bo Fault')];
    expect((await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: a.id, pointId: p1 })).body.pointId).toBe(p1);
    expect((await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: b.id, pointId: p1 })).body.pointId).toBe(p1);

    expect((await instructor.post('/api/faults').send({ pointId: p1, severity: 'high', description: 'Carabiner gate sticks open' })).status).toBe(201);
    const session = await desk.get(`/api/sessions/${sessionId}`);
    expect(session.body.withoutFitPlace.map((w: { studentId: number }) => w.studentId).sort()).toEqual([a.id, b.id].sort());
    expect(session.body.withoutFitPlace.map((w: { name: string }) => w.name).sort()).toEqual(['Ana Fault', 'Bo Fault']);
    expect(session.body.capacity).toBe(2); // one usable point × 2
    const list = await desk.get(`/api/sessions/${sessionId}/bookings`);
    expect(list.body.filter((x: { withoutFitPlace: boolean }) => x.withoutFitPlace)).toHaveLength(2);
    // The at-risk alert to the desk and riggers names them too.
    await runMailCycle({ db: ctx.db, mailer: { send: async () => undefined, close: () => undefined }, clock: ctx.clock, appUrl: APP_URL, log: () => undefined });
    const alert = (await ctx.db('outbox_messages').where({ kind: 'at_risk' }).first()) as { text_body: string; html_body: string };
    expect(alert.text_body).toContain('Students without a fit place');
    expect(alert.text_body).toMatch(/Ana Fault \(on .+\)/);
    expect(alert.text_body).toContain('Bo Fault');
    expect(alert.html_body).toContain('Bo Fault');
    // The Today board tells the same story on the class's day.
    ctx.clock.set('2026-12-03T09:00:00Z');
    const today = await desk.get('/api/today');
    const t = today.body.sessions.find((x: { id: number }) => x.id === sessionId);
    expect(t.withoutFitPlace.map((w: { studentId: number }) => w.studentId).sort()).toEqual([a.id, b.id].sort());
    ctx.clock.set('2026-12-01T10:00:00Z');

    const swapped = await desk.put(`/api/sessions/${sessionId}/points`).send({ pointIds: [spare, p2] });
    expect(swapped.status, JSON.stringify(swapped.body)).toBe(200);
    const after = await desk.get(`/api/sessions/${sessionId}/bookings`);
    expect(after.body.filter((x: { status: string }) => x.status === 'booked').map((x: { pointId: number }) => x.pointId)).toEqual([spare, spare]);
    expect((await desk.get(`/api/sessions/${sessionId}`)).body.withoutFitPlace).toEqual([]);
  });

  it('a point added to a full class gives its place to the first waitlisted student', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studio(2);
    const sessionId = await bookClass(desk, s, [s.points[0]]);
    const [a, b] = [await student(desk), await student(desk)];
    await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: a.id });
    expect((await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: b.id })).body.status).toBe('waitlisted');
    expect((await desk.put(`/api/sessions/${sessionId}/points`).send({ pointIds: s.points })).status).toBe(200);
    const list = await desk.get(`/api/sessions/${sessionId}/bookings`);
    expect(list.body.find((x: { studentId: number }) => x.studentId === b.id)).toMatchObject({ status: 'booked', pointId: s.points[1] });
    expect(await mailsTo(b.email, 'waitlist_place_offered')).toHaveLength(1);
  });

  it('the desk moves one student to another free place in one action; a full or blocked point is refused', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studio(2);
    const sessionId = await bookClass(desk, s);
    const a = await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: (await student(desk)).id, pointId: s.points[0] });
    const b = await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: (await student(desk)).id, pointId: s.points[1] });
    const full = await desk.post(`/api/bookings/${a.body.id}/move`).send({ pointId: s.points[1] });
    expect(full.status).toBe(409);
    expect(full.body.error.code).toBe('point_unavailable');
    expect((await desk.post(`/api/bookings/${b.body.id}/cancel`).send({})).status).toBe(200);
    const moved = await desk.post(`/api/bookings/${a.body.id}/move`).send({ pointId: s.points[1] });
    expect(moved.status).toBe(200);
    expect(moved.body).toMatchObject({ status: 'booked', pointId: s.points[1] });
    expect(await ctx.db('audit_entries').where({ action: 'place.moved' })).toHaveLength(1);
  });
});

describe('the service the student portal calls', () => {
  it('lets a student cancel only their own place, and only up to the policy cut-off (12 h)', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studio(1);
    const sessionId = await bookClass(desk, s);
    const [a, b] = [await student(desk), await student(desk)];
    const booking = await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: a.id });
    const places = ctx.app.locals.places as import('../../server/modules/places/places.service').PlacesService;
    await expect(places.cancel(booking.body.id, { userId: null, asStudentId: b.id })).rejects.toMatchObject({ status: 404 });
    ctx.clock.set('2026-12-03T06:30:00Z'); // 11.5 h before class
    await expect(places.cancel(booking.body.id, { userId: null, asStudentId: a.id })).rejects.toMatchObject({ status: 409, code: 'cancel_cutoff_passed' });
    ctx.clock.set('2026-12-03T05:30:00Z');
    expect((await places.cancel(booking.body.id, { userId: null, asStudentId: a.id })).status).toBe('cancelled');
  });
});

describe('students told of changes', () => {
  it('e-mails each booked and waitlisted student once when the class moves; a move back within the undo window sends nothing', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studio(1);
    const sessionId = await bookClass(desk, s);
    const [a, b] = [await student(desk), await student(desk)];
    await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: a.id });
    await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: b.id }); // waitlisted
    const moved = await desk.patch(`/api/sessions/${sessionId}`).send({ startsAt: '2026-12-03T19:00:00Z', endsAt: '2026-12-03T20:00:00Z' });
    expect(moved.status).toBe(200);
    const queued = async (email: string) => (await ctx.db('outbox_messages').where({ kind: 'class_moved_student' }).select('recipients_json', 'state')).filter((r: { recipients_json: string }) => JSON.parse(r.recipients_json).includes(email));
    expect(await queued(a.email)).toEqual([expect.objectContaining({ state: 'queued' })]);
    expect(await queued(b.email)).toHaveLength(1);

    // Undone within the window: the waiting messages are skipped and nothing new is queued.
    ctx.clock.advance(5_000);
    expect((await desk.patch(`/api/sessions/${sessionId}`).send({ startsAt: '2026-12-03T18:00:00Z', endsAt: '2026-12-03T19:00:00Z' })).status).toBe(200);
    const after = await queued(a.email);
    expect(after.map((r: { state: string }) => r.state)).toEqual(['skipped']);
  });
});

describe('check-in', () => {
  it('is refused with a clear message until the waiver is valid, then marks attended', async () => {
    const owner = await as(ctx, 'owner');
    const desk = await as(ctx, 'reception');
    const s = await studio(1);
    const sessionId = await bookClass(desk, s);
    const a = await student(desk, 'Cleo Nowaiver');
    const booking = await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: a.id });
    const instructor = await as(ctx, 'instructor');
    ctx.clock.set('2026-12-03T17:50:00Z');

    const refused = await instructor.post(`/api/bookings/${booking.body.id}/check-in`).send({ outcome: 'attended' });
    expect(refused.status).toBe(409);
    expect(refused.body.error.code).toBe('waiver_missing');
    expect(refused.body.error.message).toMatch(/Cleo Nowaiver has not signed the waiver/);
    expect((await ctx.db('places').where({ id: booking.body.id }).first()).status).toBe('booked');

    expect((await owner.post('/api/waivers').send({ text: 'I understand aerial work carries risk and follow the instructor.' })).status).toBe(201);
    const paper = await desk.post(`/api/students/${a.id}/waiver`).send({ fullName: 'Cleo Nowaiver' });
    expect(paper.status).toBe(201);
    expect(paper.body).toMatchObject({ method: 'paper', version: 1 });

    const ok = await instructor.post(`/api/bookings/${booking.body.id}/check-in`).send({ outcome: 'attended' });
    expect(ok.status).toBe(200);
    expect(ok.body).toMatchObject({ status: 'attended', waiverOk: true });
    expect((await desk.get(`/api/students/${a.id}`)).body.attendanceCount).toBe(1);
  });

  it('refuses an expired waiver as expired', async () => {
    const owner = await as(ctx, 'owner');
    const desk = await as(ctx, 'reception');
    const s = await studio(1);
    const sessionId = await bookClass(desk, s);
    const a = await student(desk, 'Dee Expired');
    await owner.post('/api/waivers').send({ text: 'I understand aerial work carries risk and follow the instructor.' });
    // Signed on paper 13 months ago: the default policy holds a waiver 12 months.
    expect((await desk.post(`/api/students/${a.id}/waiver`).send({ fullName: 'Dee Expired', signedOn: '2025-11-01' })).status).toBe(201);
    expect((await desk.get(`/api/students/${a.id}`)).body.waiver.state).toBe('expired');
    const booking = await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: a.id });
    expect(booking.body.warnings.map((w: { code: string }) => w.code)).toEqual(['waiver_missing']);
    ctx.clock.set('2026-12-03T17:50:00Z');
    const refused = await desk.post(`/api/bookings/${booking.body.id}/check-in`).send({ outcome: 'attended' });
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toMatch(/expired/);
  });
});

describe('the Today board (GET /api/today)', () => {
  it('carries each class’s students point by point as the board reads them, and a check-in shows on the next read', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studio(2);
    const sessionId = await bookClass(desk, s);
    const booked: Array<{ id: number; pointId: number }> = [];
    for (const name of ['Ada Board', 'Ben Board']) booked.push((await desk.post(`/api/sessions/${sessionId}/bookings`).send({ studentId: (await student(desk, name)).id })).body);
    ctx.clock.set('2026-12-03T17:50:00Z');
    const instructor = withOrigin((await signIn(ctx.app, s.instructor.email)).agent);

    // The board's own schema (shared/schemas/today.ts) reads the answer: one request draws every class's students.
    const read = async () => todaySchema.parse((await instructor.get('/api/today')).body).sessions.find((x) => x.id === sessionId)!;
    const cls = await read();
    const list = (await desk.get(`/api/sessions/${sessionId}/bookings`)).body as Array<{ id: number; name: string; pointId: number; status: string; waiverOk: boolean; withoutFitPlace: boolean }>;
    const pick = (x: { name: string; pointId: number | null; status: string; waiverOk: boolean; withoutFitPlace: boolean }) => ({ name: x.name, pointId: x.pointId, status: x.status, waiverOk: x.waiverOk, withoutFitPlace: x.withoutFitPlace });
    expect(cls.students.map((x) => ({ id: x.bookingId, ...pick(x) })).sort((a, b) => a.id - b.id)).toEqual(list.map((x) => ({ id: x.id, ...pick(x) })).sort((a, b) => a.id - b.id));
    expect(cls.students.map((x) => [x.name, x.pointId, x.waiverOk]).sort()).toEqual([['Ada Board', booked[0].pointId, false], ['Ben Board', booked[1].pointId, false]]);

    // A no-show needs no waiver; the board's next answer has it (the kept answer does not outlive the write).
    expect((await instructor.post(`/api/bookings/${booked[0].id}/check-in`).send({ outcome: 'no_show' })).status).toBe(200);
    expect((await read()).students.find((x) => x.bookingId === booked[0].id)?.status).toBe('no_show');
  });
});
