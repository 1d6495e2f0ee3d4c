import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { dropTrigger } from '../../server/db/dialect';
import { as, createTestApp, type TestContext } from '../helpers/app';
import { makeGear, makePoint, makeStandardPath } from '../helpers/factories';

let ctx: TestContext;
beforeEach(async () => {
  ctx = await createTestApp({ now: '2026-12-01T10:00:00Z' });
});
afterEach(async () => ctx.close());

const codes = (reasons: Array<{ code: string }>) => reasons.map((r) => r.code);
async function passAll(agent: Awaited<ReturnType<typeof as>>, pointId: number) {
  const list = await agent.get(`/api/points/${pointId}/checklist`);
  return agent.post(`/api/points/${pointId}/clearances`).send({ items: list.body.items.map((i: { key: string }) => ({ key: i.key, result: 'pass' })) });
}

describe('GET /api/points/:id/checklist', () => {
  it('builds the form from the load path: the structure, a row per link and the standing items', async () => {
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db);
    const ids = await makeStandardPath(ctx.db, p.id);
    const res = await rigger.get(`/api/points/${p.id}/checklist`);
    const keys = res.body.items.map((i: { key: string }) => i.key);
    expect(keys[0]).toBe('structure');
    expect(keys).toEqual(expect.arrayContaining(ids.map((id) => `link:${id}`)));
    expect(keys).toContain('screw_gates_down_locked');
    expect(keys).toContain('textile_removal_criteria');
  });
});

describe('POST /api/points/:id/clearances', () => {
  it('clears a point whose items all pass until the shortest interval, and renews every item’s inspection', async () => {
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db);
    const ids = await makeStandardPath(ctx.db, p.id);
    const res = await passAll(rigger, p.id);
    expect(res.status).toBe(201);
    // The round sling is a textile: 30 days [studio choice], so the point is cleared until 31 Dec.
    expect(res.body).toMatchObject({ cleared: true, clearedUntil: '2026-12-31T10:00:00.000Z', reasons: [] });
    expect(res.body.status.status).toBe('cleared');
    const sling = await rigger.get(`/api/gear/${ids[1]}`);
    const clamp = await rigger.get(`/api/gear/${ids[0]}`);
    expect(sling.body.inspectedUntil).toBe('2026-12-31T10:00:00.000Z');
    // Hardware: 90 days [studio choice].
    expect(clamp.body.inspectedUntil).toBe('2027-03-01T10:00:00.000Z');
  });

  it('answers 400 when an item is missing or unknown, and records nothing', async () => {
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db);
    await makeStandardPath(ctx.db, p.id);
    const missing = await rigger.post(`/api/points/${p.id}/clearances`).send({ items: [{ key: 'structure', result: 'pass' }] });
    expect(missing.status).toBe(400);
    expect(missing.body.error.code).toBe('checklist_mismatch');
    const unknown = await rigger.post(`/api/points/${p.id}/clearances`).send({ items: [{ key: 'made_up', result: 'pass' }] });
    expect(unknown.status).toBe(400);
    expect(await ctx.db('inspections').count({ n: '*' })).toEqual([{ n: 0 }]);
  });

  it('records a failed item as an inspection, opens a fault on that gear and does not clear', async () => {
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db);
    const ids = await makeStandardPath(ctx.db, p.id);
    const list = await rigger.get(`/api/points/${p.id}/checklist`);
    const items = list.body.items.map((i: { key: string }) => ({ key: i.key, result: i.key === `link:${ids[3]}` ? 'fail' : 'pass', note: i.key === `link:${ids[3]}` ? 'Bearing grinds' : undefined }));
    const res = await rigger.post(`/api/points/${p.id}/clearances`).send({ items });
    expect(res.status).toBe(201);
    expect(res.body.cleared).toBe(false);
    expect(res.body.faultIds).toHaveLength(1);
    const fault = await rigger.get(`/api/faults/${res.body.faultIds[0]}`);
    expect(fault.body).toMatchObject({ gearId: ids[3], status: 'open' });
    expect(fault.body.description).toContain('Bearing grinds');
    const status = await rigger.get(`/api/points/${p.id}/status`);
    expect(codes(status.body.reasons)).toContain('fault_open');
  });

  it('never answers "cleared" while a rule still blocks the point: quarantined gear in the path', async () => {
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db);
    const ids = await makeStandardPath(ctx.db, p.id);
    expect((await rigger.post(`/api/gear/${ids[1]}/quarantine`).send({ reason: 'Sent for checking' })).status).toBe(200);
    const res = await passAll(rigger, p.id);
    expect(res.status).toBe(201);
    expect(res.body.status.status).toBe('blocked');
    // The rigger's signature is on record, but the point is not cleared and has no "until".
    expect(res.body).toMatchObject({ cleared: false, clearanceSigned: true, clearedUntil: null });
    expect(codes(res.body.reasons)).toContain('gear_unfit');
  });

  it('is rigger only: the owner may not clear a point', async () => {
    const owner = await as(ctx, 'owner');
    const p = await makePoint(ctx.db);
    expect((await owner.post(`/api/points/${p.id}/clearances`).send({ items: [] })).status).toBe(403);
  });
});

describe('the fault loop', () => {
  it('blocks at once when reported, waits for a clearance after resolving, and reopens only when cleared', async () => {
    const rigger = await as(ctx, 'rigger');
    const instructor = await as(ctx, 'instructor');
    const p = await makePoint(ctx.db);
    const ids = await makeStandardPath(ctx.db, p.id);
    expect((await passAll(rigger, p.id)).body.cleared).toBe(true);

    const reported = await instructor.post('/api/faults').send({ gearId: ids[3], severity: 'low', description: 'Swivel squeaks' });
    expect(reported.status).toBe(201);
    let status = await instructor.get(`/api/points/${p.id}/status`);
    expect(status.body.status).toBe('blocked');
    expect(codes(status.body.reasons).sort()).toEqual(['awaiting_clearance', 'fault_open']);

    // A point's fault list includes the faults on the gear in its path.
    const list = await instructor.get(`/api/faults?pointId=${p.id}&status=open`);
    expect(list.body.items.map((f: { id: number }) => f.id)).toEqual([reported.body.id]);

    expect((await instructor.post(`/api/faults/${reported.body.id}/resolve`).send({ resolution: 'repaired', note: 'x' })).status).toBe(403);
    const resolved = await rigger.post(`/api/faults/${reported.body.id}/resolve`).send({ resolution: 'no_fault_found', note: 'Greased; turns freely' });
    expect(resolved.body.status).toBe('resolved');
    status = await rigger.get(`/api/points/${p.id}/status`);
    expect(codes(status.body.reasons)).toEqual(['awaiting_clearance']);

    expect((await passAll(rigger, p.id)).body.cleared).toBe(true);
    status = await rigger.get(`/api/points/${p.id}/status`);
    expect(status.body.status).toBe('cleared');
  });

  it('refuses to clear while a fault is open', async () => {
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db);
    await makeStandardPath(ctx.db, p.id);
    await rigger.post('/api/faults').send({ pointId: p.id, severity: 'medium', description: 'Beam clamp bolt loose' });
    const res = await passAll(rigger, p.id);
    expect(res.status).toBe(201);
    expect(res.body.cleared).toBe(false);
    expect(codes(res.body.reasons)).toContain('fault_open');
  });

  it('replaces a faulted item with stock: swaps it into the path and quarantines the old one', async () => {
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db);
    const ids = await makeStandardPath(ctx.db, p.id);
    const spare = await makeGear(ctx.db, { kind: 'swivel', majorKn: 36 });
    const f = await rigger.post('/api/faults').send({ gearId: ids[3], severity: 'high', description: 'Swivel binds' });
    const res = await rigger.post(`/api/faults/${f.body.id}/resolve`).send({ resolution: 'replaced', note: 'Swapped for spare', replacementGearId: spare, oldGearStatus: 'retired' });
    expect(res.status).toBe(200);
    const path = await rigger.get(`/api/points/${p.id}`);
    expect(path.body.links.map((l: { gearId: number }) => l.gearId)).toEqual([...ids.slice(0, 3), spare]);
    expect((await rigger.get(`/api/gear/${ids[3]}`)).body.status).toBe('retired');
  });

  it('takes a fault with photos as multipart, refusing a non-image', async () => {
    const instructor = await as(ctx, 'instructor');
    const p = await makePoint(ctx.db);
    const PNG = Buffer.from('89504e470d0a1a0a0000000d49484452000000010000000108060000001f15c4890000000d49444154789c63000100000500010d0a2db40000000049454e44ae426082', 'hex');
    const ok = await instructor.post('/api/faults').field('pointId', String(p.id)).field('severity', 'high').field('description', 'Frayed sling').attach('photos', PNG, 'sling.png');
    expect(ok.status).toBe(201);
    expect(ok.body.photos).toHaveLength(1);
    const bad = await instructor.post('/api/faults').field('pointId', String(p.id)).field('severity', 'high').field('description', 'Frayed sling').attach('photos', Buffer.from('not an image'), 'x.jpg');
    expect(bad.status).toBe(415);
    expect(await ctx.db('faults').count({ n: '*' })).toEqual([{ n: 1 }]);
  });
});

describe('gear inspected on its own', () => {
  it('returns a quarantined item to service after an after-incident pass, not after a periodic one', async () => {
    const rigger = await as(ctx, 'rigger');
    const g = await makeGear(ctx.db, { kind: 'hoop', material: 'steel', majorKn: 18 });
    await rigger.post(`/api/gear/${g}/events`).send({ kind: 'drop', note: 'Fell 2 m' });
    await rigger.post(`/api/gear/${g}/inspections`).send({ kind: 'periodic', result: 'pass' });
    expect((await rigger.get(`/api/gear/${g}`)).body.status).toBe('quarantined');
    const res = await rigger.post(`/api/gear/${g}/inspections`).send({ kind: 'after_incident', result: 'pass', note: 'No cracks' });
    expect(res.status).toBe(201);
    const gear = await rigger.get(`/api/gear/${g}`);
    expect(gear.body.status).toBe('in_service');
    // A hoop is hardware: 90 days [studio choice].
    expect(gear.body.inspectedUntil).toBe('2027-03-01T10:00:00.000Z');
  });

  it('opens a fault when it fails', async () => {
    const rigger = await as(ctx, 'rigger');
    const g = await makeGear(ctx.db, { kind: 'fabric', material: 'nylon', majorKn: 25 });
    await rigger.post(`/api/gear/${g}/inspections`).send({ kind: 'periodic', result: 'fail', note: 'Pulled threads' });
    const faults = await rigger.get(`/api/faults?gearId=${g}`);
    expect(faults.body.items).toHaveLength(1);
  });
});

describe('pre-use checks', () => {
  it('shows preuse_due until the check is done today, and a failed item opens a fault at once', async () => {
    const instructor = await as(ctx, 'instructor');
    const p = await makePoint(ctx.db);
    await makeStandardPath(ctx.db, p.id);
    let today = await instructor.get('/api/today');
    expect(today.body.points.find((x: { pointId: number }) => x.pointId === p.id)).toMatchObject({ preuseDue: true, preuse_due: true });
    const list = await instructor.get(`/api/points/${p.id}/preuse`);
    const items = list.body.items.map((i: { key: string }) => ({ key: i.key, result: 'pass' }));
    expect((await instructor.post(`/api/points/${p.id}/preuse`).send({ items })).status).toBe(201);
    today = await instructor.get('/api/today');
    expect(today.body.points.find((x: { pointId: number }) => x.pointId === p.id).preuseDue).toBe(false);
    // Next studio day it is due again.
    ctx.clock.advance(24 * 3600_000);
    today = await instructor.get('/api/today');
    expect(today.body.points.find((x: { pointId: number }) => x.pointId === p.id).preuseDue).toBe(true);

    items[0].result = 'fail';
    const failed = await instructor.post(`/api/points/${p.id}/preuse`).send({ items });
    expect(failed.body.faultIds).toHaveLength(1);
    expect(codes(failed.body.status.reasons)).toContain('fault_open');
  });

  it('takes “not applicable” on a row that offers it, recorded as such, and refuses it on any other row', async () => {
    const instructor = await as(ctx, 'instructor');
    const p = await makePoint(ctx.db);
    await makeStandardPath(ctx.db, p.id);
    const list = (await instructor.get(`/api/points/${p.id}/preuse`)).body.items as Array<{ key: string; notApplicable?: boolean }>;
    expect(list.filter((i) => i.notApplicable).map((i) => i.key)).toEqual(['basket_clear']);
    const answer = (naKey: string) => list.map((i) => ({ key: i.key, result: i.key === naKey ? 'not_applicable' : 'pass' }));
    const refused = await instructor.post(`/api/points/${p.id}/preuse`).send({ items: answer('connectors_locked') });
    expect(refused.status).toBe(400);
    expect(refused.body.error.details.fields.items).toMatch(/^Not applicable is not offered for: Gate closed and locked on /);
    const ok = await instructor.post(`/api/points/${p.id}/preuse`).send({ items: answer('basket_clear') });
    expect(ok.status).toBe(201);
    expect(ok.body.passed).toBe(true);
    expect(await ctx.db('inspection_items').where({ inspection_id: ok.body.inspectionId, key: 'basket_clear' }).first('result', 'note')).toEqual({ result: 'pass', note: 'Not applicable' });
  });
});

describe('audit trail', () => {
  it('chains every safety record and the database refuses edits of audit rows and inspections', async () => {
    const rigger = await as(ctx, 'rigger');
    const owner = await as(ctx, 'owner');
    const p = await makePoint(ctx.db);
    await makeStandardPath(ctx.db, p.id);
    await passAll(rigger, p.id);
    await rigger.post('/api/faults').send({ pointId: p.id, severity: 'low', description: 'Paint chipped on clamp' });
    const verify = await owner.get('/api/audit/verify');
    expect(verify.body).toMatchObject({ ok: true });
    expect(verify.body.entries).toBeGreaterThanOrEqual(2);
    await expect(ctx.db('audit_entries').update({ action: 'x' })).rejects.toThrow(/append-only/);
    await expect(ctx.db('audit_entries').delete()).rejects.toThrow(/append-only/);
    await expect(ctx.db('inspections').update({ result: 'pass' })).rejects.toThrow(/append-only/);
    expect((await rigger.get('/api/audit/verify')).status).toBe(403);
  });

  it('detects an entry edited behind the triggers’ back', async () => {
    const rigger = await as(ctx, 'rigger');
    const owner = await as(ctx, 'owner');
    const p = await makePoint(ctx.db);
    await makeStandardPath(ctx.db, p.id);
    await passAll(rigger, p.id);
    await rigger.post('/api/faults').send({ pointId: p.id, severity: 'low', description: 'Scuff' });
    await dropTrigger(ctx.db, 'audit_entries', 'audit_entries_no_update');
    await ctx.db('audit_entries').where({ id: 1 }).update({ actor_id: null });
    const verify = await owner.get('/api/audit/verify');
    expect(verify.body).toMatchObject({ ok: false, firstBadId: 1 });
  });
});

describe('GET /api/inspections/export.csv', () => {
  it('exports the log with a header and one row per item, times in the studio’s zone', async () => {
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db, { label: 'EXP-1' });
    await makeStandardPath(ctx.db, p.id);
    await passAll(rigger, p.id);
    const res = await rigger.get('/api/inspections/export.csv');
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/text\/csv/);
    const lines = res.text.trim().split('\n');
    expect(lines[0]).toContain('inspected at (Europe/London)');
    expect(lines.length).toBeGreaterThan(5);
    expect(lines[1]).toContain('EXP-1');
    expect(lines[1]).toContain('1 Dec 2026, 10:00');
  });
});
