import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { createDb, type Db } from '../../server/db/knex';
import { onPostgres } from '../helpers/database';

/*
 * The SQLite client keeps its read statements prepared per connection and SQL text
 * (`LoftwiseSqliteClient._query`, server/db/knex.ts). A kept statement must answer exactly as a
 * fresh one would: the rows as they are now, the bindings of this call, the columns of the table
 * as it is now, and a write still goes through knex's own path.
 */
describe.skipIf(onPostgres)('read statements kept prepared on SQLite', () => {
  let dir: string;
  let db: Db;
  beforeEach(async () => {
    dir = mkdtempSync(join(tmpdir(), 'loftwise-prepared-'));
    db = createDb(join(dir, 'x.sqlite'));
    await db.schema.createTable('things', (t) => {
      t.increments('id');
      t.string('name').notNullable();
    });
  });
  afterEach(async () => {
    await db.destroy();
    rmSync(dir, { recursive: true, force: true });
  });

  const names = async (from: number) => ((await db('things').where('id', '>=', from).orderBy('id').select('name')) as Array<{ name: string }>).map((r) => r.name);

  it('answers the rows as they are now, with this call’s bindings', async () => {
    await db('things').insert([{ name: 'clamp' }, { name: 'sling' }]);
    expect(await names(1)).toEqual(['clamp', 'sling']);
    expect(await names(2)).toEqual(['sling']);
    await db('things').insert({ name: 'swivel' });
    await db('things').where({ name: 'clamp' }).update({ name: 'beam clamp' });
    expect(await names(1)).toEqual(['beam clamp', 'sling', 'swivel']);
    const [{ id }] = (await db('things').insert({ name: 'hoop' }).returning('id')) as Array<{ id: number }>;
    expect(id).toBe(4);
  });

  it('sees a column added after the statement was first prepared', async () => {
    await db('things').insert({ name: 'clamp' });
    const all = async () => (await db('things').select('*')) as Array<Record<string, unknown>>;
    expect(Object.keys((await all())[0])).toEqual(['id', 'name']);
    await db.schema.alterTable('things', (t) => t.string('serial').nullable());
    await db('things').update({ serial: 'BC-1' });
    expect(await all()).toEqual([{ id: 1, name: 'clamp', serial: 'BC-1' }]);
  });

  it('reads inside a transaction what the transaction wrote, and nothing of it after a rollback', async () => {
    await db('things').insert({ name: 'clamp' });
    await db
      .transaction(async (trx) => {
        await trx('things').insert({ name: 'sling' });
        expect(((await trx('things').orderBy('id').select('name')) as Array<{ name: string }>).map((r) => r.name)).toEqual(['clamp', 'sling']);
        throw new Error('roll back');
      })
      .catch(() => undefined);
    expect(await names(1)).toEqual(['clamp']);
  });
});
