import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { chmodSync, closeSync, mkdtempSync, openSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { execFileSync } from 'node:child_process';
import { createDb } from '../../server/db/knex';
import { backupDatabase, findPgDump } from '../../server/db/backup';
import { freshDatabase, onPostgres } from '../helpers/database';
import { as, createTestApp, type TestContext } from '../helpers/app';
import { makePoint, makeStandardPath } from '../helpers/factories';

let ctx: TestContext;
beforeEach(async () => {
  ctx = await createTestApp();
});
afterEach(async () => ctx.close());

const counts = async (db: TestContext['db']) => {
  const out: Record<string, number> = {};
  for (const t of ['users', 'points', 'gear_items', 'load_path_links', 'faults', 'audit_entries']) out[t] = Number((await db(t).count({ n: '*' }))[0].n);
  return out;
};

describe('backups of the SQLite file', () => {
  it.skipIf(onPostgres)('copies the live database while the app runs, and a restored copy holds every record', async () => {
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db);
    await makeStandardPath(ctx.db, p.id);
    await rigger.post('/api/faults').send({ pointId: p.id, severity: 'low', description: 'Scuffed paint on the clamp' });
    const before = await counts(ctx.db);
    const dest = join(ctx.dir, 'backup', 'copy.sqlite');
    const { pages } = await backupDatabase(join(ctx.dir, 'test.sqlite'), dest);
    expect(pages).toBeGreaterThan(0);
    const restored = createDb(dest);
    try {
      expect(await counts(restored)).toEqual(before);
      expect(await restored('faults').first('description')).toEqual({ description: 'Scuffed paint on the clamp' });
    } finally {
      await restored.destroy();
    }
  });

  it.skipIf(onPostgres)('runs as `npm run backup` against LOFTWISE_DB', async () => {
    const dest = join(ctx.dir, 'cli-copy.sqlite');
    const out = execFileSync(process.execPath, ['--import', 'tsx', 'scripts/backup.ts', dest], { env: { ...process.env, LOFTWISE_DB: join(ctx.dir, 'test.sqlite'), AUTH_SECRET: 'x'.repeat(40) }, encoding: 'utf8' });
    expect(out).toMatch(/integrity ok/);
  });

  it('creates the database, its WAL and SHM, and backups readable by their owner only, whatever the umask', async () => {
    const mode = (f: string) => (statSync(f).mode & 0o777).toString(8);
    const previous = process.umask(0o022);
    const root = mkdtempSync(join(tmpdir(), 'loftwise-modes-'));
    try {
      const file = join(root, 'data', 'studio.sqlite');
      const db = createDb(file);
      await db.schema.createTable('t', (t) => t.increments('id'));
      await db('t').insert({});
      expect({ dir: mode(join(root, 'data')), db: mode(file), wal: mode(`${file}-wal`), shm: mode(`${file}-shm`) }).toEqual({ dir: '700', db: '600', wal: '600', shm: '600' });
      const dest = join(root, 'backups', 'copy.sqlite');
      await backupDatabase(file, dest);
      expect({ dir: mode(join(root, 'backups')), copy: mode(dest) }).toEqual({ dir: '700', copy: '600' });
      await db.destroy();

      // A file an older version left readable by everyone is narrowed when it is opened.
      const old = join(root, 'old.sqlite');
      closeSync(openSync(old, 'w'));
      chmodSync(old, 0o644);
      const reopened = createDb(old);
      await reopened.raw('select 1');
      expect(mode(old)).toBe('600');
      await reopened.destroy();
    } finally {
      process.umask(previous);
      rmSync(root, { recursive: true, force: true });
    }
  });
});

describe('backups of PostgreSQL', () => {
  it.skipIf(!onPostgres)('runs as `npm run backup` through pg_dump, says so, and pg_restore gives back every record', async () => {
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db);
    await makeStandardPath(ctx.db, p.id);
    expect((await rigger.post('/api/faults').send({ pointId: p.id, severity: 'low', description: 'Scuffed paint on the clamp' })).status).toBe(201);
    const before = await counts(ctx.db);
    const dest = join(ctx.dir, 'backups', 'copy.pgdump');
    const out = execFileSync(process.execPath, ['--import', 'tsx', 'scripts/backup.ts', dest], { env: { ...process.env, DATABASE_URL: ctx.dbTarget, AUTH_SECRET: 'x'.repeat(40) }, encoding: 'utf8' });
    expect(out).toMatch(/with pg_dump/);
    expect((statSync(dest).mode & 0o777).toString(8)).toBe('600');
    const target = await freshDatabase(ctx.dir, 'restored.sqlite', { empty: true });
    try {
      execFileSync(findPgDump().replace(/pg_dump$/, 'pg_restore'), ['--no-owner', '--exit-on-error', `--dbname=${target.target}`, dest]);
      const restored = createDb(target.target, { poolMax: 1 });
      try {
        expect(await counts(restored)).toEqual(before);
        expect(await restored('faults').first('description')).toEqual({ description: 'Scuffed paint on the clamp' });
      } finally {
        await restored.destroy();
      }
    } finally {
      await target.drop();
    }
  });
});
