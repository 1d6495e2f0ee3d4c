import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { as, createTestApp, type TestContext } from '../helpers/app';
import { makePoint, makeRoom, makeStandardPath, makeUser } from '../helpers/factories';

let ctx: TestContext;
beforeEach(async () => {
  ctx = await createTestApp({ now: '2026-12-01T10:00:00Z' });
});
afterEach(async () => ctx.close());

describe('students (PRODUCT.md §11)', () => {
  it('creates with NFKC and a normalised e-mail; a duplicate address is refused with a clear 409 and nothing changes', async () => {
    const desk = await as(ctx, 'reception');
    const res = await desk.post('/api/students').send({ name: '  Ｍaya   Okafor ', email: ' Maya.Okafor@Example.TEST ', phone: '07700 900123', emergencyName: 'Sam Okafor', emergencyPhone: '+44 7700 900456' });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ id: expect.any(Number), name: 'Maya Okafor', email: 'Maya.Okafor@Example.TEST', phone: '07700 900123', emergencyName: 'Sam Okafor', waiver: { state: 'missing', ok: false } });

    // Full-width letters and another case are the same address.
    const dup = await desk.post('/api/students').send({ name: 'Maya O.', email: 'ｍaya.okafor@example.test' });
    expect(dup.status).toBe(409);
    expect(dup.body.error.code).toBe('student_exists');
    expect(dup.body.error.message).toContain('Maya Okafor');
    expect(dup.body.error.details.studentId).toBe(res.body.id);
    expect(await ctx.db('students')).toHaveLength(1);

    const bad = await desk.post('/api/students').send({ name: '', email: 'not-an-address', phone: 'call me' });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.details.fields).sort()).toEqual(['email', 'name', 'phone']);
  });

  it('searches by name, e-mail and phone, and pages by keyset', async () => {
    const desk = await as(ctx, 'reception');
    for (let i = 0; i < 5; i++) await desk.post('/api/students').send({ name: `Zed ${i}`, email: `zed${i}@example.test`, phone: `0161 496 00${i}0` });
    await desk.post('/api/students').send({ name: 'Ada Lin', email: 'ada@lin.test', phone: '020 7946 0999' });
    expect((await desk.get('/api/students?q=ADA')).body.items.map((s: { name: string }) => s.name)).toEqual(['Ada Lin']);
    expect((await desk.get('/api/students?q=lin.test')).body.items).toHaveLength(1);
    expect((await desk.get('/api/students?q=0207946')).body.items.map((s: { name: string }) => s.name)).toEqual(['Ada Lin']);
    expect((await desk.get('/api/students?q=%25')).body.items).toEqual([]);

    const first = await desk.get('/api/students?limit=4');
    expect(first.body.items.map((s: { name: string }) => s.name)).toEqual(['Ada Lin', 'Zed 0', 'Zed 1', 'Zed 2']);
    expect(first.body.nextCursor).toEqual(expect.any(String));
    const second = await desk.get(`/api/students?limit=4&cursor=${first.body.nextCursor}`);
    expect(second.body).toEqual({ items: [expect.objectContaining({ name: 'Zed 3' }), expect.objectContaining({ name: 'Zed 4' })], nextCursor: null });
    expect((await desk.get('/api/students?cursor=nonsense')).status).toBe(400);
  });

  it('pages past a name beyond ASCII', async () => {
    const desk = await as(ctx, 'reception');
    await desk.post('/api/students').send({ name: 'Zoë Ångström', email: 'zoe@example.test' });
    await desk.post('/api/students').send({ name: 'Zoë Ångström', email: 'zoe2@example.test' });
    const first = await desk.get('/api/students?limit=1');
    const second = await desk.get(`/api/students?limit=1&cursor=${first.body.nextCursor}`);
    expect(second.status).toBe(200);
    expect(second.body.items[0].email).toBe('zoe2@example.test');
  });

  it('edits with the same validation and refuses an address another student has', async () => {
    const desk = await as(ctx, 'reception');
    const a = (await desk.post('/api/students').send({ name: 'Ana', email: 'ana@example.test' })).body;
    await desk.post('/api/students').send({ name: 'Bea', email: 'bea@example.test' });
    const clash = await desk.patch(`/api/students/${a.id}`).send({ email: 'BEA@example.test' });
    expect(clash.status).toBe(409);
    expect(clash.body.error.code).toBe('student_exists');
    const ok = await desk.patch(`/api/students/${a.id}`).send({ phone: '0113 496 0000', emergencyName: 'Ola' });
    expect(ok.status).toBe(200);
    expect(ok.body).toMatchObject({ phone: '0113 496 0000', emergencyName: 'Ola', email: 'ana@example.test' });
    expect((await desk.patch(`/api/students/${a.id}`).send({ name: 'x'.repeat(121) })).status).toBe(400);
    expect(await ctx.db('audit_entries').where({ action: 'student.updated' })).toHaveLength(1);
  });

  it('the owner merges a duplicate: places and waivers move to the kept student, audited; the desk may not merge', async () => {
    const owner = await as(ctx, 'owner');
    const desk = await as(ctx, 'reception');
    const roomId = await makeRoom(ctx.db);
    const p = await makePoint(ctx.db, { roomId, clearedAt: '2026-11-30T10:00:00Z', structuralRatingKn: 30 });
    for (const g of await makeStandardPath(ctx.db, p.id, { apparatus: { kind: 'fabric', inspectedUntil: '2027-01-30T00:00:00Z' } })) await ctx.db('gear_items').where({ id: g }).update({ inspected_until: '2027-01-30T00:00:00Z' });
    const [ct] = await ctx.db('class_types').insert({ name: 'Silks', apparatus: 'fabric', duration_minutes: 60, capacity: 8, performers_per_point: 1, dynamic_factor: 1, body_mass_kg: 60, created_at: new Date().toISOString() }).returning('id');
    const instructor = await makeUser(ctx.db, { role: 'instructor' });
    const session = await desk.post('/api/sessions').send({ classTypeId: (ct as { id: number }).id, instructorId: instructor.id, roomId, startsAt: '2026-12-03T18:00:00Z', endsAt: '2026-12-03T19:00:00Z', pointIds: [p.id] });
    const kept = (await desk.post('/api/students').send({ name: 'Kim Park', email: 'kim@example.test' })).body;
    const dup = (await desk.post('/api/students').send({ name: 'Kim Park', email: 'kim.park@example.test' })).body;
    const booking = await desk.post(`/api/sessions/${session.body.id}/bookings`).send({ studentId: dup.id });
    await owner.post('/api/waivers').send({ text: 'I understand aerial work carries risk and follow the instructor.' });
    await desk.post(`/api/students/${dup.id}/waiver`).send({ fullName: 'Kim Park' });

    expect((await desk.post(`/api/students/${dup.id}/merge`).send({ intoId: kept.id })).status).toBe(403);
    const merged = await owner.post(`/api/students/${dup.id}/merge`).send({ intoId: kept.id });
    expect(merged.status).toBe(200);
    expect(merged.body).toMatchObject({ id: kept.id, waiver: { state: 'valid' } });
    const page = await desk.get(`/api/students/${kept.id}`);
    expect(page.body.upcoming).toEqual([expect.objectContaining({ id: booking.body.id, status: 'booked', sessionId: session.body.id })]);
    expect((await desk.get(`/api/students/${dup.id}`)).status).toBe(404);
    expect((await desk.get('/api/students')).body.items.map((s: { id: number }) => s.id)).toEqual([kept.id]);
    const audit = await ctx.db('audit_entries').where({ action: 'student.merged' }).first();
    expect(JSON.parse(audit.after_json ?? audit.after ?? '{}')).toMatchObject({ mergedIntoId: kept.id, movedPlaces: [booking.body.id], movedWaivers: 1 });
    expect((await owner.post(`/api/students/${kept.id}/merge`).send({ intoId: kept.id })).status).toBe(400);
  });
});

describe('waivers', () => {
  it('the owner keeps versioned text; everyone signed in reads the current one; paper acceptance holds for the policy months', async () => {
    const owner = await as(ctx, 'owner');
    const desk = await as(ctx, 'reception');
    const rigger = await as(ctx, 'rigger');
    expect((await desk.post('/api/waivers').send({ text: 'Some waiver text that is long enough.' })).status).toBe(403);
    expect((await owner.post('/api/waivers').send({ text: 'short' })).status).toBe(400);
    const v1 = await owner.post('/api/waivers').send({ text: 'Version one of the waiver, long enough.' });
    const v2 = await owner.post('/api/waivers').send({ text: 'Version two of the waiver, long enough.' });
    expect([v1.body.version, v2.body.version]).toEqual([1, 2]);
    expect((await rigger.get('/api/waivers')).body).toMatchObject({ current: { version: 2 }, versions: [] });
    expect((await owner.get('/api/waivers')).body.versions.map((v: { version: number }) => v.version)).toEqual([2, 1]);

    const s = (await desk.post('/api/students').send({ name: 'Lee Ray', email: 'lee@example.test' })).body;
    const paper = await desk.post(`/api/students/${s.id}/waiver`).send({ fullName: 'Lee Ray', version: 1 });
    expect(paper.status).toBe(201);
    expect(paper.body).toMatchObject({ version: 1, method: 'paper', acceptedAt: '2026-12-01T10:00:00.000Z', validUntil: '2027-12-01T10:00:00.000Z' });
    expect((await desk.post(`/api/students/${s.id}/waiver`).send({ fullName: 'Lee Ray', signedOn: '2027-01-01' })).status).toBe(400);
    expect((await desk.post(`/api/students/${s.id}/waiver`).send({ fullName: 'Lee Ray', version: 9 })).status).toBe(400);
    ctx.clock.set('2027-12-01T10:00:00Z');
    expect((await desk.get(`/api/students/${s.id}`)).body.waiver.state).toBe('expired');
  });
});
