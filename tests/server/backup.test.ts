import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { execFileSync } from 'node:child_process';
import { createDb } from '../../server/db/knex';
import { backupDatabase } from '../../server/db/backup';
import { as, createTestApp, type TestContext } from '../helpers/app';
import { makePoint, makeStandardPath } from '../helpers/factories';

let ctx: TestContext;
beforeEach(async () => {
  ctx = await createTestApp();
});
afterEach(async () => ctx.close());

describe('backups', () => {
  it('copies the live database while the app runs, and a restored copy holds every record', async () => {
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db);
    await makeStandardPath(ctx.db, p.id);
    await rigger.post('/api/faults').send({ pointId: p.id, severity: 'low', description: 'Scuffed paint on the clamp' });
    const counts = async (db: typeof ctx.db) => {
      const out: Record<string, number> = {};
      for (const t of ['users', 'points', 'gear_items', 'load_path_links', 'faults', 'audit_entries']) out[t] = Number((await db(t).count({ n: '*' }))[0].n);
      return out;
    };
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

  it('runs as `npm run backup` against LOFTWISE_DB', async () => {
    const dest = join(ctx.dir, 'cli-copy.sqlite');
    const out = execFileSync(process.execPath, ['--import', 'tsx', 'scripts/backup.ts', dest], { env: { ...process.env, LOFTWISE_DB: join(ctx.dir, 'test.sqlite'), AUTH_SECRET: 'x'.repeat(40) }, encoding: 'utf8' });
    expect(out).toMatch(/integrity ok/);
  });
});
