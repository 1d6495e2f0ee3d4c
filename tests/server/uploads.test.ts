import { afterEach, describe, expect, it } from 'vitest';
import { execFileSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { as, createTestApp, type TestContext } from '../helpers/app';
import { makePoint, makeUser } from '../helpers/factories';
import { createDb, migrate } from '../../server/db/knex';
import { residentMb, startChildServer } from '../helpers/child-server';

const PNG_HEAD = Buffer.from('89504e470d0a1a0a0000000d49484452000000010000000108060000001f15c4890000000d49444154789c63000100000500010d0a2db40000000049454e44ae426082', 'hex');
/** A PNG of `bytes` (its header, then padding): enough for the type check, any size we need. */
const png = (bytes: number) => Buffer.concat([PNG_HEAD, Buffer.alloc(Math.max(0, bytes - PNG_HEAD.length))]);

const cleanups: Array<() => unknown> = [];
afterEach(async () => {
  for (const c of cleanups.splice(0).reverse()) await c();
});

/** Every file under a folder, its folder for uploads in progress included. */
const filesIn = (dir: string) => readdirSync(dir, { recursive: true, withFileTypes: true }).filter((e) => e.isFile()).map((e) => e.name);

/** A 1 MB filesystem of its own (tmpfs), so a write runs out of space for real. */
function tinyDisk(): string {
  const dir = mkdtempSync(join(tmpdir(), 'loftwise-full-'));
  execFileSync('mount', ['-t', 'tmpfs', '-o', 'size=1m,mode=0700', 'tmpfs', dir]);
  cleanups.push(() => {
    execFileSync('umount', [dir]);
    rmSync(dir, { recursive: true, force: true });
  });
  return dir;
}

describe('a fault report when its photos cannot be stored', () => {
  it('records the fault all the same, says which photos were not stored and why, and leaves no partial file', async () => {
    const uploads = tinyDisk();
    const ctx: TestContext = await createTestApp({ deps: { uploadDir: uploads } });
    cleanups.push(() => ctx.close());
    const instructor = await as(ctx, 'instructor');
    const p = await makePoint(ctx.db);

    // A 2 MB photo cannot fit on the 1 MB disk: the write fails part-way (ENOSPC); a small one fits.
    const res = await instructor
      .post('/api/faults')
      .field('pointId', String(p.id))
      .field('severity', 'high')
      .field('description', 'Sling cover torn at the shackle')
      .attach('photos', png(2 * 1024 * 1024), 'wide.png')
      .attach('photos', png(2048), 'close-up.png');
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ pointId: p.id, status: 'open', description: 'Sling cover torn at the shackle' });
    expect(res.body.photos.map((f: { originalName: string }) => f.originalName)).toEqual(['close-up.png']);
    expect(res.body.photosNotStored).toEqual([{ name: 'wide.png', reason: 'the server’s upload space is full' }]);
    expect(res.body.warnings).toEqual([{ code: 'photos_not_stored', message: expect.stringMatching(/fault is recorded, but one photo could not be stored/) }]);

    // The fault is in the records and blocks the point; only the photo that fitted is on disk.
    expect(await ctx.db('faults').where({ id: res.body.id, status: 'open' }).count({ n: '*' })).toEqual([{ n: 1 }]);
    expect((await instructor.get(`/api/points/${p.id}/status`)).body.status).toBe('blocked');
    await new Promise((r) => setTimeout(r, 50));
    expect(filesIn(uploads)).toEqual([expect.stringMatching(/^[0-9a-f-]{36}\.png$/)]);
  });
});

describe('per-person limits on fault reports', () => {
  it('answers 429 with a clear message after 30 reports in 10 minutes, while another person still reports', async () => {
    const ctx = await createTestApp();
    cleanups.push(() => ctx.close());
    const flood = await as(ctx, 'instructor');
    const other = await as(ctx, 'instructor');
    const p = await makePoint(ctx.db);
    const report = (who: typeof flood, i: number) => who.post('/api/faults').send({ pointId: p.id, severity: 'low', description: `Report number ${i}` });
    for (let i = 1; i <= 30; i++) expect((await report(flood, i)).status).toBe(201);
    const refused = await report(flood, 31);
    expect(refused.status).toBe(429);
    expect(refused.body.error).toMatchObject({ code: 'rate_limited', message: expect.stringMatching(/30 fault reports in the last 10 minutes/) });
    expect(await ctx.db('faults').count({ n: '*' })).toEqual([{ n: 30 }]);
    expect((await report(other, 1)).status).toBe(201);
  });
});

describe('uploads under load (the real server)', () => {
  it('keeps the process under 400 MB resident through 20 parallel 60 MB bogus uploads, and leaves nothing on disk', { timeout: 180_000 }, async () => {
    const dir = mkdtempSync(join(tmpdir(), 'loftwise-rss-'));
    mkdirSync(join(dir, 'uploads'));
    cleanups.push(() => rmSync(dir, { recursive: true, force: true }));
    const dbFile = join(dir, 'rss.sqlite');
    const db = createDb(dbFile);
    await migrate(db);
    await makeUser(db, { role: 'instructor', email: 'flood@uploads.test' });
    const pointId = (await makePoint(db)).id;
    await db.destroy();
    const server = await startChildServer({ dbFile, uploadDir: join(dir, 'uploads'), email: 'flood@uploads.test' });
    cleanups.push(server.stop);
    const { base, pid, cookie } = server;
    const before = residentMb(pid);

    // Six files of just under 10 MB each, not images; one buffer shared by every request.
    const bogus = new Blob([Buffer.alloc(10 * 1024 * 1024 - 1024, 'x')]);
    const send = () => {
      const form = new FormData();
      form.set('pointId', String(pointId));
      form.set('severity', 'high');
      form.set('description', 'Photos attached');
      for (let i = 0; i < 6; i++) form.append('photos', bogus, `photo-${i}.jpg`);
      return fetch(`${base}/api/faults`, { method: 'POST', headers: { Origin: base, cookie }, body: form }).then((r) => r.status);
    };
    const statuses = await Promise.all(Array.from({ length: 20 }, send));
    const after = residentMb(pid);
    console.log(`resident memory: ${before.now.toFixed(0)} MB before, peak ${after.peak.toFixed(0)} MB, ${after.now.toFixed(0)} MB after`);

    expect(statuses).toEqual(Array(20).fill(415));
    expect(after.peak).toBeLessThan(400);
    expect(filesIn(join(dir, 'uploads'))).toEqual([]);
  });
});
