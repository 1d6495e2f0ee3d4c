import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { loadConfig } from '../../server/config';
import { createDb, migrate, type Db } from '../../server/db/knex';
import { backupDatabase } from '../../server/db/backup';
import { auditRepository, unkeyedHashOf } from '../../server/modules/audit/audit.repository';
import { keyAuditChain } from '../../server/modules/audit/chain-upgrade';
import { makePoint, makeUser } from '../helpers/factories';

const dirs: string[] = [];
const dbs: Db[] = [];
afterEach(async () => {
  for (const db of dbs.splice(0)) await db.destroy();
  for (const d of dirs.splice(0)) rmSync(d, { recursive: true, force: true });
});
function tempDir() {
  const d = mkdtempSync(join(tmpdir(), 'loftwise-key-'));
  dirs.push(d);
  return d;
}
async function freshDb(dir: string, o: { upTo007?: boolean } = {}) {
  const db = createDb(join(dir, 'loftwise.sqlite'));
  dbs.push(db);
  if (!o.upTo007) {
    await migrate(db);
    return db;
  }
  // Every migration before 007, as a database from before records were kept.
  for (;;) {
    const [, pending] = (await db.migrate.list()) as [unknown[], Array<{ file?: string } | string>];
    const next = pending[0];
    const name = typeof next === 'string' ? next : next?.file;
    if (!name || name.startsWith('007')) break;
    await db.migrate.up();
  }
  return db;
}

/** Audit entries as written before the chain was keyed: plain SHA-256. */
async function unkeyedEntries(db: Db, n: number) {
  let prev = '0'.repeat(64);
  for (let id = 1; id <= n; id++) {
    const row = { id, at: new Date(Date.UTC(2026, 10, id)).toISOString(), actor_id: null, action: 'room.created', entity: 'room', entity_id: id, before_json: null, after_json: JSON.stringify({ name: `Room ${id}` }), prev_hash: prev };
    const hash = unkeyedHashOf(row);
    await db('audit_entries').insert({ ...row, hash });
    prev = hash;
  }
}

describe('the audit key', () => {
  it('is generated on first start beside the auth secret, mode 0600, and read back on the next', () => {
    const dir = tempDir();
    const env = { LOFTWISE_DB: join(dir, 'data', 'loftwise.sqlite') };
    const first = loadConfig(env);
    const file = join(dir, 'data', '.audit-key');
    expect(existsSync(file)).toBe(true);
    expect(existsSync(join(dir, 'data', '.auth-secret'))).toBe(true);
    expect(statSync(file).mode & 0o777).toBe(0o600);
    expect(first.auditKey.length).toBeGreaterThanOrEqual(32);
    expect(first.auditKey).not.toBe(first.authSecret);
    expect(loadConfig(env).auditKey).toBe(first.auditKey);
  });

  it('comes from AUDIT_KEY when set, and a short one is refused by name', () => {
    const dir = tempDir();
    expect(loadConfig({ LOFTWISE_DB: join(dir, 'x.sqlite'), AUDIT_KEY: 'k'.repeat(40) }).auditKey).toBe('k'.repeat(40));
    expect(existsSync(join(dir, '.audit-key'))).toBe(false);
    expect(() => loadConfig({ LOFTWISE_DB: join(dir, 'x.sqlite'), AUDIT_KEY: 'short' })).toThrow(/AUDIT_KEY must be at least 32 characters/);
  });

  it('is never in a backup of the database', async () => {
    const dir = tempDir();
    const config = loadConfig({ LOFTWISE_DB: join(dir, 'loftwise.sqlite') });
    const db = await freshDb(dir);
    const owner = await makeUser(db, { role: 'owner' });
    await db.transaction((trx) => auditRepository(db, config.auditKey).record(trx, { actorId: owner.id, action: 'room.created', entity: 'room', entityId: 1, after: { name: 'Main' } }, new Date()));
    const dest = join(dir, 'backups', 'copy.sqlite');
    await backupDatabase(join(dir, 'loftwise.sqlite'), dest);
    // The database file (and SQLite's own -wal/-shm beside it) and nothing else.
    expect(readdirSync(join(dir, 'backups')).every((name) => name.startsWith('copy.sqlite'))).toBe(true);
    expect(readFileSync(dest).includes(Buffer.from(config.auditKey))).toBe(false);
    // The copy's chain verifies only with the key kept apart from it.
    const restored = createDb(dest);
    dbs.push(restored);
    expect((await auditRepository(restored, config.auditKey).verify()).ok).toBe(true);
  });
});

describe('keying a chain written before the key (first start after the upgrade)', () => {
  it('re-chains entries that verify unkeyed, once, and leaves a marker beside the key', async () => {
    const dir = tempDir();
    const db = await freshDb(dir);
    await unkeyedEntries(db, 4);
    const key = 'upgrade-key-upgrade-key-upgrade-key-1';
    const marker = join(dir, '.audit-chain-keyed');
    expect((await auditRepository(db, key).verify()).ok).toBe(false);
    expect(await keyAuditChain(db, key, marker, () => undefined)).toBe('rechained');
    expect((await auditRepository(db, key).verify()).ok).toBe(true);
    expect(existsSync(marker)).toBe(true);
    // The triggers are back: entries stay append-only.
    await expect(db('audit_entries').update({ action: 'x' })).rejects.toThrow(/append-only/);
    expect(await keyAuditChain(db, key, marker, () => undefined)).toBe('keyed');
  });

  it('does not re-chain an unkeyed chain that was edited, nor any unkeyed chain once the marker exists', async () => {
    const dir = tempDir();
    const db = await freshDb(dir);
    await unkeyedEntries(db, 3);
    await db.raw('DROP TRIGGER audit_entries_no_update');
    await db('audit_entries').where({ id: 2 }).update({ after_json: '{"name":"Edited"}' });
    const key = 'upgrade-key-upgrade-key-upgrade-key-1';
    expect(await keyAuditChain(db, key, join(dir, '.audit-chain-keyed'), () => undefined)).toBe('broken');
    expect((await auditRepository(db, key).verify()).ok).toBe(false);

    const other = tempDir();
    const db2 = await freshDb(other);
    await unkeyedEntries(db2, 3);
    const marker = join(other, '.audit-chain-keyed');
    await keyAuditChain(db2, key, marker, () => undefined);
    // Someone with the file later swaps in a recomputed plain chain: it is not keyed for them.
    await db2.raw('DROP TRIGGER audit_entries_no_delete');
    await db2('audit_entries').delete();
    await unkeyedEntries(db2, 3);
    expect(await keyAuditChain(db2, key, marker, () => undefined)).toBe('broken');
    expect((await auditRepository(db2, key).verify()).ok).toBe(false);
  });
});

describe('migration 007', () => {
  it('carries over a voided clearance as a void row, and marks classes begun before records as not recorded', async () => {
    const dir = tempDir();
    const db = await freshDb(dir, { upTo007: true });
    const rigger = await makeUser(db, { role: 'rigger' });
    const p = await makePoint(db, { label: 'OLD-1' });
    const [ins] = await db('inspections').insert({ kind: 'periodic', point_id: p.id, inspector_id: rigger.id, inspected_at: '2026-11-01T10:00:00.000Z', studio_day: '2026-11-01', result: 'pass', notes: '', cleared: true, cleared_until: '2026-12-01T10:00:00.000Z' }).returning('id');
    await db('points').where({ id: p.id }).update({ last_cleared_at: '2026-11-01T10:00:00.000Z', clearance_voided_at: '2026-11-05T09:00:00.000Z' });
    const [ct] = await db('class_types').insert({ name: 'Silks', apparatus: 'fabric', duration_minutes: 60, capacity: 8, performers_per_point: 1, created_at: '2026-10-01T00:00:00.000Z' }).returning('id');
    const [s] = await db('sessions').insert({ class_type_id: (ct as { id: number }).id, instructor_id: rigger.id, room_id: (await db('points').where({ id: p.id }).first('room_id')).room_id, starts_at: '2026-11-02T18:00:00.000Z', ends_at: '2026-11-02T19:00:00.000Z', cancelled: false, at_risk: false, created_at: '2026-10-01T00:00:00.000Z', updated_at: '2026-10-01T00:00:00.000Z' }).returning('id');
    await db('session_points').insert({ session_id: (s as { id: number }).id, point_id: p.id, starts_at: '2026-11-02T18:00:00.000Z', ends_at: '2026-11-02T19:00:00.000Z', cancelled: false });

    await migrate(db);
    expect(await db('clearance_voids').select('point_id', 'inspection_id', 'at', 'reason')).toEqual([{ point_id: p.id, inspection_id: (ins as { id: number }).id, at: '2026-11-05T09:00:00.000Z', reason: 'voided_before_records' }]);
    expect(await db('session_records').select('session_id', 'point_id', 'status', 'point_label')).toEqual([{ session_id: (s as { id: number }).id, point_id: p.id, status: 'not_recorded', point_label: 'OLD-1' }]);
  });
});
