import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { as, createTestApp, type TestContext } from '../helpers/app';
import { makePoint, makeRoom, makeStandardPath, makeUser } from '../helpers/factories';

let ctx: TestContext;
beforeEach(async () => {
  ctx = await createTestApp({ now: '2026-12-01T10:00:00Z' });
});
afterEach(async () => ctx.close());

const silks = { name: 'Silks basics', apparatus: 'fabric', durationMinutes: 60, capacity: 8, performersPerPoint: 1 };

/** A room with one cleared point carrying a fabric, and an instructor. */
async function bookableRoom() {
  const roomId = await makeRoom(ctx.db);
  const p = await makePoint(ctx.db, { roomId, clearedAt: '2026-11-30T10:00:00Z', structuralRatingKn: 30 });
  const ids = await makeStandardPath(ctx.db, p.id, { apparatus: { kind: 'fabric', inspectedUntil: '2027-01-30T00:00:00Z' } });
  for (const g of ids) await ctx.db('gear_items').where({ id: g }).update({ inspected_until: '2027-01-30T00:00:00Z' });
  const instructor = await makeUser(ctx.db, { role: 'instructor' });
  return { roomId, pointIds: [p.id], instructorId: instructor.id };
}
const at = (day: number) => ({ startsAt: `2026-12-0${day}T18:00:00Z`, endsAt: `2026-12-0${day}T19:00:00Z` });

describe('PATCH /api/class-types/:id: rename', () => {
  it('renames a class type; its classes already booked show the new name', async () => {
    const desk = await as(ctx, 'reception');
    const room = await bookableRoom();
    const ct = (await desk.post('/api/class-types').send(silks)).body;
    const booked = await desk.post('/api/sessions').send({ classTypeId: ct.id, ...room, ...at(3) });
    expect(booked.status).toBe(201);
    const res = await desk.patch(`/api/class-types/${ct.id}`).send({ name: 'Silks for beginners' });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ id: ct.id, name: 'Silks for beginners', active: true });
    expect((await desk.get(`/api/sessions/${booked.body.id}`)).body.className).toBe('Silks for beginners');
    const audit = await ctx.db('audit_entries').where({ action: 'class_type.updated', entity_id: ct.id });
    expect(audit).toHaveLength(1);
  });

  it('refuses a name another type has, look-alikes included, with 409 naming it and nothing changed', async () => {
    const owner = await as(ctx, 'owner');
    await owner.post('/api/class-types').send({ ...silks, name: 'Aerial Hoop', apparatus: 'hoop' });
    const ct = (await owner.post('/api/class-types').send(silks)).body;
    const res = await owner.patch(`/api/class-types/${ct.id}`).send({ name: 'Аerial Ηoop' }); // Cyrillic А, Greek Η
    expect(res.status).toBe(409);
    expect(res.body.error).toMatchObject({ code: 'name_taken', details: { existing: 'Aerial Hoop', fields: { name: expect.stringContaining('Aerial Hoop') } } });
    expect((await owner.get(`/api/class-types/${ct.id}`)).body.name).toBe('Silks basics');
  });

  it('lets a type keep its own name in another case', async () => {
    const desk = await as(ctx, 'reception');
    const ct = (await desk.post('/api/class-types').send(silks)).body;
    const res = await desk.patch(`/api/class-types/${ct.id}`).send({ name: 'SILKS BASICS' });
    expect(res.status).toBe(200);
    expect(res.body.name).toBe('SILKS BASICS');
  });

  it('answers 400 with field messages in plain words for an empty or unknown change', async () => {
    const desk = await as(ctx, 'reception');
    const ct = (await desk.post('/api/class-types').send(silks)).body;
    const empty = await desk.patch(`/api/class-types/${ct.id}`).send({});
    expect(empty.status).toBe(400);
    expect(JSON.stringify(empty.body.error.details)).toMatch(/Nothing to change/);
    const blank = await desk.patch(`/api/class-types/${ct.id}`).send({ name: '  ' });
    expect(blank.status).toBe(400);
    expect(blank.body.error.details.fields.name).toBe('Enter a class name');
    const extra = await desk.patch(`/api/class-types/${ct.id}`).send({ capacity: 3 });
    expect(extra.status).toBe(400);
    expect((await desk.get(`/api/class-types/${ct.id}`)).body.capacity).toBe(8);
    expect((await desk.patch('/api/class-types/9999').send({ name: 'Nobody' })).status).toBe(404);
  });

  it('lets the desk and the owner change class types, and no one else', async () => {
    const desk = await as(ctx, 'reception');
    const ct = (await desk.post('/api/class-types').send(silks)).body;
    for (const role of ['instructor', 'rigger'] as const) {
      const other = await as(ctx, role);
      expect((await other.patch(`/api/class-types/${ct.id}`).send({ active: false })).status).toBe(403);
    }
    expect((await desk.get(`/api/class-types/${ct.id}`)).body.active).toBe(true);
  });
});

describe('PATCH /api/class-types/:id: retire and bring back', () => {
  it('refuses a new booking of a retired type with a field message, keeps its booked classes, and takes bookings again once brought back', async () => {
    const desk = await as(ctx, 'reception');
    const room = await bookableRoom();
    const ct = (await desk.post('/api/class-types').send(silks)).body;
    const booked = await desk.post('/api/sessions').send({ classTypeId: ct.id, ...room, ...at(3) });
    expect(booked.status).toBe(201);

    const retired = await desk.patch(`/api/class-types/${ct.id}`).send({ active: false });
    expect(retired.status).toBe(200);
    expect(retired.body.active).toBe(false);
    expect((await desk.get('/api/class-types')).body.find((c: { id: number }) => c.id === ct.id)).toMatchObject({ active: false });

    const refused = await desk.post('/api/sessions').send({ classTypeId: ct.id, ...room, ...at(4) });
    expect(refused.status).toBe(400);
    expect(refused.body.error.details.fields.classTypeId).toMatch(/retired/);
    expect(await ctx.db('sessions').count({ n: '*' })).toEqual([{ n: 1 }]);

    // The class already booked keeps its type and name, and can still be moved.
    const existing = await desk.get(`/api/sessions/${booked.body.id}`);
    expect(existing.body).toMatchObject({ className: 'Silks basics', cancelled: false });
    const moved = await desk.patch(`/api/sessions/${booked.body.id}`).send(at(5));
    expect(moved.status).toBe(200);

    const back = await desk.patch(`/api/class-types/${ct.id}`).send({ active: true });
    expect(back.body.active).toBe(true);
    expect((await desk.post('/api/sessions').send({ classTypeId: ct.id, ...room, ...at(4) })).status).toBe(201);
    const actions = (await ctx.db('audit_entries').where({ entity: 'class_type', entity_id: ct.id }).orderBy('id').select('action')).map((r: { action: string }) => r.action);
    expect(actions).toEqual(['class_type.created', 'class_type.retired', 'class_type.restored']);
  });

  it('records nothing when the change changes nothing', async () => {
    const desk = await as(ctx, 'reception');
    const ct = (await desk.post('/api/class-types').send(silks)).body;
    expect((await desk.patch(`/api/class-types/${ct.id}`).send({ active: true, name: 'Silks basics' })).status).toBe(200);
    expect(await ctx.db('audit_entries').where({ entity: 'class_type', entity_id: ct.id }).count({ n: '*' })).toEqual([{ n: 1 }]);
  });
});
