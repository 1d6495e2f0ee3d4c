import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { as, createTestApp, type TestContext } from '../helpers/app';
import { makeGear, makePoint, makeRoom, makeStandardPath, makeUser } from '../helpers/factories';

/*
 * PRODUCT.md §10: every change it lists leaves an entry in the audit chain, naming who, what and
 * which record, with the before and after where there is one.
 */
let ctx: TestContext;
beforeEach(async () => {
  ctx = await createTestApp({ now: '2026-12-01T10:00:00Z' });
});
afterEach(async () => ctx.close());

type Agent = Awaited<ReturnType<typeof as>>;
const newest = async (action: string) => {
  const row = await ctx.db('audit_entries').where({ action }).orderBy('id', 'desc').first();
  expect(row, `an audit entry ${action}`).toBeDefined();
  return { ...row, before: row.before_json ? JSON.parse(row.before_json) : null, after: row.after_json ? JSON.parse(row.after_json) : null };
};

async function passAll(agent: Agent, pointId: number) {
  const list = await agent.get(`/api/points/${pointId}/checklist`);
  return agent.post(`/api/points/${pointId}/clearances`).send({ items: list.body.items.map((i: { key: string }) => ({ key: i.key, result: 'pass' })) });
}

describe('the audit records every change of §10', () => {
  it('a policy change, with the policy before and after', async () => {
    const owner = await as(ctx, 'owner');
    const { policy } = (await owner.get('/api/studio')).body;
    expect((await owner.patch('/api/studio').send({ policy: { ...policy, warningDays: 14, requiredFactor: 6 } })).status).toBe(200);
    const e = await newest('studio.policy_changed');
    expect(e).toMatchObject({ actor_id: owner.user.id, entity: 'studio' });
    expect(e.before.policy).toMatchObject({ warningDays: 7, requiredFactor: 5 });
    expect(e.after.policy).toMatchObject({ warningDays: 14, requiredFactor: 6 });
    expect(e.after.changes).toEqual([{ field: 'warningDays', before: 7, after: 14 }, { field: 'requiredFactor', before: 5, after: 6 }]);
    // Saving the same policy again changes nothing and records nothing.
    await owner.patch('/api/studio').send({ policy: { ...policy, warningDays: 14, requiredFactor: 6 } });
    expect(await ctx.db('audit_entries').where({ action: 'studio.policy_changed' }).count({ n: '*' })).toEqual([{ n: 1 }]);
  });

  it('a password reset, naming whose without the password or its hash', async () => {
    const owner = await as(ctx, 'owner');
    const staff = await makeUser(ctx.db, { role: 'reception', email: 'desk@example.test' });
    expect((await owner.post(`/api/users/${staff.id}/password`).send({ password: 'a-new-long-passphrase-42' })).status).toBe(200);
    const e = await newest('user.password_reset');
    expect(e).toMatchObject({ actor_id: owner.user.id, entity: 'user', entity_id: staff.id });
    expect(e.after).toEqual({ email: 'desk@example.test' });
    const hash = (await ctx.db('users').where({ id: staff.id }).first('password_hash')).password_hash;
    expect(JSON.stringify(e)).not.toContain(hash);
    expect(JSON.stringify(e)).not.toContain('a-new-long-passphrase-42');
  });

  it('role and active changes, each named', async () => {
    const owner = await as(ctx, 'owner');
    const staff = await makeUser(ctx.db, { role: 'reception' });
    await owner.patch(`/api/users/${staff.id}`).send({ role: 'rigger' });
    expect(await newest('user.role_changed')).toMatchObject({ entity_id: staff.id, before: { role: 'reception' }, after: { role: 'rigger' } });
    await owner.patch(`/api/users/${staff.id}`).send({ active: false });
    expect(await newest('user.deactivated')).toMatchObject({ entity_id: staff.id, before: { active: true }, after: { active: false } });
    await owner.patch(`/api/users/${staff.id}`).send({ active: true });
    expect(await newest('user.reactivated')).toMatchObject({ entity_id: staff.id, after: { active: true } });
  });

  it('a document added, and a fault photo', async () => {
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db);
    const pdf = Buffer.from('%PDF-1.4\n1 0 obj\n<< /Type /Catalog >>\nendobj\ntrailer\n<< /Root 1 0 R >>\n%%EOF\n');
    const res = await rigger.post(`/api/points/${p.id}/documents`).field('kind', 'assessment').attach('file', pdf, 'engineer-assessment.pdf');
    expect(res.status).toBe(201);
    expect(await newest('document.added')).toMatchObject({ actor_id: rigger.user.id, entity: 'document', entity_id: res.body.id, after: { ownerType: 'point', ownerId: p.id, kind: 'assessment', name: 'engineer-assessment.pdf', mime: 'application/pdf' } });
    const fault = await rigger.post('/api/faults').field('pointId', String(p.id)).field('severity', 'low').field('description', 'Paint flaking').attach('photos', pdf, 'flaking.pdf');
    expect(fault.status).toBe(201);
    expect(await newest('document.added')).toMatchObject({ after: { ownerType: 'fault', ownerId: fault.body.id, kind: 'photo', name: 'flaking.pdf' } });
  });

  it('gear edits, with before and after', async () => {
    const rigger = await as(ctx, 'rigger');
    const g = await makeGear(ctx.db, { kind: 'carabiner', majorKn: 40, serial: 'AUD-1' });
    expect((await rigger.patch(`/api/gear/${g}`).send({ majorKn: 45 })).status).toBe(200);
    expect(await newest('gear.updated')).toMatchObject({ entity_id: g, before: { majorKn: 40, serial: 'AUD-1' }, after: { majorKn: 45 } });
  });

  it('load paths, faults and inspections', async () => {
    const rigger = await as(ctx, 'rigger');
    const instructor = await as(ctx, 'instructor');
    const p = await makePoint(ctx.db);
    const ids = await makeStandardPath(ctx.db, p.id);
    const links = ids.map((gearId) => ({ gearId, mode: 'major', threeWay: false, basketOverHalf: false }));
    expect((await rigger.put(`/api/points/${p.id}/load-path`).send({ links: links.slice(0, 3) })).status).toBe(200);
    expect(await newest('point.load_path_replaced')).toMatchObject({ entity_id: p.id });
    expect((await newest('point.load_path_replaced')).after).toHaveLength(3);
    await rigger.put(`/api/points/${p.id}/load-path`).send({ links });

    const cleared = await passAll(rigger, p.id);
    expect(await newest('point.cleared')).toMatchObject({ entity_id: p.id, after: { inspectionId: cleared.body.inspectionId, cleared: true, keptUntil: '2026-12-31T10:00:00.000Z' } });
    const preuse = await instructor.get(`/api/points/${p.id}/preuse`);
    await instructor.post(`/api/points/${p.id}/preuse`).send({ items: preuse.body.items.map((i: { key: string }) => ({ key: i.key, result: 'pass' })) });
    expect(await newest('point.preuse_checked')).toMatchObject({ actor_id: instructor.user.id, entity_id: p.id });
    const spare = await makeGear(ctx.db, { kind: 'fabric', material: 'nylon' });
    await rigger.post(`/api/gear/${spare}/inspections`).send({ kind: 'periodic', result: 'pass' });
    expect(await newest('gear.inspected')).toMatchObject({ entity_id: spare });

    const fault = await instructor.post('/api/faults').send({ pointId: p.id, severity: 'medium', description: 'Sling worn' });
    expect(await newest('fault.opened')).toMatchObject({ actor_id: instructor.user.id, entity_id: fault.body.id, after: { pointId: p.id, description: 'Sling worn' } });
    await rigger.post(`/api/faults/${fault.body.id}/resolve`).send({ resolution: 'no_fault_found', note: 'Wear within limits' });
    expect(await newest('fault.resolved')).toMatchObject({ entity_id: fault.body.id, before: { status: 'open' }, after: { resolution: 'no_fault_found' } });
  });

  it('sessions booked, moved and cancelled', async () => {
    const rigger = await as(ctx, 'rigger');
    const desk = await as(ctx, 'reception');
    const roomId = await makeRoom(ctx.db);
    const p = await makePoint(ctx.db, { roomId, structuralRatingKn: 30 });
    await makeStandardPath(ctx.db, p.id, { apparatus: { kind: 'fabric', inspectedUntil: '2027-03-01T00:00:00Z' } });
    await passAll(rigger, p.id);
    const [ct] = await ctx.db('class_types').insert({ name: 'Silks', apparatus: 'fabric', duration_minutes: 60, capacity: 8, performers_per_point: 1, created_at: new Date().toISOString() }).returning('id');
    const instructor = await makeUser(ctx.db, { role: 'instructor' });
    const booked = await desk.post('/api/sessions').send({ classTypeId: (ct as { id: number }).id, instructorId: instructor.id, roomId, startsAt: '2026-12-03T18:00:00Z', endsAt: '2026-12-03T19:00:00Z', pointIds: [p.id] });
    expect(booked.status).toBe(201);
    expect(await newest('session.booked')).toMatchObject({ actor_id: desk.user.id, entity_id: booked.body.id });
    expect((await desk.patch(`/api/sessions/${booked.body.id}`).send({ startsAt: '2026-12-04T18:00:00Z', endsAt: '2026-12-04T19:00:00Z' })).status).toBe(200);
    expect(await newest('session.moved')).toMatchObject({ entity_id: booked.body.id, before: { startsAt: '2026-12-03T18:00:00.000Z' }, after: { startsAt: '2026-12-04T18:00:00Z' } });
    expect((await desk.post(`/api/sessions/${booked.body.id}/cancel`).send({ reason: 'Instructor ill' })).status).toBe(200);
    expect(await newest('session.cancelled')).toMatchObject({ entity_id: booked.body.id, after: { reason: 'Instructor ill' } });
  });
});
