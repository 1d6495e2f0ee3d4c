import { createHash } from 'node:crypto';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { APP_URL, as, createTestApp, TEST_AUDIT_KEY, type TestContext } from '../helpers/app';
import { makePoint, makeRoom, makeStandardPath, makeUser } from '../helpers/factories';
import { dropTrigger } from '../../server/db/dialect';
import { runMailCycle } from '../../server/mail/worker';
import { formatHead } from '../../server/modules/audit/audit.repository';
import { seedDemoIfEmpty } from '../../seeds';

let ctx: TestContext;
beforeEach(async () => {
  ctx = await createTestApp({ now: '2026-12-01T10:00:00Z' });
});
afterEach(async () => ctx.close());

const HOUR = 3_600_000;
type Agent = Awaited<ReturnType<typeof as>>;

async function passAll(agent: Agent, pointId: number) {
  const list = await agent.get(`/api/points/${pointId}/checklist`);
  return agent.post(`/api/points/${pointId}/clearances`).send({ items: list.body.items.map((i: { key: string }) => ({ key: i.key, result: 'pass' })) });
}

/** A room with points cleared by a rigger through the API (textile sling: 30 days), a class type and an instructor. */
async function studio(rigger: Agent, n = 2) {
  const roomId = await makeRoom(ctx.db);
  const points: number[] = [];
  for (let i = 0; i < n; i++) {
    const p = await makePoint(ctx.db, { roomId, label: `R-${i + 1}`, structuralRatingKn: 30 });
    await makeStandardPath(ctx.db, p.id, { apparatus: { kind: 'fabric', inspectedUntil: '2027-03-01T00:00:00Z' } });
    expect((await passAll(rigger, p.id)).body.cleared).toBe(true);
    points.push(p.id);
  }
  const [ct] = await ctx.db('class_types').insert({ name: `Silks ${roomId}`, apparatus: 'fabric', duration_minutes: 60, capacity: 8, performers_per_point: 1, created_at: new Date().toISOString() }).returning('id');
  const instructor = await makeUser(ctx.db, { role: 'instructor' });
  return { roomId, points, classTypeId: (ct as { id: number }).id, instructorId: instructor.id };
}

async function book(desk: Agent, s: Awaited<ReturnType<typeof studio>>, startsAt: string) {
  const res = await desk.post('/api/sessions').send({ classTypeId: s.classTypeId, instructorId: s.instructorId, roomId: s.roomId, startsAt, endsAt: new Date(Date.parse(startsAt) + HOUR).toISOString(), pointIds: s.points });
  expect(res.status).toBe(201);
  return res.body.id as number;
}

const cycle = () => runMailCycle({ db: ctx.db, mailer: { send: async () => undefined, close: () => undefined }, clock: ctx.clock, appUrl: APP_URL, log: () => undefined });
const entries = async (action: string) => ctx.db('audit_entries').where({ action }).orderBy('id');

describe('a session keeps its points as they stood at its start (PRODUCT.md §10)', () => {
  it('shows a past class with the status it had at its start after a fault is opened today, places included', async () => {
    const rigger = await as(ctx, 'rigger');
    const desk = await as(ctx, 'reception');
    const s = await studio(rigger);
    const id = await book(desk, s, '2026-12-01T18:00:00Z');
    // Monday's class starts; the worker's next cycle keeps its record.
    ctx.clock.set('2026-12-01T18:00:10Z');
    expect((await cycle()).sessionPointsRecorded).toBe(2);
    // Wednesday: a fault is opened on one of its points.
    ctx.clock.set('2026-12-03T09:00:00Z');
    expect((await rigger.post('/api/faults').send({ pointId: s.points[0], severity: 'high', description: 'Clamp bolt loose' })).status).toBe(201);
    expect((await desk.get(`/api/points/${s.points[0]}`)).body.status.status).toBe('blocked');

    const drawer = await desk.get(`/api/sessions/${id}`);
    expect(drawer.body.recordedAtStart).toBe(true);
    expect(drawer.body.points.map((p: { status: string }) => p.status)).toEqual(['cleared', 'cleared']);
    expect(drawer.body.points.flatMap((p: { reasons: unknown[] }) => p.reasons)).toEqual([]);
    expect(drawer.body.points[0]).toMatchObject({ label: 'R-1', recordedAt: '2026-12-01T18:00:10.000Z', apparatus: { kind: 'fabric' } });
    expect(drawer.body.places).toBe(2);

    const calendar = await desk.get('/api/sessions?from=2026-12-01T00:00:00Z&to=2026-12-02T00:00:00Z');
    const listed = calendar.body.find((x: { id: number }) => x.id === id);
    expect(listed.points.map((p: { status: string }) => p.status)).toEqual(['cleared', 'cleared']);
    expect(listed.places).toBe(2);

    const history = await desk.get(`/api/points/${s.points[0]}/records`);
    expect(history.status).toBe(200);
    expect(history.body.items).toHaveLength(1);
    expect(history.body.items[0]).toMatchObject({ sessionId: id, status: 'cleared', reasons: [], startsAt: '2026-12-01T18:00:00.000Z' });
  });

  it('keeps the record when a started class is first read before the worker runs, and never rewrites it', async () => {
    const rigger = await as(ctx, 'rigger');
    const desk = await as(ctx, 'reception');
    const s = await studio(rigger, 1);
    const id = await book(desk, s, '2026-12-01T18:00:00Z');
    ctx.clock.set('2026-12-01T18:00:05Z');
    expect((await desk.get(`/api/sessions/${id}`)).body.points[0]).toMatchObject({ status: 'cleared', recordedAt: '2026-12-01T18:00:05.000Z' });
    // A fault within the class, then the worker's cycle: the record stands as first kept.
    expect((await rigger.post('/api/faults').send({ pointId: s.points[0], severity: 'low', description: 'Scuff' })).status).toBe(201);
    expect((await cycle()).sessionPointsRecorded).toBe(0);
    expect((await desk.get(`/api/sessions/${id}`)).body.points[0].status).toBe('cleared');
    await expect(ctx.db('session_records').update({ status: 'blocked' })).rejects.toThrow(/append-only/);
    await expect(ctx.db('session_records').delete()).rejects.toThrow(/append-only/);
  });

  it('records a blocked point at the start as blocked, with its reasons, and counts no place for it', async () => {
    const rigger = await as(ctx, 'rigger');
    const desk = await as(ctx, 'reception');
    const s = await studio(rigger);
    const id = await book(desk, s, '2026-12-01T18:00:00Z');
    ctx.clock.set('2026-12-01T17:00:00Z');
    await rigger.post('/api/faults').send({ pointId: s.points[1], severity: 'medium', description: 'Sling frayed' });
    ctx.clock.set('2026-12-01T18:00:03Z');
    await cycle();
    const drawer = await desk.get(`/api/sessions/${id}`);
    expect(drawer.body.points.map((p: { status: string }) => p.status)).toEqual(['cleared', 'blocked']);
    expect(drawer.body.points[1].reasons.map((r: { code: string }) => r.code)).toContain('fault_open');
    expect(drawer.body.places).toBe(1);
  });
});

describe('GET /api/points/:id/status?at=', () => {
  it('refuses a past instant with past_instant and the way to the point’s history, even before the point was ever cleared', async () => {
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db, { label: 'PAST-1' });
    await makeStandardPath(ctx.db, p.id);
    await passAll(rigger, p.id);
    ctx.clock.set('2026-12-05T10:00:00Z');
    for (const at of ['2026-11-01T10:00:00Z', '2026-12-02T10:00:00Z']) {
      const res = await rigger.get(`/api/points/${p.id}/status?at=${at}`);
      expect(res.status).toBe(400);
      expect(res.body.error.code).toBe('past_instant');
      expect(res.body.error.message).toContain('PAST-1');
      expect(res.body.error.details).toMatchObject({ pointId: p.id, history: `/api/points/${p.id}/records` });
    }
    const later = await rigger.get(`/api/points/${p.id}/status?at=2026-12-20T10:00:00Z`);
    expect(later.status).toBe(200);
    expect(later.body.status).toBe('cleared');
    expect((await rigger.get(`/api/points/${p.id}/status`)).body.status).toBe('cleared');
  });
});

describe('clearance derived from append-only rows', () => {
  it('writes a void row naming the cause when a fault voids a clearance', async () => {
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db);
    await makeStandardPath(ctx.db, p.id);
    const cleared = await passAll(rigger, p.id);
    const fault = await rigger.post('/api/faults').send({ pointId: p.id, severity: 'low', description: 'Scuff' });
    const voids = await ctx.db('clearance_voids').where({ point_id: p.id });
    expect(voids).toEqual([expect.objectContaining({ inspection_id: cleared.body.inspectionId, reason: 'fault_opened', source: `fault #${fault.body.id}`, at: '2026-12-01T10:00:00.000Z' })]);
    await expect(ctx.db('clearance_voids').update({ reason: 'x' })).rejects.toThrow(/append-only/);
  });

  it('a hand edit of points.last_cleared_at clears nothing, and verification names the point', async () => {
    const owner = await as(ctx, 'owner');
    const p = await makePoint(ctx.db, { label: 'HAND-1' });
    await makeStandardPath(ctx.db, p.id);
    expect((await owner.get('/api/audit/verify')).body.ok).toBe(true);
    // Someone with the database file marks the never-inspected point cleared just now.
    await ctx.db('points').where({ id: p.id }).update({ last_cleared_at: '2026-12-01T09:59:00.000Z', clearance_voided_at: null });
    const status = await owner.get(`/api/points/${p.id}/status`);
    expect(status.body.status).toBe('blocked');
    expect(status.body.reasons.map((r: { code: string }) => r.code)).toContain('inspection_lapsed');
    const verify = await owner.get('/api/audit/verify');
    expect(verify.body.ok).toBe(false);
    expect(verify.body.clearanceMismatches).toEqual([expect.objectContaining({ pointId: p.id, label: 'HAND-1' })]);
    expect(verify.body.problem).toMatch(/^Point HAND-1: marked cleared .* with no inspection behind it/);
  });

  it('reports a voided clearance shown as live in the columns', async () => {
    const rigger = await as(ctx, 'rigger');
    const owner = await as(ctx, 'owner');
    const p = await makePoint(ctx.db, { label: 'HAND-2' });
    await makeStandardPath(ctx.db, p.id);
    await passAll(rigger, p.id);
    await rigger.post('/api/faults').send({ pointId: p.id, severity: 'low', description: 'Scuff' });
    await ctx.db('points').where({ id: p.id }).update({ clearance_voided_at: null });
    const verify = await owner.get('/api/audit/verify');
    expect(verify.body.ok).toBe(false);
    expect(verify.body.problems).toEqual([expect.stringMatching(/^Point HAND-2: shown as cleared, but its clearance was voided/)]);
  });
});

describe('the demo studio', () => {
  it('builds records that verify: its chain under the key, its clearances and voids each in it, its past classes kept', async () => {
    expect(await seedDemoIfEmpty(ctx.db, ctx.clock.now(), TEST_AUDIT_KEY)).toBe(true);
    const owner = await as(ctx, 'owner');
    const verify = await owner.get('/api/audit/verify');
    expect(verify.body.problems).toEqual([]);
    expect(verify.body.ok).toBe(true);
    const past = await ctx.db('sessions').where('starts_at', '<=', ctx.clock.now().toISOString()).count({ n: '*' });
    const kept = await ctx.db('session_records').countDistinct({ n: 'session_id' });
    expect(kept[0].n).toBe(past[0].n);
    expect(await ctx.db('session_records').where({ status: 'not_recorded' }).count({ n: '*' })).toEqual([{ n: 0 }]);
  });
});

describe('clearance rows bound to the audit chain', () => {
  it('reports a clearance inserted by hand, which the chain never saw', async () => {
    const owner = await as(ctx, 'owner');
    const p = await makePoint(ctx.db, { label: 'FORGED-1' });
    await makeStandardPath(ctx.db, p.id);
    await ctx.db('inspections').insert({ kind: 'periodic', point_id: p.id, inspector_id: owner.user.id, inspected_at: '2026-12-01T09:00:00.000Z', studio_day: '2026-12-01', result: 'pass', notes: '', cleared: true, cleared_until: '2026-12-31T09:00:00.000Z' });
    await ctx.db('points').where({ id: p.id }).update({ last_cleared_at: '2026-12-01T09:00:00.000Z' });
    const verify = await owner.get('/api/audit/verify');
    expect(verify.body.ok).toBe(false);
    expect(verify.body.problems).toEqual([expect.stringMatching(/^Point FORGED-1: inspection #\d+ clearing it on .* is not in the audit chain/)]);
  });

  it('reports a void deleted from the file, which would read the point as cleared again', async () => {
    const rigger = await as(ctx, 'rigger');
    const owner = await as(ctx, 'owner');
    const p = await makePoint(ctx.db, { label: 'UNVOID-1' });
    await makeStandardPath(ctx.db, p.id);
    await passAll(rigger, p.id);
    await rigger.post('/api/faults').send({ pointId: p.id, severity: 'low', description: 'Scuff' });
    expect(await entries('point.clearance_voided')).toHaveLength(1);
    expect((await owner.get('/api/audit/verify')).body.ok).toBe(true);
    await dropTrigger(ctx.db, 'clearance_voids', 'clearance_voids_no_delete');
    await ctx.db('clearance_voids').delete();
    await ctx.db('points').where({ id: p.id }).update({ clearance_voided_at: null });
    const verify = await owner.get('/api/audit/verify');
    expect(verify.body.ok).toBe(false);
    expect(verify.body.clearanceMismatches).toEqual([expect.objectContaining({ label: 'UNVOID-1', message: expect.stringMatching(/the void of its clearance .* is missing from the records: the point may read as cleared/) })]);
  });
});

describe('the keyed audit chain', () => {
  async function someHistory() {
    const rigger = await as(ctx, 'rigger');
    const owner = await as(ctx, 'owner');
    const p = await makePoint(ctx.db);
    await makeStandardPath(ctx.db, p.id);
    await passAll(rigger, p.id);
    for (const d of ['Scuff', 'Dent', 'Nick', 'Fray', 'Rust', 'Crack']) await rigger.post('/api/faults').send({ pointId: p.id, severity: 'low', description: d });
    return { owner };
  }

  it('reports an entry edited and the plain SHA-256 chain recomputed after it', async () => {
    const { owner } = await someHistory();
    expect((await owner.get('/api/audit/verify')).body).toMatchObject({ ok: true, problems: [] });
    await dropTrigger(ctx.db, 'audit_entries', 'audit_entries_no_update');
    // What someone with the file could do before: change an entry, then rewrite every hash after it.
    const rows = await ctx.db('audit_entries').orderBy('id');
    let prev = '0'.repeat(64);
    for (const r of rows) {
      const edited = { ...r, after_json: r.id === 2 ? r.after_json.replace('Scuff', 'Nothing') : r.after_json, prev_hash: prev };
      const hash = createHash('sha256').update(JSON.stringify([edited.id, edited.at, edited.actor_id, edited.action, edited.entity, edited.entity_id, edited.before_json, edited.after_json, edited.prev_hash])).digest('hex');
      await ctx.db('audit_entries').where({ id: r.id }).update({ after_json: edited.after_json, prev_hash: prev, hash });
      prev = hash;
    }
    const verify = await owner.get('/api/audit/verify');
    expect(verify.body).toMatchObject({ ok: false, firstBadId: 1 });
    expect(verify.body.problem).toMatch(/Entry 1 .*changed after it was written, or its hash was not made with this studio’s audit key/);
  });

  it('proves a published head is still in the chain, and fails it once the newest entries are deleted', async () => {
    const { owner } = await someHistory();
    const published = (await owner.get('/api/audit/verify')).body.head;
    expect(published.count).toBeGreaterThanOrEqual(7);
    const head = formatHead(published);
    expect((await owner.get(`/api/audit/verify?head=${head}`)).body).toMatchObject({ ok: true, publishedHead: { found: true } });

    await dropTrigger(ctx.db, 'audit_entries', 'audit_entries_no_delete');
    await ctx.db('audit_entries').where('id', '>', published.count - 5).delete();
    // The shorter chain is still a valid chain on its own ...
    expect((await owner.get('/api/audit/verify')).body.ok).toBe(true);
    // ... but not against the head published before.
    const verify = await owner.get(`/api/audit/verify?head=${head}`);
    expect(verify.body).toMatchObject({ ok: false, publishedHead: { found: false } });
    expect(verify.body.problem).toBe(`The published head names entry ${published.count}, but the chain holds ${published.count - 5} entries: entries were deleted since it was published.`);
  });

  it('prints the head in the rigger’s digest, and that head verifies later', async () => {
    const { owner } = await someHistory();
    const p = await makePoint(ctx.db, { label: 'EXP-9', clearedAt: '2026-11-05T10:00:00Z' });
    await makeStandardPath(ctx.db, p.id);
    const head = (await owner.get('/api/audit/verify')).body.head;
    await cycle();
    const digest = await ctx.db('outbox_messages').where({ kind: 'digest' }).first();
    expect(digest.text_body).toContain(`Audit chain head: ${formatHead(head)}`);
    expect(digest.html_body).toContain(formatHead(head));
    await rigger2Writes();
    expect((await owner.get(`/api/audit/verify?head=${formatHead(head)}`)).body).toMatchObject({ ok: true, publishedHead: { found: true } });

    async function rigger2Writes() {
      const rigger = await as(ctx, 'rigger');
      await rigger.post('/api/faults').send({ pointId: p.id, severity: 'low', description: 'Later fault' });
    }
  });

  it('refuses a head that is not count:hash with a field message', async () => {
    const owner = await as(ctx, 'owner');
    const res = await owner.get('/api/audit/verify?head=12:nothex');
    expect(res.status).toBe(400);
    expect(res.body.error.details.fields.head).toBe('Write it as count:hash');
  });

  it('is keyed: the same entries under another key do not verify', async () => {
    const { owner } = await someHistory();
    const { auditRepository } = await import('../../server/modules/audit/audit.repository');
    expect((await auditRepository(ctx.db, TEST_AUDIT_KEY).verify()).ok).toBe(true);
    expect((await auditRepository(ctx.db, 'another-key-another-key-another-key-1').verify()).ok).toBe(false);
    expect((await owner.get('/api/audit/verify')).body.ok).toBe(true);
  });
});

describe('§4.9: a clearance keeps the end worked out when it was signed', () => {
  it('lengthening an interval changes no point’s clearedUntil and is audited with before and after; shortening applies at once', async () => {
    const rigger = await as(ctx, 'rigger');
    const owner = await as(ctx, 'owner');
    const p = await makePoint(ctx.db);
    await makeStandardPath(ctx.db, p.id);
    const cleared = await passAll(rigger, p.id);
    // The round sling is a textile: 30 days [studio choice].
    expect(cleared.body.clearedUntil).toBe('2026-12-31T10:00:00.000Z');
    expect(await ctx.db('inspections').where({ id: cleared.body.inspectionId }).first('cleared_until', 'clearance_end')).toEqual({ cleared_until: '2026-12-31T10:00:00.000Z', clearance_end: '2026-12-31T10:00:00.000Z' });
    const studioNow = (await owner.get('/api/studio')).body;

    const longer = { ...studioNow.policy, intervalDays: { ...studioNow.policy.intervalDays, textile: 3650, hardware: 3650, structure: 3650 } };
    expect((await owner.patch('/api/studio').send({ policy: longer })).status).toBe(200);
    expect((await owner.get(`/api/points/${p.id}`)).body.status.clearedUntil).toBe('2026-12-31T10:00:00.000Z');
    ctx.clock.set('2027-01-02T10:00:00Z');
    expect((await owner.get(`/api/points/${p.id}`)).body.status).toMatchObject({ status: 'blocked', clearedUntil: '2026-12-31T10:00:00.000Z' });
    const [entry] = await entries('studio.policy_changed');
    expect(JSON.parse(entry.before_json).policy.intervalDays).toEqual({ textile: 30, hardware: 90, structure: 365 });
    expect(JSON.parse(entry.after_json).policy.intervalDays).toEqual({ textile: 3650, hardware: 3650, structure: 3650 });
    expect(JSON.parse(entry.after_json).changes).toContainEqual({ field: 'intervalDays.textile', before: 30, after: 3650 });
    expect(entry.actor_id).toBe(owner.user.id);

    // A clearance signed afterwards gets the longer interval (the structure's 3,650 days now the shortest).
    ctx.clock.set('2026-12-01T12:00:00Z');
    expect((await passAll(rigger, p.id)).body.clearedUntil).toBe('2036-11-28T12:00:00.000Z');
    const kept = await ctx.db('inspections').where({ point_id: p.id, cleared: true }).orderBy('id', 'desc').first('clearance_end');
    expect(kept.clearance_end).toBe('2036-11-28T12:00:00.000Z');

    const shorter = { ...longer, intervalDays: { textile: 7, hardware: 3650, structure: 3650 } };
    await owner.patch('/api/studio').send({ policy: shorter });
    expect((await owner.get(`/api/points/${p.id}`)).body.status.clearedUntil).toBe('2026-12-08T12:00:00.000Z');
  });
});
