import type { Db } from '../../server/db/knex';
import type { Role } from '../../shared/schemas/vocabulary';
import { hashPassword } from '../../server/modules/staff/passwords';
import { auditRepository } from '../../server/modules/audit/audit.repository';

export const TEST_PASSWORD = 'correct-horse-battery';
/** The audit chain's key in tests (the server reads AUDIT_KEY or its key file). */
export const TEST_AUDIT_KEY = 'test-audit-key-test-audit-key-test-audit-key';
let seq = 0;
let cachedHash: Promise<string> | null = null;

export async function makeUser(db: Db, o: { role: Role; email?: string; name?: string; active?: boolean }) {
  seq += 1;
  cachedHash ??= hashPassword(TEST_PASSWORD);
  const now = new Date().toISOString();
  const email = o.email ?? `${o.role}-${seq}-${process.pid}@example.test`;
  const [row] = await db('users')
    .insert({ email, name: o.name ?? `${o.role} ${seq}`, role: o.role, password_hash: await cachedHash, active: o.active ?? true, digest_opt_out: false, created_at: now, updated_at: now })
    .returning('*');
  return { id: row.id as number, email, role: o.role };
}

let gearSeq = 0;
export async function makeRoom(db: Db, name = `Room ${++seq}`) {
  const [row] = await db('rooms').insert({ name, created_at: new Date().toISOString() }).returning('id');
  return (row as { id: number }).id;
}

export async function makePoint(db: Db, o: { roomId?: number; label?: string; structuralRatingKn?: number; apparatus?: string[]; maxPerformers?: number; clearedAt?: string | null } = {}) {
  const roomId = o.roomId ?? (await makeRoom(db));
  const now = new Date().toISOString();
  const [row] = await db('points')
    .insert({
      room_id: roomId,
      label: o.label ?? `P-${++seq}`,
      structure: 'beam',
      structural_rating_kn: o.structuralRatingKn ?? 20,
      apparatus_json: JSON.stringify(o.apparatus ?? ['fabric', 'hoop', 'trapeze', 'hammock', 'straps', 'rope']),
      max_performers: o.maxPerformers ?? 2,
      in_service: true,
      created_at: now,
      updated_at: now,
    })
    .returning('id');
  const id = (row as { id: number }).id;
  // A point's clearance is derived from its clearance rows, so a cleared point gets one.
  if (o.clearedAt) await makeClearance(db, id, o.clearedAt);
  return { id, roomId };
}

/**
 * A periodic inspection that cleared the point at `at`, with no kept end (the policy alone
 * decides, as for clearances kept before ends were stored), by an inactive fixture rigger who
 * receives no mail.
 */
export async function makeClearance(db: Db, pointId: number, at: string, o: { until?: string | null } = {}) {
  let inspector = (await db('users').where({ email: 'records-fixture@example.test' }).first('id')) as { id: number } | undefined;
  inspector ??= await makeUser(db, { role: 'rigger', email: 'records-fixture@example.test', name: 'Records fixture', active: false });
  const [row] = await db('inspections')
    .insert({ kind: 'periodic', point_id: pointId, inspector_id: inspector.id, inspected_at: new Date(at).toISOString(), studio_day: at.slice(0, 10), result: 'pass', notes: '', cleared: true, cleared_until: null, clearance_end: o.until ?? null })
    .returning('id');
  await db('points').where({ id: pointId }).update({ last_cleared_at: new Date(at).toISOString(), clearance_voided_at: null });
  const inspectionId = (row as { id: number }).id;
  // With its audit entry, as the clearance service writes it.
  await db.transaction((trx) => auditRepository(db, TEST_AUDIT_KEY).record(trx, { actorId: inspector!.id, action: 'point.cleared', entity: 'point', entityId: pointId, after: { inspectionId, cleared: true } }, new Date(at)));
  return inspectionId;
}

export async function makeGear(db: Db, o: Partial<{ kind: string; material: string; gate: string; majorKn: number; minorKn: number | null; gateOpenKn: number | null; wllKn: number | null; multiDirectional: boolean; serial: string; inspectedUntil: string | null; status: string }> = {}) {
  const now = new Date().toISOString();
  const kind = o.kind ?? 'carabiner';
  const [row] = await db('gear_items')
    .insert({
      kind,
      material: o.material ?? 'steel',
      gate: o.gate ?? (kind === 'carabiner' ? 'screw' : 'none'),
      serial: o.serial ?? `T-${++gearSeq}-${process.pid}`,
      major_kn: o.majorKn ?? 40,
      minor_kn: o.minorKn ?? null,
      gate_open_kn: o.gateOpenKn ?? null,
      wll_kn: o.wllKn ?? null,
      multi_directional: o.multiDirectional ?? false,
      status: o.status ?? 'in_service',
      inspected_until: o.inspectedUntil ?? null,
      created_at: now,
      updated_at: now,
    })
    .returning('id');
  return (row as { id: number }).id;
}

/** A plain path: beam clamp → round sling → steel carabiner → swivel, optionally an apparatus last. */
export async function makeStandardPath(db: Db, pointId: number, o: { apparatus?: { kind: string; inspectedUntil: string | null } } = {}) {
  const ids = [
    await makeGear(db, { kind: 'beam_clamp', majorKn: 50 }),
    await makeGear(db, { kind: 'round_sling', material: 'polyester', majorKn: 40 }),
    await makeGear(db, { kind: 'carabiner', majorKn: 40, minorKn: 12, gateOpenKn: 12 }),
    await makeGear(db, { kind: 'swivel', majorKn: 36 }),
  ];
  if (o.apparatus) ids.push(await makeGear(db, { kind: o.apparatus.kind, material: 'nylon', majorKn: 30, inspectedUntil: o.apparatus.inspectedUntil }));
  await db('load_path_links').insert(ids.map((gear_id, position) => ({ point_id: pointId, position, gear_id, mode: 'major', three_way: false, basket_over_half: false })));
  return ids;
}
