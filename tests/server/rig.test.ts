import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { readdirSync } from 'node:fs';
import request from 'supertest';
import { join } from 'node:path';
import { as, createTestApp, type TestContext } from '../helpers/app';
import { makeGear, makePoint, makeRoom, makeStandardPath } from '../helpers/factories';

let ctx: TestContext;

/** Every file in the upload folder, its folder for uploads in progress included. */
const filesOnDisk = () => readdirSync(join(ctx.dir, 'uploads'), { recursive: true, withFileTypes: true }).filter((e) => e.isFile()).map((e) => e.name);
beforeEach(async () => {
  ctx = await createTestApp({ now: '2026-12-01T10:00:00Z' });
});
afterEach(async () => ctx.close());

const linkBody = (gearId: number, extra: Record<string, unknown> = {}) => ({ gearId, mode: 'major', threeWay: false, basketOverHalf: false, ...extra });

describe('POST /api/rooms, /api/points, /api/gear', () => {
  it('lets a rigger create a room, a point in it and a gear item, each 201 with its id', async () => {
    const rigger = await as(ctx, 'rigger');
    const room = await rigger.post('/api/rooms').send({ name: 'Loft' });
    expect(room.status).toBe(201);
    expect(room.body).toMatchObject({ id: expect.any(Number), name: 'Loft' });
    const point = await rigger.post('/api/points').send({ roomId: room.body.id, label: 'L-1', structure: 'beam', structuralRatingKn: 12, apparatus: ['fabric'], maxPerformers: 1 });
    expect(point.status).toBe(201);
    expect(point.body).toMatchObject({ id: expect.any(Number), label: 'L-1', roomName: 'Loft' });
    // A new point has no load path and was never cleared.
    expect(point.body.status.status).toBe('blocked');
    expect(point.body.status.reasons.map((r: { code: string }) => r.code)).toEqual(expect.arrayContaining(['no_load_path', 'inspection_lapsed']));
    const gear = await rigger.post('/api/gear').send({ kind: 'carabiner', material: 'steel', gate: 'screw', majorKn: 40, minorKn: 12, gateOpenKn: 12, multiDirectional: false, serial: 'CB-1' });
    expect(gear.status).toBe(201);
    expect(gear.body).toMatchObject({ id: expect.any(Number), serial: 'CB-1', status: 'in_service', inspectedUntil: null, pointId: null });
  });

  it('lists each room with how many points hang in it, on either database', async () => {
    const rigger = await as(ctx, 'rigger');
    const loft = await makeRoom(ctx.db, 'Loft');
    await makeRoom(ctx.db, 'Annex');
    await makePoint(ctx.db, { roomId: loft });
    await makePoint(ctx.db, { roomId: loft });
    const rooms = (await rigger.get('/api/rooms')).body as Array<{ name: string; pointCount: number }>;
    expect(rooms.map((r) => [r.name, r.pointCount])).toEqual([
      ['Annex', 0],
      ['Loft', 2],
    ]);
  });

  it('refuses a minor rating above the major one with a field message', async () => {
    const rigger = await as(ctx, 'rigger');
    const res = await rigger.post('/api/gear').send({ kind: 'carabiner', material: 'steel', gate: 'screw', majorKn: 20, minorKn: 25, multiDirectional: false, serial: 'X' });
    expect(res.status).toBe(400);
    expect(res.body.error.details.fields.minorKn).toMatch(/cannot exceed/);
  });

  it('lets an instructor read the register but not write it', async () => {
    const instructor = await as(ctx, 'instructor');
    expect((await instructor.get('/api/points')).status).toBe(200);
    expect((await instructor.post('/api/rooms').send({ name: 'Nope' })).status).toBe(403);
  });

  it('refuses a duplicate point label with 409', async () => {
    const rigger = await as(ctx, 'rigger');
    const roomId = await makeRoom(ctx.db);
    const body = { roomId, label: 'Dup', structure: 'beam', structuralRatingKn: 12, apparatus: ['fabric'], maxPerformers: 1 };
    expect((await rigger.post('/api/points').send(body)).status).toBe(201);
    expect((await rigger.post('/api/points').send(body)).status).toBe(409);
  });
});

describe('PUT /api/points/:id/load-path', () => {
  it('replaces the path whole and returns it in order', async () => {
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db);
    const a = await makeGear(ctx.db, { kind: 'beam_clamp' });
    const b = await makeGear(ctx.db, { kind: 'swivel' });
    const res = await rigger.put(`/api/points/${p.id}/load-path`).send({ links: [linkBody(a), linkBody(b)] });
    expect(res.status).toBe(200);
    expect(res.body.links.map((l: { gearId: number }) => l.gearId)).toEqual([a, b]);
    const again = await rigger.put(`/api/points/${p.id}/load-path`).send({ links: [linkBody(b)] });
    expect(again.body.links.map((l: { gearId: number }) => l.gearId)).toEqual([b]);
  });

  it('refuses gear already hanging in another path with 409 gear_in_use and changes nothing', async () => {
    const rigger = await as(ctx, 'rigger');
    const p1 = await makePoint(ctx.db);
    const p2 = await makePoint(ctx.db);
    const [clamp] = await makeStandardPath(ctx.db, p1.id);
    const own = await makeGear(ctx.db, { kind: 'swivel' });
    await rigger.put(`/api/points/${p2.id}/load-path`).send({ links: [linkBody(own)] });
    const res = await rigger.put(`/api/points/${p2.id}/load-path`).send({ links: [linkBody(clamp)] });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('gear_in_use');
    const still = await ctx.db('load_path_links').where({ point_id: p2.id }).pluck('gear_id');
    expect(still).toEqual([own]);
  });

  it('voids a clearance when a fixed link changes, but not for an identical save or an apparatus swap', async () => {
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db, { clearedAt: '2026-11-30T10:00:00Z' });
    const ids = await makeStandardPath(ctx.db, p.id, { apparatus: { kind: 'fabric', inspectedUntil: '2026-12-20T00:00:00Z' } });
    const before = await rigger.get(`/api/points/${p.id}`);
    expect(before.body.status.status).toBe('cleared');
    const current = ids.map((g) => linkBody(g));

    const same = await rigger.put(`/api/points/${p.id}/load-path`).send({ links: current });
    expect(same.body).toMatchObject({ changed: false, voided: false });

    const otherFabric = await makeGear(ctx.db, { kind: 'fabric', material: 'nylon', majorKn: 30, inspectedUntil: '2026-12-25T00:00:00Z' });
    const swapped = await rigger.put(`/api/points/${p.id}/load-path`).send({ links: [...current.slice(0, 4), linkBody(otherFabric)] });
    expect(swapped.body).toMatchObject({ changed: true, voided: false });
    expect(swapped.body.status.status).toBe('cleared');

    const crossLoaded = [...current.slice(0, 2), linkBody(ids[2], { mode: 'minor' }), current[3], linkBody(otherFabric)];
    const changed = await rigger.put(`/api/points/${p.id}/load-path`).send({ links: crossLoaded });
    expect(changed.body).toMatchObject({ changed: true, voided: true });
    expect(changed.body.status.reasons.map((r: { code: string }) => r.code)).toContain('awaiting_clearance');
  });

  it('answers 400 for an unknown gear id and for a bridle leg without its angle', async () => {
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db);
    expect((await rigger.put(`/api/points/${p.id}/load-path`).send({ links: [linkBody(99999)] })).status).toBe(400);
    const g = await makeGear(ctx.db);
    const res = await rigger.put(`/api/points/${p.id}/load-path`).send({ links: [linkBody(g, { leg: 'a' })] });
    expect(res.status).toBe(400);
    expect(res.body.error.details.fields['links.0.includedAngleDeg']).toBeDefined();
  });
});

describe('GET /api/points/:id/load-check', () => {
  it('answers the contract shape with the working, for explicit performers', async () => {
    const reader = await as(ctx, 'instructor');
    const p = await makePoint(ctx.db, { structuralRatingKn: 20 });
    await makeStandardPath(ctx.db, p.id);
    const res = await reader.get(`/api/points/${p.id}/load-check?performers=1&bodyMassKg=90&dynamicFactor=5.6`);
    expect(res.status).toBe(200);
    // W = 1 × 90 kg × 9.80665 m/s² × 5.6 = 4.9425516 kN; weakest link the 36 kN swivel.
    expect(res.body.designLoadKn).toBeCloseTo((90 * 9.80665 * 5.6) / 1000, 9);
    expect(res.body.chainStrengthKn).toBeCloseTo(36, 9);
    expect(res.body.achievedFactor).toBeCloseTo(36 / ((90 * 9.80665 * 5.6) / 1000), 9);
    expect(res.body).toMatchObject({ requiredFactor: 5, structuralRatingKn: 20, pass: true, violations: [] });
    expect(res.body.working.length).toBeGreaterThan(3);
  });

  it('fails a duo class whose factor falls below the required one', async () => {
    const reader = await as(ctx, 'reception');
    const p = await makePoint(ctx.db, { structuralRatingKn: 40 });
    await makeStandardPath(ctx.db, p.id);
    const res = await reader.get(`/api/points/${p.id}/load-check?performers=2&dynamicFactor=7.3`);
    // W = 2 × 90 × g × 7.3 = 12.886 kN; 36 / 12.886 = 2.79 < 5.
    expect(res.body.pass).toBe(false);
    expect(res.body.violations.map((v: { code: string }) => v.code)).toContain('factor_below_required');
  });

  it('uses a class type’s profile with the policy’s dynamic factor for its apparatus', async () => {
    const reception = await as(ctx, 'reception');
    const p = await makePoint(ctx.db);
    await makeStandardPath(ctx.db, p.id);
    const ct = await reception.post('/api/class-types').send({ name: 'Hoop basics', apparatus: 'hoop', durationMinutes: 60, capacity: 8, performersPerPoint: 1 });
    expect(ct.status).toBe(201);
    const res = await reception.get(`/api/points/${p.id}/load-check?classTypeId=${ct.body.id}`);
    expect(res.body.profile).toEqual({ performers: 1, bodyMassKg: 90, dynamicFactor: 4.8 });
  });

  it('answers 400 when neither a class type nor a profile is given', async () => {
    const reader = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db);
    expect((await reader.get(`/api/points/${p.id}/load-check`)).status).toBe(400);
  });
});

describe('gear status and events', () => {
  it('quarantines an item when an event is recorded, which blocks its point without opening a fault', async () => {
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db, { clearedAt: '2026-11-30T10:00:00Z' });
    const ids = await makeStandardPath(ctx.db, p.id);
    const ev = await rigger.post(`/api/gear/${ids[3]}/events`).send({ kind: 'drop', note: 'Dropped from the ladder' });
    expect(ev.status).toBe(201);
    const gear = await rigger.get(`/api/gear/${ids[3]}`);
    expect(gear.body.status).toBe('quarantined');
    expect(gear.body.events).toHaveLength(1);
    const status = await rigger.get(`/api/points/${p.id}/status`);
    expect(status.body.status).toBe('blocked');
    expect(status.body.reasons.map((r: { code: string }) => r.code)).toEqual(['gear_unfit']);
    expect(await ctx.db('faults').count({ n: '*' })).toEqual([{ n: 0 }]);
  });

  it('retires an item for a reason, refuses to mount it, and only a rigger may retire', async () => {
    const owner = await as(ctx, 'owner');
    const rigger = await as(ctx, 'rigger');
    const g = await makeGear(ctx.db);
    expect((await owner.post(`/api/gear/${g}/retire`).send({ reason: 'Worn' })).status).toBe(403);
    const res = await rigger.post(`/api/gear/${g}/retire`).send({ reason: 'Gate spring weak' });
    expect(res.body).toMatchObject({ status: 'retired', statusReason: 'Gate spring weak' });
    const p = await makePoint(ctx.db);
    const mount = await rigger.put(`/api/points/${p.id}/load-path`).send({ links: [linkBody(g)] });
    expect(mount.status).toBe(409);
    expect(mount.body.error.code).toBe('gear_retired');
  });

  it('filters the gear list by kind, status and mounting', async () => {
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db);
    await makeStandardPath(ctx.db, p.id);
    await makeGear(ctx.db, { kind: 'carabiner', serial: 'LOOSE-1' });
    const loose = await rigger.get('/api/gear?mounted=no&kind=carabiner');
    expect(loose.body.map((g: { serial: string }) => g.serial)).toEqual(['LOOSE-1']);
    const mounted = await rigger.get('/api/gear?mounted=yes');
    expect(mounted.body).toHaveLength(4);
    expect(mounted.body.every((g: { pointId: number }) => g.pointId === p.id)).toBe(true);
    expect((await rigger.get('/api/gear?status=bogus')).status).toBe(400);
  });
});

describe('documents', () => {
  const PDF = Buffer.from('%PDF-1.4\n1 0 obj<<>>endobj\ntrailer<<>>\n%%EOF\n');
  const PNG = Buffer.from('89504e470d0a1a0a0000000d49484452000000010000000108060000001f15c4890000000d49444154789c63000100000500010d0a2db40000000049454e44ae426082', 'hex');

  it('stores an engineer’s assessment and serves it to staff with nosniff and a disposition', async () => {
    const rigger = await as(ctx, 'rigger');
    const reader = await as(ctx, 'instructor');
    const p = await makePoint(ctx.db);
    const up = await rigger.post(`/api/points/${p.id}/documents`).field('kind', 'assessment').attach('file', PDF, '../../etc/assessment.pdf');
    expect(up.status).toBe(201);
    expect(up.body).toMatchObject({ kind: 'assessment', mime: 'application/pdf', originalName: 'assessment.pdf' });
    const file = await reader.get(up.body.url);
    expect(file.status).toBe(200);
    expect(file.headers['x-content-type-options']).toBe('nosniff');
    expect(file.headers['content-disposition']).toMatch(/assessment\.pdf/);
    expect(file.headers['content-type']).toMatch(/application\/pdf/);
  });

  it('refuses an SVG with script and an executable named as a PDF, and types a double-extension file by its bytes', async () => {
    const rigger = await as(ctx, 'rigger');
    const g = await makeGear(ctx.db);
    const svg = await rigger.post(`/api/gear/${g}/documents`).attach('file', Buffer.from('<?xml version="1.0"?><svg xmlns="http://www.w3.org/2000/svg"><script>alert(1)</script></svg>'), 'label.svg');
    expect(svg.status).toBe(415);
    const elf = await rigger.post(`/api/gear/${g}/documents`).attach('file', Buffer.from('7f454c46020101000000000000000000', 'hex'), 'manual.pdf');
    expect(elf.status).toBe(415);
    const doubled = await rigger.post(`/api/gear/${g}/documents`).attach('file', PDF, 'certificate.png.pdf.exe');
    expect(doubled.status).toBe(201);
    expect(doubled.body.mime).toBe('application/pdf');
    // Stored under a random name with the extension of its real type, never the one it came with.
    const stored = filesOnDisk();
    expect(stored).toHaveLength(1);
    expect(stored[0]).toMatch(/^[0-9a-f-]{36}\.pdf$/);
    const served = await rigger.get(doubled.body.url);
    expect(served.headers['content-type']).toMatch(/application\/pdf/);
  });

  it('keeps and serves `x.pdf.html` under the extension of its checked type, as a PDF named x.pdf', async () => {
    const rigger = await as(ctx, 'rigger');
    const g = await makeGear(ctx.db);
    const up = await rigger.post(`/api/gear/${g}/documents`).attach('file', PDF, 'x.pdf.html');
    expect(up.status).toBe(201);
    expect(up.body).toMatchObject({ mime: 'application/pdf', originalName: 'x.pdf' });
    expect(filesOnDisk()).toEqual([expect.stringMatching(/^[0-9a-f-]{36}\.pdf$/)]);
    const served = await rigger.get(up.body.url);
    expect(served.headers['content-type']).toMatch(/^application\/pdf/);
    expect(served.headers['content-disposition']).toBe('inline; filename=x.pdf');
    const png = await rigger.post(`/api/gear/${g}/documents`).attach('file', PNG, 'photo.html');
    expect(png.body).toMatchObject({ mime: 'image/png', originalName: 'photo.png' });
  });

  it('serves documents to signed-in staff only', async () => {
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db);
    const up = await rigger.post(`/api/points/${p.id}/documents`).attach('file', PDF, 'a.pdf');
    const anonymous = await request(ctx.app).get(up.body.url);
    expect(anonymous.status).toBe(401);
  });

  it('refuses text posing as a PNG (415), an empty file (400) and a file over the limit (413), leaving nothing on disk', async () => {
    const rigger = await as(ctx, 'rigger');
    const g = await makeGear(ctx.db);
    const fake = await rigger.post(`/api/gear/${g}/documents`).attach('file', Buffer.from('<svg onload="alert(1)"></svg>'), 'cert.png');
    expect(fake.status).toBe(415);
    const empty = await rigger.post(`/api/gear/${g}/documents`).attach('file', Buffer.alloc(0), 'cert.pdf');
    expect(empty.status).toBe(400);
    const big = await rigger.post(`/api/gear/${g}/documents`).attach('file', Buffer.concat([PNG, Buffer.alloc(11 * 1024 * 1024)]), 'huge.png');
    expect(big.status).toBe(413);
    await new Promise((r) => setTimeout(r, 50)); // temporary files go once the answer is sent
    expect(filesOnDisk()).toEqual([]);
    expect(await ctx.db('documents').count({ n: '*' })).toEqual([{ n: 0 }]);
  });
});

describe('look-alike labels, names and serials', () => {
  it('refuses a point label that looks like an existing one (409 naming it) or hides invisible or direction characters (400 on the field)', async () => {
    const rigger = await as(ctx, 'rigger');
    const roomId = await makeRoom(ctx.db);
    const point = (label: string) => rigger.post('/api/points').send({ roomId, label, structure: 'beam', structuralRatingKn: 30, apparatus: ['fabric'], maxPerformers: 1 });
    expect((await point('MH-1')).status).toBe(201);

    for (const lookAlike of ['\u041cH-1', 'MH\u20111', 'mh-1']) {
      const res = await point(lookAlike);
      expect(res.status, lookAlike).toBe(409);
      expect(res.body.error).toMatchObject({ code: 'label_taken', details: { existing: 'MH-1' } });
    }
    expect((await point('\u041cH-1')).body.error.message).toBe('“МH-1” looks the same as the existing point “MH-1”; choose one that reads differently.');

    const hidden = await point('MH\u200b-1');
    expect(hidden.status).toBe(400);
    expect(hidden.body.error.details.fields.label).toMatch(/invisible character/);
    const reversed = await point('\u202e1-HM');
    expect(reversed.status).toBe(400);
    expect(reversed.body.error.details.fields.label).toMatch(/text-direction/);
    expect(await ctx.db('points').pluck('label')).toEqual(['MH-1']);
  });

  it('does the same for rooms, gear serials and class types', async () => {
    const rigger = await as(ctx, 'rigger');
    const desk = await as(ctx, 'reception');
    expect((await rigger.post('/api/rooms').send({ name: 'Main Hall' })).status).toBe(201);
    expect((await rigger.post('/api/rooms').send({ name: 'Ma\u0456n Hall' })).body.error).toMatchObject({ code: 'room_exists', details: { existing: 'Main Hall' } }); // Cyrillic і
    const g = await makeGear(ctx.db, { serial: 'HP-0102' });
    expect(g).toBeGreaterThan(0);
    const gear = await rigger.post('/api/gear').send({ kind: 'carabiner', material: 'steel', gate: 'screw', majorKn: 30, multiDirectional: false, serial: 'HP\u20130102' }); // en dash
    expect(gear.status).toBe(409);
    expect(gear.body.error).toMatchObject({ code: 'serial_taken', details: { existing: 'HP-0102' } });
    const ct = { apparatus: 'fabric', durationMinutes: 60, capacity: 8, performersPerPoint: 1 };
    expect((await desk.post('/api/class-types').send({ ...ct, name: 'Aerial Hoop' })).status).toBe(201);
    expect((await desk.post('/api/class-types').send({ ...ct, name: 'Аerial Ηoop' })).body.error).toMatchObject({ code: 'name_taken', details: { existing: 'Aerial Hoop' } }); // Cyrillic А, Greek Η
  });
});
