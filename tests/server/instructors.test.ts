import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import { as, createTestApp, type TestContext } from '../helpers/app';
import { makeUser } from '../helpers/factories';
import { staffRoles as roles } from '../../shared/schemas/vocabulary';
import { instructorListSchema } from '../../shared/schemas/staff';

let ctx: TestContext;
let ids: Record<string, number>;

beforeEach(async () => {
  ctx = await createTestApp();
  ids = {};
  // Active instructors in an order the database would not sort them into by itself.
  for (const name of ['zoë Quill', 'Cal 10', 'Émile Roux', 'bea Lind', 'Adam Reyes', 'Cal 9']) ids[name] = (await makeUser(ctx.db, { role: 'instructor', name })).id;
  // Not instructors to pick: a deactivated instructor, and people with other roles.
  await makeUser(ctx.db, { role: 'instructor', name: 'Aaron Gone', active: false });
  for (const role of ['rigger', 'reception', 'owner'] as const) await makeUser(ctx.db, { role, name: `Aardvark ${role}` });
});
afterEach(async () => ctx.close());

const expected = (also: Record<string, number> = {}) => {
  const all = { ...ids, ...also };
  return ['Adam Reyes', 'bea Lind', 'Cal 9', 'Cal 10', 'Dana Caller', 'Émile Roux', 'zoë Quill'].filter((n) => n in all).map((name) => ({ id: all[name], name }));
};

describe('GET /api/instructors', () => {
  for (const role of roles) {
    it(`answers ${role} with only the active instructors, sorted by name, as id and name alone`, async () => {
      const caller = await as(ctx, role, { name: role === 'instructor' ? 'Dana Caller' : `Caller ${role}` });
      const res = await caller.get('/api/instructors');
      expect(res.status).toBe(200);
      // The signed-in instructor is an active instructor too, so they are on the list.
      expect(res.body).toStrictEqual(expected(role === 'instructor' ? { 'Dana Caller': caller.user.id } : {}));
      for (const item of res.body) expect(Object.keys(item).sort()).toEqual(['id', 'name']);
      expect(res.text).not.toContain('@');
      expect(instructorListSchema.safeParse(res.body).success).toBe(true);
    });
  }

  it('answers 401 with the error shape when signed out', async () => {
    const res = await request(ctx.app).get('/api/instructors');
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBeTypeOf('string');
    expect(res.body.error.message).toBeTypeOf('string');
  });

  it('drops a deactivated instructor and adds someone made instructor on the very next request', async () => {
    const owner = await as(ctx, 'owner');
    const rigger = await as(ctx, 'rigger', { name: 'Dana Caller' });
    expect((await owner.patch(`/api/users/${ids['bea Lind']}`).send({ active: false })).status).toBe(200);
    expect((await owner.patch(`/api/users/${rigger.user.id}`).send({ role: 'instructor' })).status).toBe(200);
    const { 'bea Lind': _gone, ...rest } = ids;
    ids = rest;
    // A role change ends the person's own sessions (DEVELOPERS.md, "Sign-in and sessions"); the list changes for everyone else at once.
    expect((await rigger.get('/api/instructors')).status).toBe(401);
    const res = await owner.get('/api/instructors');
    expect(res.status).toBe(200);
    expect(res.body).toStrictEqual(expected({ 'Dana Caller': rigger.user.id }));
  });

  it('leaves the staff list to the desk: instructors and riggers still get 403 from /api/users', async () => {
    for (const role of ['instructor', 'rigger'] as const) {
      const caller = await as(ctx, role);
      expect((await caller.get('/api/users')).status).toBe(403);
      expect((await caller.get('/api/instructors')).status).toBe(200);
    }
  });
});
