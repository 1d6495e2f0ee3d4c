import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { as, createTestApp, type TestContext } from '../helpers/app';
import { makeGear } from '../helpers/factories';

// Gear data that cannot be true is refused next to its field, on create and on edit, and nothing is saved.

let ctx: TestContext;
beforeEach(async () => {
  ctx = await createTestApp({ now: '2026-12-01T10:00:00Z' });
});
afterEach(async () => ctx.close());

const carabiner = (extra: Record<string, unknown> = {}) => ({ kind: 'carabiner', material: 'steel', gate: 'screw', majorKn: 22, multiDirectional: false, serial: 'CB-FACT', ...extra });
const gearCount = async () => Number((await ctx.db('gear_items').count({ n: '*' }))[0].n);

describe('POST /api/gear with data that cannot be true', () => {
  const cases: Array<[string, Record<string, unknown>, string, RegExp]> = [
    ['an in-service date before manufacture', { manufacturedOn: '2024-05-01', inServiceOn: '2023-01-10' }, 'inServiceOn', /cannot go into service before it was manufactured/],
    ['a working load limit above the major rating (1,100 kN on a 22 kN carabiner)', { wllKn: 1100 }, 'wllKn', /working load limit cannot exceed the major-axis breaking strength/],
    ['a manufacture date in the future (2099)', { manufacturedOn: '2099-01-01' }, 'manufacturedOn', /cannot be in the future/],
    ['a manufacture date in year 0001', { manufacturedOn: '0001-01-01' }, 'manufacturedOn', /before 1950/],
    ['an in-service date in 1900', { inServiceOn: '1900-06-01' }, 'inServiceOn', /before 1950/],
    ['an in-service date more than a year ahead', { inServiceOn: '2099-01-01' }, 'inServiceOn', /within the next year/],
  ];
  for (const [what, extra, field, message] of cases) {
    it(`refuses ${what} with 400 and a message next to ${field}, saving nothing`, async () => {
      const rigger = await as(ctx, 'rigger');
      const res = await rigger.post('/api/gear').send(carabiner(extra));
      expect(res.status).toBe(400);
      expect(res.body.error.code).toBe('invalid_request');
      expect(res.body.error.details.fields[field]).toMatch(message);
      expect(await gearCount()).toBe(0);
    });
  }

  it('refuses a manufacture date one day after the studio’s today, which the schema alone lets through', async () => {
    const rigger = await as(ctx, 'rigger');
    // The fixed clock says 1 Dec 2026 in London; the schema only knows the machine's date.
    const res = await rigger.post('/api/gear').send(carabiner({ manufacturedOn: '2026-12-02' }));
    expect(res.status).toBe(400);
    expect(res.body.error.details.fields.manufacturedOn).toMatch(/cannot be in the future/);
    expect(await gearCount()).toBe(0);
  });

  it('accepts gear made today and put into service within the next year (registered before use)', async () => {
    const rigger = await as(ctx, 'rigger');
    const res = await rigger.post('/api/gear').send(carabiner({ manufacturedOn: '2026-12-01', inServiceOn: '2027-03-01', wllKn: 4.4 }));
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ manufacturedOn: '2026-12-01', inServiceOn: '2027-03-01', wllKn: 4.4 });
  });
});

describe('PATCH /api/gear/:id with data that cannot be true', () => {
  it('refuses an in-service date before the stored manufacture date, leaving the item unchanged', async () => {
    const rigger = await as(ctx, 'rigger');
    const created = await rigger.post('/api/gear').send(carabiner({ manufacturedOn: '2024-05-01', inServiceOn: '2024-06-01' }));
    expect(created.status).toBe(201);
    const res = await rigger.patch(`/api/gear/${created.body.id}`).send({ inServiceOn: '2024-01-01' });
    expect(res.status).toBe(400);
    expect(res.body.error.details.fields.inServiceOn).toMatch(/cannot go into service before it was manufactured/);
    expect((await rigger.get(`/api/gear/${created.body.id}`)).body.inServiceOn).toBe('2024-06-01');
  });

  it('refuses a working load limit above the stored major rating, leaving the item unchanged', async () => {
    const rigger = await as(ctx, 'rigger');
    const id = await makeGear(ctx.db, { majorKn: 22 });
    const res = await rigger.patch(`/api/gear/${id}`).send({ wllKn: 1100 });
    expect(res.status).toBe(400);
    expect(res.body.error.details.fields.wllKn).toMatch(/cannot exceed the major-axis breaking strength/);
    expect((await rigger.get(`/api/gear/${id}`)).body.wllKn).toBeNull();
  });

  it('refuses lowering the major rating below the stored working load limit, naming the limit', async () => {
    const rigger = await as(ctx, 'rigger');
    const id = await makeGear(ctx.db, { majorKn: 22, wllKn: 5 });
    const res = await rigger.patch(`/api/gear/${id}`).send({ majorKn: 4 });
    expect(res.status).toBe(400);
    expect(res.body.error.details.fields.wllKn).toMatch(/cannot exceed/);
    expect((await rigger.get(`/api/gear/${id}`)).body.majorKn).toBe(22);
  });

  it('refuses a manufacture date in the future on edit', async () => {
    const rigger = await as(ctx, 'rigger');
    const id = await makeGear(ctx.db, {});
    const res = await rigger.patch(`/api/gear/${id}`).send({ manufacturedOn: '2099-01-01' });
    expect(res.status).toBe(400);
    expect(res.body.error.details.fields.manufacturedOn).toMatch(/cannot be in the future/);
  });
});
