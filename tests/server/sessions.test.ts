import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { APP_URL, as, createTestApp, signIn, type TestContext } from '../helpers/app';
import { makePoint, makeRoom, makeStandardPath, makeUser } from '../helpers/factories';

let ctx: TestContext;
beforeEach(async () => {
  ctx = await createTestApp({ now: '2026-12-01T10:00:00Z' });
});
afterEach(async () => ctx.close());

const codes = (rs: Array<{ code: string }>) => rs.map((r) => r.code);

/** A room with cleared points (cleared yesterday: textile sling → cleared until 30 Dec). */
async function studioWithPoints(n: number, o: { clearedAt?: string | null } = {}) {
  const roomId = await makeRoom(ctx.db);
  const points: number[] = [];
  for (let i = 0; i < n; i++) {
    const p = await makePoint(ctx.db, { roomId, clearedAt: o.clearedAt === undefined ? '2026-11-30T10:00:00Z' : o.clearedAt, structuralRatingKn: 30 });
    // A fabric hangs on each point, so a silks class needs no changeover (PRODUCT.md §4.7).
    const ids = await makeStandardPath(ctx.db, p.id, { apparatus: { kind: 'fabric', inspectedUntil: '2027-01-30T00:00:00Z' } });
    for (const g of ids) await ctx.db('gear_items').where({ id: g }).update({ inspected_until: '2027-01-30T00:00:00Z' });
    points.push(p.id);
  }
  const [ct] = await ctx.db('class_types').insert({ name: `Silks ${roomId}`, apparatus: 'fabric', duration_minutes: 60, capacity: 8, performers_per_point: 1, created_at: new Date().toISOString() }).returning('id');
  const instructor = await makeUser(ctx.db, { role: 'instructor' });
  return { roomId, points, classTypeId: (ct as { id: number }).id, instructorId: instructor.id, instructor };
}

const body = (s: Awaited<ReturnType<typeof studioWithPoints>>, extra: Record<string, unknown> = {}) => ({
  classTypeId: s.classTypeId,
  instructorId: s.instructorId,
  roomId: s.roomId,
  startsAt: '2026-12-03T18:00:00Z',
  endsAt: '2026-12-03T19:00:00Z',
  pointIds: s.points,
  ...extra,
});

describe('POST /api/sessions', () => {
  it('books a class on cleared points: 201 with the session, its points’ status and places', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(2);
    const res = await desk.post('/api/sessions').send(body(s));
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ id: expect.any(Number), pointIds: s.points, atRisk: false, cancelled: false, places: 2, inspectionDue: false });
    expect(res.body.points.every((p: { status: string }) => p.status === 'cleared')).toBe(true);
    expect(res.body.warnings).toEqual([]);
  });

  it('refuses a lapsed point naming the reason; after the rigger clears it the booking succeeds', async () => {
    const desk = await as(ctx, 'reception');
    const rigger = await as(ctx, 'rigger');
    const s = await studioWithPoints(1, { clearedAt: '2026-10-01T10:00:00Z' });
    const refused = await desk.post('/api/sessions').send(body(s));
    expect(refused.status).toBe(409);
    expect(refused.body.error.code).toBe('points_unavailable');
    expect(refused.body.error.details.points[0].pointId).toBe(s.points[0]);
    expect(codes(refused.body.error.details.points[0].reasons)).toContain('inspection_lapsed');
    expect(await ctx.db('sessions').count({ n: '*' })).toEqual([{ n: 0 }]);

    const list = await rigger.get(`/api/points/${s.points[0]}/checklist`);
    const cleared = await rigger.post(`/api/points/${s.points[0]}/clearances`).send({ items: list.body.items.map((i: { key: string }) => ({ key: i.key, result: 'pass' })) });
    expect(cleared.body.cleared).toBe(true);
    expect((await desk.post('/api/sessions').send(body(s))).status).toBe(201);
  });

  it('lists every reason that applies, per point and for the session', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(1);
    await ctx.db('points').where({ id: s.points[0] }).update({ apparatus_json: JSON.stringify(['hoop']), max_performers: 1 });
    const [duo] = await ctx.db('class_types').insert({ name: 'Duo silks', apparatus: 'fabric', duration_minutes: 60, capacity: 4, performers_per_point: 2, created_at: new Date().toISOString() }).returning('id');
    expect((await desk.post('/api/sessions').send(body(s))).status).toBe(409); // hoop only
    await ctx.db('points').where({ id: s.points[0] }).update({ apparatus_json: JSON.stringify(['fabric']) });
    expect((await desk.post('/api/sessions').send(body(s))).status).toBe(201);
    // Same instructor, same time, a duo class on the same point.
    const res = await desk.post('/api/sessions').send(body(s, { classTypeId: (duo as { id: number }).id }));
    expect(res.status).toBe(409);
    const reasons = codes(res.body.error.details.points[0].reasons);
    expect(reasons).toEqual(expect.arrayContaining(['too_many_performers', 'load_check_failed', 'point_double_booked']));
    expect(codes(res.body.error.details.reasons)).toEqual(['instructor_double_booked']);
    // The clash names the instructor and the class they already teach then.
    expect(res.body.error.details.reasons[0].message).toBe(`${(await ctx.db("users").where({ id: s.instructorId }).first("name")).name} already teaches Silks ${s.roomId} in ${(await ctx.db('rooms').where({ id: s.roomId }).first('name')).name}, 3 Dec 2026, 18:00–19:00`);
  });

  it('books a point whose clearance runs out before the session ends, with inspection_due', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(1);
    // Cleared until 30 Dec 10:00; a class on 30 Dec 09:30–10:30 runs past it.
    const res = await desk.post('/api/sessions').send(body(s, { startsAt: '2026-12-30T09:30:00Z', endsAt: '2026-12-30T10:30:00Z' }));
    expect(res.status).toBe(201);
    expect(codes(res.body.warnings)).toContain('inspection_due');
    expect(res.body.inspectionDue).toBe(true);
  });

  it('lets exactly one of 20 concurrent bookings of the same point and time through; the rest get 409, none 500', async () => {
    const s = await studioWithPoints(1);
    const u = await makeUser(ctx.db, { role: 'reception' });
    const instructors = await Promise.all(Array.from({ length: 20 }, () => makeUser(ctx.db, { role: 'instructor' })));
    const { agent } = await signIn(ctx.app, u.email);
    const results = await Promise.all(instructors.map((i) => agent.post('/api/sessions').set('Origin', APP_URL).send(body(s, { instructorId: i.id }))));
    const statuses = results.map((r) => r.status).sort();
    expect(statuses.filter((x) => x === 201)).toHaveLength(1);
    expect(statuses.filter((x) => x === 409)).toHaveLength(19);
    expect(await ctx.db('session_points').count({ n: '*' })).toEqual([{ n: 1 }]);
  });

  it('is for reception and the owner only', async () => {
    const instructor = await as(ctx, 'instructor');
    const s = await studioWithPoints(1);
    expect((await instructor.post('/api/sessions').send(body(s))).status).toBe(403);
  });
});

describe('POST /api/sessions with an idempotency key', () => {
  it('books once when the same booking is sent twice at once (a double click): both answer the one class, the repeat says so', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(1);
    const key = 'dialog-0001-abcdef';
    const [a, b] = await Promise.all([desk.post('/api/sessions').send(body(s, { idempotencyKey: key })), desk.post('/api/sessions').send(body(s, { idempotencyKey: key }))]);
    expect([a.status, b.status]).toEqual([201, 201]);
    expect(a.body.id).toBe(b.body.id);
    expect([a.body.replayed, b.body.replayed].sort()).toEqual([false, true]);
    expect(await ctx.db('sessions').count({ n: '*' })).toEqual([{ n: 1 }]);
    expect(await ctx.db('audit_entries').where({ action: 'session.booked' }).count({ n: '*' })).toEqual([{ n: 1 }]);
  });

  it('answers a retry of a weekly series with the same classes, not "cannot be booked"', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(1);
    const series = body(s, { rrule: 'FREQ=WEEKLY;COUNT=4', idempotencyKey: 'series-retry-0001' });
    const first = await desk.post('/api/sessions').send(series);
    const retry = await desk.post('/api/sessions').send(series);
    expect(retry.status).toBe(201);
    expect(retry.body.sessionIds).toEqual(first.body.sessionIds);
    expect(retry.body.sessionIds).toHaveLength(4);
    expect(await ctx.db('sessions').count({ n: '*' })).toEqual([{ n: 4 }]);
  });

  it('refuses the same key with a different booking, booking nothing more', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(2);
    expect((await desk.post('/api/sessions').send(body(s, { pointIds: [s.points[0]], idempotencyKey: 'reused-key-0001' }))).status).toBe(201);
    const other = await desk.post('/api/sessions').send(body(s, { pointIds: [s.points[1]], idempotencyKey: 'reused-key-0001' }));
    expect(other.status).toBe(409);
    expect(other.body.error.code).toBe('idempotency_key_reused');
    expect(await ctx.db('sessions').count({ n: '*' })).toEqual([{ n: 1 }]);
  });

  it('keeps nothing for a refused booking: the same key books once the points are changed', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(2);
    await ctx.db('points').where({ id: s.points[0] }).update({ apparatus_json: JSON.stringify(['hoop']) });
    expect((await desk.post('/api/sessions').send(body(s, { idempotencyKey: 'fix-and-retry-01' }))).status).toBe(409);
    const fixed = await desk.post('/api/sessions').send(body(s, { pointIds: [s.points[1]], idempotencyKey: 'fix-and-retry-01' }));
    expect(fixed.status).toBe(201);
    expect(fixed.body.replayed).toBe(false);
  });

  it('does not answer one person’s key to another', async () => {
    const desk = await as(ctx, 'reception');
    const owner = await as(ctx, 'owner');
    const s = await studioWithPoints(1);
    expect((await desk.post('/api/sessions').send(body(s, { idempotencyKey: 'shared-key-00001' }))).status).toBe(201);
    const res = await owner.post('/api/sessions').send(body(s, { idempotencyKey: 'shared-key-00001' }));
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('idempotency_key_reused');
  });
});

describe('recurring series', () => {
  it('books a weekly series; one that cannot be booked whole says which and why and books nothing', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(1);
    const other = await makeUser(ctx.db, { role: 'instructor' });
    // Someone already has the point on 17 Dec.
    expect((await desk.post('/api/sessions').send(body(s, { instructorId: other.id, startsAt: '2026-12-17T18:00:00Z', endsAt: '2026-12-17T19:00:00Z' }))).status).toBe(201);
    const series = body(s, { rrule: 'FREQ=WEEKLY;COUNT=4' });
    const refused = await desk.post('/api/sessions').send(series);
    expect(refused.status).toBe(409);
    expect(refused.body.error.details.occurrences.map((o: { startsAt: string }) => o.startsAt)).toEqual(['2026-12-17T18:00:00.000Z']);
    expect(refused.body.error.details).toMatchObject({ bookable: 3, total: 4 });
    expect(await ctx.db('sessions').count({ n: '*' })).toEqual([{ n: 1 }]);
    const rest = await desk.post('/api/sessions').send({ ...series, bookAvailable: true });
    expect(rest.status).toBe(201);
    expect(rest.body.sessionIds).toHaveLength(3);
    expect(rest.body.skipped.map((o: { startsAt: string }) => o.startsAt)).toEqual(['2026-12-17T18:00:00.000Z']);
  });

  it('moves this and the following occurrences together', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(1);
    const res = await desk.post('/api/sessions').send(body(s, { rrule: 'FREQ=WEEKLY;COUNT=3' }));
    const [, second] = res.body.sessionIds;
    const moved = await desk.patch(`/api/sessions/${second}`).send({ startsAt: '2026-12-10T19:00:00Z', endsAt: '2026-12-10T20:00:00Z', scope: 'following' });
    expect(moved.status).toBe(200);
    const starts = await ctx.db('sessions').orderBy('id').pluck('starts_at');
    expect(starts).toEqual(['2026-12-03T18:00:00.000Z', '2026-12-10T19:00:00.000Z', '2026-12-17T19:00:00.000Z']);
  });

  it('answers 400 for a rule it cannot read', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(1);
    const res = await desk.post('/api/sessions').send(body(s, { rrule: 'FREQ=WEEKLY;BYDAY=XX' }));
    expect(res.status).toBe(400);
    expect(res.body.error.details.fields.rrule).toBeDefined();
  });
});

describe('at risk and alternatives', () => {
  it('turns a booked session at risk when a fault is reported on its point, and a suggested swap fixes it', async () => {
    const desk = await as(ctx, 'reception');
    const instructor = await as(ctx, 'instructor');
    const s = await studioWithPoints(3);
    const booked = await desk.post('/api/sessions').send(body(s, { pointIds: [s.points[0]] }));
    const swivel = (await ctx.db('load_path_links').where({ point_id: s.points[0], position: 3 }).first()).gear_id;
    await instructor.post('/api/faults').send({ gearId: swivel, severity: 'medium', description: 'Swivel grinds' });
    const risky = await desk.get(`/api/sessions/${booked.body.id}`);
    expect(risky.body.atRisk).toBe(true);
    expect(risky.body.riskReasons[0]).toMatchObject({ pointId: s.points[0], code: 'fault_open' });
    const alts = await desk.get(`/api/sessions/${booked.body.id}/alternatives`);
    expect(alts.body.map((a: { pointId: number }) => a.pointId)).toEqual([s.points[1], s.points[2]]);
    expect(alts.body[0]).toMatchObject({ roomId: s.roomId, label: expect.any(String) });
    const swapped = await desk.put(`/api/sessions/${booked.body.id}/points`).send({ pointIds: [alts.body[0].pointId] });
    expect(swapped.status).toBe(200);
    expect(swapped.body.atRisk).toBe(false);
  });

  it('suggests points in other rooms after the same room’s', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(1);
    const elsewhere = await makePoint(ctx.db, { clearedAt: '2026-11-30T10:00:00Z', structuralRatingKn: 30 });
    for (const g of await makeStandardPath(ctx.db, elsewhere.id, { apparatus: { kind: 'fabric', inspectedUntil: '2027-01-30T00:00:00Z' } })) await ctx.db('gear_items').where({ id: g }).update({ inspected_until: '2027-01-30T00:00:00Z' });
    const booked = await desk.post('/api/sessions').send(body(s));
    const alts = await desk.get(`/api/sessions/${booked.body.id}/alternatives`);
    expect(alts.body).toEqual([expect.objectContaining({ pointId: elsewhere.id, sameRoom: false })]);
  });
});

describe('changing and cancelling', () => {
  it('re-checks a move, and keeps a cancelled session marked with its reason', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(1);
    const a = await desk.post('/api/sessions').send(body(s));
    const other = await makeUser(ctx.db, { role: 'instructor' });
    await desk.post('/api/sessions').send(body(s, { instructorId: other.id, startsAt: '2026-12-04T18:00:00Z', endsAt: '2026-12-04T19:00:00Z' }));
    const clash = await desk.patch(`/api/sessions/${a.body.id}`).send({ startsAt: '2026-12-04T18:30:00Z', endsAt: '2026-12-04T19:30:00Z' });
    expect(clash.status).toBe(409);
    expect(codes(clash.body.error.details.points[0].reasons)).toContain('point_double_booked');
    const cancelled = await desk.post(`/api/sessions/${a.body.id}/cancel`).send({ reason: 'Instructor unwell' });
    expect(cancelled.body).toMatchObject({ cancelled: true, cancelReason: 'Instructor unwell', places: 0 });
    // The instructor is told, through the outbox, in the same transaction as the change.
    const told = await ctx.db('outbox_messages').where({ session_id: a.body.id }).select('kind', 'recipients_json', 'subject');
    expect(told.map((m) => m.kind)).toContain('session_change');
    expect(told.every((m) => JSON.parse(m.recipients_json).includes(s.instructor.email))).toBe(true);
    expect(told.some((m) => /cancel/i.test(m.subject))).toBe(true);
    // A cancelled session frees its point.
    expect((await desk.post('/api/sessions').send(body(s))).status).toBe(201);
  });
});

/** Cleared points (cleared yesterday, gear inspected) in a room of their own, or in `roomId`. */
async function clearedPoints(n: number, o: { roomId?: number; name?: string } = {}) {
  const roomId = o.roomId ?? (await makeRoom(ctx.db, o.name));
  const points: number[] = [];
  for (let i = 0; i < n; i++) {
    const p = await makePoint(ctx.db, { roomId, clearedAt: '2026-11-30T10:00:00Z', structuralRatingKn: 30 });
    for (const g of await makeStandardPath(ctx.db, p.id, { apparatus: { kind: 'fabric', inspectedUntil: null } })) await ctx.db('gear_items').where({ id: g }).update({ inspected_until: '2027-01-30T00:00:00Z' });
    points.push(p.id);
  }
  return { roomId, points };
}

/** What a refused request must leave as it was: the sessions, their points, the outbox and the audit chain. */
async function records() {
  return {
    sessions: await ctx.db('sessions').orderBy('id').select('id', 'room_id', 'starts_at', 'ends_at', 'instructor_id', 'updated_at'),
    points: await ctx.db('session_points').orderBy(['session_id', 'point_id']).select('*'),
    outbox: await ctx.db('outbox_messages').count({ n: '*' }),
    audit: await ctx.db('audit_entries').count({ n: '*' }),
  };
}

describe('PUT /api/sessions/:id/points with roomId: moving a class to another room', () => {
  it('moves the class to free cleared points in another room: the session shows the new room and points, the instructor is e-mailed, the old point is freed', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(1);
    const annex = await clearedPoints(2, { name: 'Annex Loft' });
    const booked = await desk.post('/api/sessions').send(body(s));
    const oldRoom = booked.body.roomName;

    const moved = await desk.put(`/api/sessions/${booked.body.id}/points`).send({ pointIds: [annex.points[1]], roomId: annex.roomId });
    expect(moved.status).toBe(200);
    expect(moved.body).toMatchObject({ id: booked.body.id, roomId: annex.roomId, roomName: 'Annex Loft', pointIds: [annex.points[1]], atRisk: false, places: 1 });
    expect(moved.body.points).toEqual([expect.objectContaining({ pointId: annex.points[1], status: 'cleared' })]);
    const reread = await desk.get(`/api/sessions/${booked.body.id}`);
    expect(reread.body).toMatchObject({ roomId: annex.roomId, roomName: 'Annex Loft', pointIds: [annex.points[1]] });
    expect(await ctx.db('sessions').where({ id: booked.body.id }).first('room_id')).toEqual({ room_id: annex.roomId });

    // The instructor's e-mail is queued in the same transaction and names the new room and the old one.
    const told = await ctx.db('outbox_messages').where({ session_id: booked.body.id, kind: 'session_change' }).select('recipients_json', 'subject', 'text_body');
    expect(told).toHaveLength(1);
    expect(JSON.parse(told[0].recipients_json)).toEqual([s.instructor.email]);
    expect(told[0].subject).toMatch(/^Room changed: .* is now in Annex Loft$/);
    expect(told[0].text_body).toContain('Room: Annex Loft');
    expect(told[0].text_body).toContain(`Room before: ${oldRoom}`);
    // Audited, with the room and points before and after.
    const entry = await ctx.db('audit_entries').orderBy('id', 'desc').first('action', 'entity_id', 'before_json', 'after_json');
    expect(entry).toMatchObject({ action: 'session.room_changed', entity_id: booked.body.id });
    expect(JSON.parse(entry.before_json)).toEqual({ roomId: s.roomId, pointIds: s.points });
    expect(JSON.parse(entry.after_json)).toEqual({ roomId: annex.roomId, pointIds: [annex.points[1]] });

    // The point it left is free again at that time; the one it took is not.
    const other = await makeUser(ctx.db, { role: 'instructor' });
    expect((await desk.post('/api/sessions').send(body(s, { instructorId: other.id }))).status).toBe(201);
    const taken = await desk.post('/api/sessions').send(body(s, { instructorId: other.id, roomId: annex.roomId, pointIds: [annex.points[1]] }));
    expect(taken.status).toBe(409);
    expect(codes(taken.body.error.details.points[0].reasons)).toContain('point_double_booked');
  });

  it('refuses a blocked point in the other room with its reason, per point, and changes nothing', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(1);
    const instructor = await as(ctx, 'instructor');
    const annex = await clearedPoints(2);
    const [free, faulted] = annex.points;
    expect((await instructor.post('/api/faults').send({ pointId: faulted, severity: 'medium', description: 'Beam clamp bolt loose' })).status).toBe(201);
    const booked = await desk.post('/api/sessions').send(body(s));
    const before = await records();

    const refused = await desk.put(`/api/sessions/${booked.body.id}/points`).send({ pointIds: [free, faulted], roomId: annex.roomId });
    expect(refused.status).toBe(409);
    expect(refused.body.error.code).toBe('points_unavailable');
    // Only the point that cannot take the class is named, with its reason in words.
    expect(refused.body.error.details.points).toEqual([{ pointId: faulted, reasons: expect.any(Array), warnings: expect.any(Array) }]);
    expect(codes(refused.body.error.details.points[0].reasons)).toContain('fault_open');
    expect(refused.body.error.details.points[0].reasons.find((r: { code: string }) => r.code === 'fault_open').message).toContain('Beam clamp bolt loose');
    expect(refused.body.error.details.reasons).toEqual([]);
    expect(await records()).toEqual(before);
    const still = await desk.get(`/api/sessions/${booked.body.id}`);
    expect(still.body).toMatchObject({ roomId: s.roomId, pointIds: s.points });
  });

  it('refuses points of a room other than the one named, and points elsewhere without a roomId, as before', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(1);
    const annex = await clearedPoints(1);
    const third = await clearedPoints(1);
    const booked = await desk.post('/api/sessions').send(body(s));
    const before = await records();

    const wrongRoom = await desk.put(`/api/sessions/${booked.body.id}/points`).send({ pointIds: [annex.points[0]], roomId: third.roomId });
    expect(wrongRoom.status).toBe(409);
    expect(wrongRoom.body.error.details.points[0]).toMatchObject({ pointId: annex.points[0] });
    expect(codes(wrongRoom.body.error.details.points[0].reasons)).toEqual(['point_not_in_room']);

    const noRoom = await desk.put(`/api/sessions/${booked.body.id}/points`).send({ pointIds: [annex.points[0]] });
    expect(noRoom.status).toBe(409);
    expect(codes(noRoom.body.error.details.points[0].reasons)).toEqual(['point_not_in_room']);
    expect(await records()).toEqual(before);
  });

  it('answers 400 naming the field for a room that does not exist, and changes nothing', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(2);
    const booked = await desk.post('/api/sessions').send(body(s, { pointIds: [s.points[0]] }));
    const before = await records();
    const res = await desk.put(`/api/sessions/${booked.body.id}/points`).send({ pointIds: [s.points[1]], roomId: 999_999 });
    expect(res.status).toBe(400);
    expect(res.body.error.details.fields.roomId).toEqual(expect.any(String));
    const malformed = await desk.put(`/api/sessions/${booked.body.id}/points`).send({ pointIds: [s.points[1]], roomId: 'annex' });
    expect(malformed.status).toBe(400);
    expect(await records()).toEqual(before);
  });

  it('treats the class’s own roomId as a plain swap of points', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(2);
    const booked = await desk.post('/api/sessions').send(body(s, { pointIds: [s.points[0]] }));
    const res = await desk.put(`/api/sessions/${booked.body.id}/points`).send({ pointIds: [s.points[1]], roomId: s.roomId });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ roomId: s.roomId, pointIds: [s.points[1]] });
    expect((await ctx.db('audit_entries').orderBy('id', 'desc').first('action')).action).toBe('session.points_swapped');
    expect((await ctx.db('outbox_messages').where({ session_id: booked.body.id }).first('subject')).subject).toMatch(/^Points changed:/);
  });
});

describe('swapping a point for “this and the following” classes', () => {
  const pointsOf = async (ids: number[]) => Promise.all(ids.map(async (id) => ((await ctx.db('session_points').where({ session_id: id }).select('point_id')) as Array<{ point_id: number }>).map((r) => r.point_id)));

  it('gives this class and every later one of the series the new point; earlier classes keep theirs', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(2);
    const series = await desk.post('/api/sessions').send(body(s, { rrule: 'FREQ=WEEKLY;COUNT=4', pointIds: [s.points[0]] }));
    const [first, second, third, fourth] = series.body.sessionIds;
    const res = await desk.put(`/api/sessions/${second}/points`).send({ pointIds: [s.points[1]], scope: 'following' });
    expect(res.status).toBe(200);
    expect(await pointsOf([first, second, third, fourth])).toEqual([[s.points[0]], [s.points[1]], [s.points[1]], [s.points[1]]]);
    const audit = await ctx.db('audit_entries').orderBy('id', 'desc').first('action', 'after_json');
    expect(audit.action).toBe('session.points_swapped');
    expect(JSON.parse(audit.after_json)).toMatchObject({ pointIds: [s.points[1]], sessionIds: [second, third, fourth] });
  });

  it('swaps this class only when asked for this class', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(2);
    const series = await desk.post('/api/sessions').send(body(s, { rrule: 'FREQ=WEEKLY;COUNT=3', pointIds: [s.points[0]] }));
    const [first, second, third] = series.body.sessionIds;
    expect((await desk.put(`/api/sessions/${first}/points`).send({ pointIds: [s.points[1]] })).status).toBe(200);
    expect(await pointsOf([first, second, third])).toEqual([[s.points[1]], [s.points[0]], [s.points[0]]]);
  });

  it('swaps none when a later class cannot take the point, listing each refused class as a move does', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(2);
    const series = await desk.post('/api/sessions').send(body(s, { rrule: 'FREQ=WEEKLY;COUNT=3', pointIds: [s.points[0]] }));
    const [first, second, third] = series.body.sessionIds;
    const other = await makeUser(ctx.db, { role: 'instructor' });
    // Someone else has the new point at the time of the third class.
    expect((await desk.post('/api/sessions').send(body(s, { instructorId: other.id, pointIds: [s.points[1]], startsAt: '2026-12-17T18:00:00Z', endsAt: '2026-12-17T19:00:00Z' }))).status).toBe(201);
    const refused = await desk.put(`/api/sessions/${first}/points`).send({ pointIds: [s.points[1]], scope: 'following' });
    expect(refused.status).toBe(409);
    const d = refused.body.error.details;
    expect(d).toMatchObject({ bookable: 2, total: 3, sessionId: third, startsAt: '2026-12-17T18:00:00.000Z' });
    expect(d.occurrences).toEqual([{ sessionId: third, startsAt: '2026-12-17T18:00:00.000Z', endsAt: '2026-12-17T19:00:00.000Z', points: [expect.objectContaining({ pointId: s.points[1] })], reasons: [] }]);
    expect(codes(d.occurrences[0].points[0].reasons)).toEqual(['point_double_booked']);
    expect(await pointsOf([first, second, third])).toEqual([[s.points[0]], [s.points[0]], [s.points[0]]]);
  });
});

describe('GET /api/sessions/availability for a series', () => {
  it('checks every class of the series: a point busy on a later date is not bookable, and the reason names that day', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(2);
    const other = await makeUser(ctx.db, { role: 'instructor' });
    expect((await desk.post('/api/sessions').send(body(s, { instructorId: other.id, pointIds: [s.points[1]], startsAt: '2026-12-17T18:00:00Z', endsAt: '2026-12-17T19:00:00Z' }))).status).toBe(201);
    const q = `roomId=${s.roomId}&classTypeId=${s.classTypeId}&startsAt=2026-12-03T18:00:00Z&endsAt=2026-12-03T19:00:00Z`;
    const single = await desk.get(`/api/sessions/availability?${q}`);
    expect(single.body.points.map((p: { bookable: boolean }) => p.bookable)).toEqual([true, true]);
    const series = await desk.get(`/api/sessions/availability?${q}&rrule=${encodeURIComponent('FREQ=WEEKLY;COUNT=4')}`);
    expect(series.status).toBe(200);
    expect(series.body.classes).toBe(4);
    const [a, b] = series.body.points;
    expect(a.bookable).toBe(true);
    expect(b.bookable).toBe(false);
    expect(codes(b.reasons)).toEqual(['point_double_booked']);
    expect(b.reasons[0].message).toMatch(/\(on 17 Dec 2026\)$/);
    // Leaving that day out of the series frees the point again.
    const skipped = await desk.get(`/api/sessions/availability?${q}&rrule=${encodeURIComponent('FREQ=WEEKLY;COUNT=4')}&skipDays=2026-12-17`);
    expect(skipped.body.points[1].bookable).toBe(true);
  });
});

describe('a class whose only point is blocked', () => {
  it('moves to another time with a replacement point in one step, the blocked point left behind', async () => {
    const desk = await as(ctx, 'reception');
    const instructor = await as(ctx, 'instructor');
    const s = await studioWithPoints(2);
    const booked = await desk.post('/api/sessions').send(body(s, { pointIds: [s.points[0]] }));
    expect((await instructor.post('/api/faults').send({ pointId: s.points[0], severity: 'high', description: 'Swivel grinds' })).status).toBe(201);
    // Moving alone keeps the blocked point, so it is refused.
    const alone = await desk.patch(`/api/sessions/${booked.body.id}`).send({ startsAt: '2026-12-04T18:00:00Z', endsAt: '2026-12-04T19:00:00Z' });
    expect(alone.status).toBe(409);
    const res = await desk.patch(`/api/sessions/${booked.body.id}`).send({ startsAt: '2026-12-04T18:00:00Z', endsAt: '2026-12-04T19:00:00Z', pointIds: [s.points[1]] });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ startsAt: '2026-12-04T18:00:00.000Z', pointIds: [s.points[1]], atRisk: false });
    const sp = await ctx.db('session_points').where({ session_id: booked.body.id }).select('point_id', 'starts_at');
    expect(sp).toEqual([{ point_id: s.points[1], starts_at: '2026-12-04T18:00:00.000Z' }]);
  });

  it('frees the blocked point of a class with others: the class keeps the rest and is calm again', async () => {
    const desk = await as(ctx, 'reception');
    const instructor = await as(ctx, 'instructor');
    const s = await studioWithPoints(2);
    const booked = await desk.post('/api/sessions').send(body(s));
    await instructor.post('/api/faults').send({ pointId: s.points[0], severity: 'high', description: 'Swivel grinds' });
    expect((await desk.get(`/api/sessions/${booked.body.id}`)).body.atRisk).toBe(true);
    const res = await desk.put(`/api/sessions/${booked.body.id}/points`).send({ pointIds: [s.points[1]] });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ pointIds: [s.points[1]], atRisk: false, places: 1 });
  });
});

describe('a refused change to “this and the following”', () => {
  it('lists every class of the series that cannot be moved, with its reasons, and moves none', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(1);
    const series = await desk.post('/api/sessions').send(body(s, { rrule: 'FREQ=WEEKLY;COUNT=4' }));
    expect(series.body.sessionIds).toHaveLength(4);
    const [first, second, , fourth] = series.body.sessionIds;
    // Someone else has the point an hour later on 10 and 24 Dec.
    const other = await makeUser(ctx.db, { role: 'instructor' });
    for (const day of ['10', '24']) expect((await desk.post('/api/sessions').send(body(s, { instructorId: other.id, startsAt: `2026-12-${day}T19:00:00Z`, endsAt: `2026-12-${day}T20:00:00Z` }))).status).toBe(201);
    const before = await records();

    const refused = await desk.patch(`/api/sessions/${first}`).send({ startsAt: '2026-12-03T19:00:00Z', endsAt: '2026-12-03T20:00:00Z', scope: 'following' });
    expect(refused.status).toBe(409);
    expect(refused.body.error.code).toBe('points_unavailable');
    const d = refused.body.error.details;
    expect(d).toMatchObject({ bookable: 2, total: 4 });
    expect(d.occurrences).toEqual([
      { sessionId: second, startsAt: '2026-12-10T19:00:00.000Z', endsAt: '2026-12-10T20:00:00.000Z', points: [expect.objectContaining({ pointId: s.points[0] })], reasons: [] },
      { sessionId: fourth, startsAt: '2026-12-24T19:00:00.000Z', endsAt: '2026-12-24T20:00:00.000Z', points: [expect.objectContaining({ pointId: s.points[0] })], reasons: [] },
    ]);
    for (const o of d.occurrences) expect(codes(o.points[0].reasons)).toEqual(['point_double_booked']);
    // The first refused class keeps the fields a single refusal has always had.
    expect(d).toMatchObject({ sessionId: second, startsAt: '2026-12-10T19:00:00.000Z', points: [expect.objectContaining({ pointId: s.points[0] })], reasons: [] });
    expect(await records()).toEqual(before);
  });

  it('lists every class whose new instructor is busy, naming the session-wide reason', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(2);
    const series = await desk.post('/api/sessions').send(body(s, { rrule: 'FREQ=WEEKLY;COUNT=3', pointIds: [s.points[0]] }));
    const [first, , third] = series.body.sessionIds;
    const substitute = await makeUser(ctx.db, { role: 'instructor' });
    for (const day of ['03', '17']) expect((await desk.post('/api/sessions').send(body(s, { instructorId: substitute.id, pointIds: [s.points[1]], startsAt: `2026-12-${day}T18:30:00Z`, endsAt: `2026-12-${day}T19:30:00Z` }))).status).toBe(201);
    const before = await records();

    const refused = await desk.patch(`/api/sessions/${first}`).send({ instructorId: substitute.id, scope: 'following' });
    expect(refused.status).toBe(409);
    const d = refused.body.error.details;
    expect(d.occurrences.map((o: { sessionId: number }) => o.sessionId)).toEqual([first, third]);
    for (const o of d.occurrences) {
      expect(o.points).toEqual([]);
      expect(codes(o.reasons)).toEqual(['instructor_double_booked']);
    }
    expect(d).toMatchObject({ bookable: 1, total: 3 });
    expect(await records()).toEqual(before);
  });

  it('still refuses a single class without an occurrence list', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(1);
    const series = await desk.post('/api/sessions').send(body(s, { rrule: 'FREQ=WEEKLY;COUNT=2' }));
    const other = await makeUser(ctx.db, { role: 'instructor' });
    await desk.post('/api/sessions').send(body(s, { instructorId: other.id, startsAt: '2026-12-03T19:00:00Z', endsAt: '2026-12-03T20:00:00Z' }));
    const refused = await desk.patch(`/api/sessions/${series.body.sessionIds[0]}`).send({ startsAt: '2026-12-03T19:00:00Z', endsAt: '2026-12-03T20:00:00Z', scope: 'this' });
    expect(refused.status).toBe(409);
    expect(refused.body.error.details.occurrences).toBeUndefined();
    expect(codes(refused.body.error.details.points[0].reasons)).toEqual(['point_double_booked']);
  });
});

describe('GET /api/sessions', () => {
  it('answers the sessions overlapping the range, and 400 for a backwards range', async () => {
    const reader = await as(ctx, 'instructor');
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(1);
    await desk.post('/api/sessions').send(body(s));
    const week = await reader.get('/api/sessions?from=2026-11-30T00:00:00Z&to=2026-12-07T00:00:00Z');
    expect(week.body).toHaveLength(1);
    const none = await reader.get('/api/sessions?from=2026-12-04T00:00:00Z&to=2026-12-05T00:00:00Z');
    expect(none.body).toHaveLength(0);
    expect((await reader.get('/api/sessions?from=2026-12-05T00:00:00Z&to=2026-12-04T00:00:00Z')).status).toBe(400);
    // A month view (six weeks) and a day at a time: a longer range is one long burst of work.
    expect((await reader.get('/api/sessions?from=2026-11-30T00:00:00Z&to=2027-01-12T00:00:00Z')).status).toBe(200);
    const tooLong = await reader.get('/api/sessions?from=2026-11-30T00:00:00Z&to=2027-01-12T00:00:01Z');
    expect(tooLong.status).toBe(400);
    expect(tooLong.body.error).toMatchObject({ message: 'Ask for at most 43 days at a time.', details: { fields: { to: 'Range too long' } } });
  });

  it('lists each point of the room as bookable or not for an exact time', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(2);
    await ctx.db('points').where({ id: s.points[1] }).update({ in_service: false });
    const res = await desk.get(`/api/sessions/availability?roomId=${s.roomId}&classTypeId=${s.classTypeId}&startsAt=2026-12-03T18:00:00Z&endsAt=2026-12-03T19:00:00Z`);
    expect(res.status).toBe(200);
    const byId = Object.fromEntries(res.body.points.map((p: { pointId: number }) => [p.pointId, p]));
    expect(byId[s.points[0]].bookable).toBe(true);
    expect(byId[s.points[1]].bookable).toBe(false);
    expect(codes(byId[s.points[1]].reasons)).toContain('out_of_service');
  });
});


describe('GET /api/today', () => {
  it('gives an instructor their own classes today with each point’s status, and the desk every class', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(2);
    const other = await makeUser(ctx.db, { role: 'instructor' });
    // The test clock reads 10:00Z on 1 Dec: both classes are later the same London day.
    expect((await desk.post('/api/sessions').send(body(s, { startsAt: '2026-12-01T18:00:00Z', endsAt: '2026-12-01T19:00:00Z', pointIds: [s.points[0]] }))).status).toBe(201);
    expect((await desk.post('/api/sessions').send(body(s, { instructorId: other.id, startsAt: '2026-12-01T18:00:00Z', endsAt: '2026-12-01T19:00:00Z', pointIds: [s.points[1]] }))).status).toBe(201);
    // Tomorrow's class is not today's.
    expect((await desk.post('/api/sessions').send(body(s, { startsAt: '2026-12-02T18:00:00Z', endsAt: '2026-12-02T19:00:00Z', pointIds: [s.points[0]] }))).status).toBe(201);
    const { agent } = await signIn(ctx.app, s.instructor.email);
    const mine = await agent.get('/api/today');
    expect(mine.body.sessions).toHaveLength(1);
    expect(mine.body.sessions[0].points).toEqual([expect.objectContaining({ pointId: s.points[0], status: 'cleared', preuse_due: true })]);
    const all = await desk.get('/api/today');
    expect(all.body.sessions).toHaveLength(2);
  });
});

describe('a repeat rule that never gives a class', () => {
  it('answers 400 with a clear message within 1 s, while /api/health answers within 200 ms', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(1);
    const t0 = performance.now();
    // The health check is sent while the booking is being worked out, as a monitor's would be.
    const booking = desk.post('/api/sessions').send(body(s, { rrule: 'FREQ=DAILY;BYMONTH=2;BYMONTHDAY=30;COUNT=5' })).then((r) => ({ r, ms: performance.now() - t0 }));
    await new Promise((r) => setTimeout(r, 5));
    const h0 = performance.now();
    const health = desk.get('/api/health').then((r) => ({ r, ms: performance.now() - h0 }));
    const [b, h] = await Promise.all([booking, health]);
    expect(b.r.status).toBe(400);
    expect(b.r.body.error.details.fields.rrule).toMatch(/no class in the 2 years/);
    expect(b.ms).toBeLessThan(1000);
    expect(h.r.status).toBe(200);
    expect(h.ms).toBeLessThan(200);
    expect(await ctx.db('sessions').count({ n: '*' })).toEqual([{ n: 0 }]);
  });
});

describe('moving “this and the following” across a clock change (Europe/London leaves BST on 31 Oct 2027)', () => {
  it('keeps each class’s local wall-clock time and checks overlaps at the times it lands on', async () => {
    ctx.clock.set('2027-10-20T10:00:00Z');
    const desk = await as(ctx, 'reception');
    const roomId = await makeRoom(ctx.db);
    const p = await makePoint(ctx.db, { roomId, clearedAt: '2027-10-19T10:00:00Z', structuralRatingKn: 30 });
    for (const g of await makeStandardPath(ctx.db, p.id, { apparatus: { kind: 'fabric', inspectedUntil: '2028-06-30T00:00:00Z' } })) await ctx.db('gear_items').where({ id: g }).update({ inspected_until: '2028-06-30T00:00:00Z' });
    const [ct] = await ctx.db('class_types').insert({ name: 'Silks evening', apparatus: 'fabric', duration_minutes: 60, capacity: 8, performers_per_point: 1, created_at: new Date().toISOString() }).returning('id');
    const instructor = await makeUser(ctx.db, { role: 'instructor' });
    const other = await makeUser(ctx.db, { role: 'instructor' });
    const base = { classTypeId: (ct as { id: number }).id, instructorId: instructor.id, roomId, pointIds: [p.id] };
    // Saturdays at 18:00 local: 30 Oct is still summer time (17:00Z), 6 and 13 Nov are not (18:00Z).
    const series = await desk.post('/api/sessions').send({ ...base, startsAt: '2027-10-30T17:00:00Z', endsAt: '2027-10-30T18:00:00Z', rrule: 'FREQ=WEEKLY;COUNT=3' });
    expect(series.status, JSON.stringify(series.body)).toBe(201);
    // Another class holds the point on Sunday 7 Nov at 19:00 local (19:00Z), right after where the moved class belongs.
    expect((await desk.post('/api/sessions').send({ ...base, instructorId: other.id, startsAt: '2027-11-07T19:00:00Z', endsAt: '2027-11-07T20:00:00Z' })).status).toBe(201);

    // Move the first to Sunday 31 Oct 18:00 local (GMT by then, 18:00Z): 25 hours later, one wall-clock day.
    const moved = await desk.patch(`/api/sessions/${series.body.sessionIds[0]}`).send({ startsAt: '2027-10-31T18:00:00Z', endsAt: '2027-10-31T19:00:00Z', scope: 'following' });
    expect(moved.status).toBe(200);
    const starts = await ctx.db('sessions').whereIn('id', series.body.sessionIds).orderBy('starts_at').pluck('starts_at');
    // Each lands on Sunday 18:00 local; a fixed 25 h offset would put 7 and 14 Nov at 19:00 and clash with the other class.
    expect(starts).toEqual(['2027-10-31T18:00:00.000Z', '2027-11-07T18:00:00.000Z', '2027-11-14T18:00:00.000Z']);

    // Overlaps are checked on those times: moving the rest to 18:30 local now clashes on 7 Nov, named by its own time.
    const clash = await desk.patch(`/api/sessions/${series.body.sessionIds[0]}`).send({ startsAt: '2027-10-31T18:30:00Z', endsAt: '2027-10-31T19:30:00Z', scope: 'following' });
    expect(clash.status).toBe(409);
    expect(clash.body.error.details.occurrences.map((o: { startsAt: string }) => o.startsAt)).toEqual(['2027-11-07T18:30:00.000Z']);
  });
});

describe('a daily class at 01:30 across the night the clocks go back (Europe/London, 31 Oct 2027)', () => {
  it('is booked at the first 01:30 that night, and at 01:30 local every other night [published: RFC 5545 §3.3.5]', async () => {
    ctx.clock.set('2027-10-20T10:00:00Z');
    const desk = await as(ctx, 'reception');
    const roomId = await makeRoom(ctx.db);
    const p = await makePoint(ctx.db, { roomId, clearedAt: '2027-10-19T10:00:00Z', structuralRatingKn: 30 });
    for (const g of await makeStandardPath(ctx.db, p.id, { apparatus: { kind: 'fabric', inspectedUntil: '2028-06-30T00:00:00Z' } })) await ctx.db('gear_items').where({ id: g }).update({ inspected_until: '2028-06-30T00:00:00Z' });
    const [ct] = await ctx.db('class_types').insert({ name: 'Night silks', apparatus: 'fabric', duration_minutes: 45, capacity: 8, performers_per_point: 1, created_at: new Date().toISOString() }).returning('id');
    const instructor = await makeUser(ctx.db, { role: 'instructor' });
    // 30 Oct 01:30 BST = 00:30Z.
    const res = await desk.post('/api/sessions').send({ classTypeId: (ct as { id: number }).id, instructorId: instructor.id, roomId, pointIds: [p.id], startsAt: '2027-10-30T00:30:00Z', endsAt: '2027-10-30T01:15:00Z', rrule: 'FREQ=DAILY;COUNT=3' });
    expect(res.status).toBe(201);
    const rows = await ctx.db('sessions').whereIn('id', res.body.sessionIds).orderBy('starts_at').select('starts_at', 'ends_at');
    expect(rows).toEqual([
      { starts_at: '2027-10-30T00:30:00.000Z', ends_at: '2027-10-30T01:15:00.000Z' },
      { starts_at: '2027-10-31T00:30:00.000Z', ends_at: '2027-10-31T01:15:00.000Z' }, // the first 01:30 (BST), not 01:30Z
      { starts_at: '2027-11-01T01:30:00.000Z', ends_at: '2027-11-01T02:15:00.000Z' }, // 01:30 GMT
    ]);
  });
});

describe('a class that has begun or taken place', () => {
  it('cannot be cancelled or moved once begun, nor changed at all once over (409 session_in_past), and the instructor is not e-mailed', async () => {
    const desk = await as(ctx, 'reception');
    const s = await studioWithPoints(2);
    const booked = await desk.post('/api/sessions').send(body(s, { pointIds: [s.points[0]] }));
    expect(booked.status).toBe(201);
    ctx.clock.set('2026-12-03T18:30:00Z'); // half-way through the class
    const cancel = await desk.post(`/api/sessions/${booked.body.id}/cancel`).send({ reason: 'Too late' });
    expect(cancel.status).toBe(409);
    expect(cancel.body.error).toMatchObject({ code: 'session_in_past', message: 'This class has already begun, so it cannot be cancelled.' });
    expect((await desk.patch(`/api/sessions/${booked.body.id}`).send({ startsAt: '2026-12-03T18:00:00Z', endsAt: '2026-12-03T20:00:00Z' })).status).toBe(409);
    ctx.clock.set('2026-12-04T10:00:00Z'); // the next day
    const move = await desk.patch(`/api/sessions/${booked.body.id}`).send({ startsAt: '2026-12-05T18:00:00Z', endsAt: '2026-12-05T19:00:00Z' });
    expect(move.status).toBe(409);
    expect(move.body.error).toMatchObject({ code: 'session_in_past', message: expect.stringMatching(/already taken place/) });
    expect((await desk.post(`/api/sessions/${booked.body.id}/cancel`).send({ reason: 'Records tidy-up' })).status).toBe(409);
    expect((await desk.put(`/api/sessions/${booked.body.id}/points`).send({ pointIds: [s.points[1]] })).status).toBe(409);
    const row = await ctx.db('sessions').where({ id: booked.body.id }).first();
    expect(row).toMatchObject({ starts_at: '2026-12-03T18:00:00.000Z' });
    expect(Boolean(row.cancelled)).toBe(false);
    expect(await ctx.db('outbox_messages').where({ kind: 'session_change' }).count({ n: '*' })).toEqual([{ n: 0 }]);
  });
});
