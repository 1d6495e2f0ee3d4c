import Database from 'better-sqlite3';
import { createDb, migrate } from '../../server/db/knex';
import { hashPassword } from '../../server/modules/staff/passwords';
import { defaultPolicy } from '../../shared/schemas/policy';

export interface StudioSize {
  points: number;
  gear: number;
  weeks: number;
  classesPerWeek: number;
  pointsPerClass: number;
  inspections: number;
  faults: number;
}

export const FULL: StudioSize = { points: 60, gear: 400, weeks: 156, classesPerWeek: 30, pointsPerClass: 8, inspections: 20_000, faults: 2_000 };
export const QUICK: StudioSize = { points: 6, gear: 40, weeks: 16, classesPerWeek: 30, pointsPerClass: 3, inspections: 2_000, faults: 200 };
export const BENCH_PASSWORD = 'bench-password-123';

const DAY = 86_400_000;

/** A large invented studio written straight through prepared statements (fast), after the real migrations. */
export async function buildStudio(file: string, size: StudioSize, now: Date) {
  const knex = createDb(file);
  await migrate(knex);
  await knex.destroy();
  const db = new Database(file);
  db.pragma('journal_mode = WAL');
  db.pragma('synchronous = OFF');
  const iso = (t: number) => new Date(t).toISOString();
  const at = now.toISOString();
  const hash = await hashPassword(BENCH_PASSWORD);
  const t0 = now.getTime();

  db.transaction(() => {
    db.prepare('INSERT INTO studios (id, name, policy_json, updated_at) VALUES (1, ?, ?, ?)').run('Bench Studio', JSON.stringify(defaultPolicy), at);
    const user = db.prepare('INSERT INTO users (email, name, role, password_hash, active, digest_opt_out, created_at, updated_at) VALUES (?, ?, ?, ?, 1, 0, ?, ?)');
    user.run('owner@bench.test', 'Bench Owner', 'owner', hash, at, at);
    user.run('rigger@bench.test', 'Bench Rigger', 'rigger', hash, at, at);
    user.run('reception@bench.test', 'Bench Desk', 'reception', hash, at, at);
    const instructors: number[] = [];
    for (let i = 0; i < 8; i++) instructors.push(Number(user.run(`teacher${i}@bench.test`, `Teacher ${i}`, 'instructor', hash, at, at).lastInsertRowid));

    const rooms = [1, 2, 3].map((i) => Number(db.prepare('INSERT INTO rooms (name, created_at) VALUES (?, ?)').run(`Hall ${i}`, at).lastInsertRowid));
    const point = db.prepare('INSERT INTO points (room_id, label, structure, structural_rating_kn, apparatus_json, max_performers, in_service, last_cleared_at, created_at, updated_at) VALUES (?, ?, ?, ?, ?, 2, 1, ?, ?, ?)');
    const gear = db.prepare('INSERT INTO gear_items (kind, material, gate, serial, major_kn, minor_kn, gate_open_kn, multi_directional, status, inspected_until, service_life_years, manufactured_on, created_at, updated_at) VALUES (?, ?, ?, ?, ?, ?, ?, 0, ?, ?, 10, ?, ?, ?)');
    const link = db.prepare("INSERT INTO load_path_links (point_id, position, gear_id, mode, three_way, basket_over_half) VALUES (?, ?, ?, 'major', 0, 0)");
    const chain: Array<[string, string, string, number, number | null]> = [
      ['beam_clamp', 'steel', 'none', 50, null],
      ['round_sling', 'polyester', 'none', 40, null],
      ['carabiner', 'steel', 'screw', 42, 13],
      ['swivel', 'steel', 'none', 36, null],
      ['fabric', 'nylon', 'none', 28, null],
    ];
    const pointIds: number[] = [];
    let g = 0;
    for (let p = 0; p < size.points; p++) {
      const id = Number(point.run(rooms[p % 3], `B-${p + 1}`, 'beam', 30, JSON.stringify(['fabric', 'hoop', 'trapeze', 'hammock', 'straps', 'rope']), iso(t0 - (p % 40) * DAY), at, at).lastInsertRowid);
      pointIds.push(id);
      chain.forEach(([kind, material, gate, major, minor], position) => {
        const gid = Number(gear.run(kind, material, gate, `BN-${++g}`, major, minor, minor, 'in_service', iso(t0 + 20 * DAY), '2024-01-01', at, at).lastInsertRowid);
        link.run(id, position, gid);
      });
    }
    while (g < size.gear) gear.run('carabiner', 'aluminium', 'screw', `BN-${++g}`, 24, 8, 7, g % 10 === 0 ? 'quarantined' : 'in_service', iso(t0 + 30 * DAY), '2024-01-01', at, at);

    const ct = Number(db.prepare("INSERT INTO class_types (name, apparatus, duration_minutes, capacity, performers_per_point, active, created_at) VALUES ('Silks', 'fabric', 60, 8, 1, 1, ?)").run(at).lastInsertRowid);
    const session = db.prepare('INSERT INTO sessions (class_type_id, instructor_id, room_id, starts_at, ends_at, cancelled, at_risk, created_at, updated_at) VALUES (?, ?, ?, ?, ?, 0, 0, ?, ?)');
    const sp = db.prepare('INSERT INTO session_points (session_id, point_id, starts_at, ends_at, cancelled) VALUES (?, ?, ?, ?, 0)');
    // Three years around now (two back, one ahead), ~30 classes a week in three rooms.
    const first = t0 - Math.floor((size.weeks * 2) / 3) * 7 * DAY;
    const perRoom = Math.floor(size.pointsPerClass);
    for (let w = 0; w < size.weeks; w++) {
      for (let c = 0; c < size.classesPerWeek; c++) {
        const day = c % 7;
        const slot = Math.floor(c / 7);
        const start = first + (w * 7 + day) * DAY + (9 + slot * 2) * 3600_000;
        const roomIdx = c % 3;
        const sid = Number(session.run(ct, instructors[c % instructors.length], rooms[roomIdx], iso(start), iso(start + 3600_000), at, at).lastInsertRowid);
        const roomPoints = pointIds.filter((_, i) => i % 3 === roomIdx);
        for (let k = 0; k < Math.min(perRoom, roomPoints.length); k++) sp.run(sid, roomPoints[(k + slot) % roomPoints.length], iso(start), iso(start + 3600_000));
      }
    }
    const inspection = db.prepare("INSERT INTO inspections (kind, point_id, inspector_id, inspected_at, studio_day, result, notes, cleared, cleared_until) VALUES ('periodic', ?, 2, ?, ?, 'pass', '', 1, ?)");
    for (let i = 0; i < size.inspections; i++) {
      const t = t0 - (i % 1000) * DAY;
      inspection.run(pointIds[i % pointIds.length], iso(t), iso(t).slice(0, 10), iso(t + 30 * DAY));
    }
    const fault = db.prepare("INSERT INTO faults (point_id, severity, description, status, reported_by, reported_at, resolution, resolution_note, resolved_by, resolved_at) VALUES (?, 'low', 'Bench fault', ?, 4, ?, ?, ?, ?, ?)");
    for (let i = 0; i < size.faults; i++) {
      const open = i % 400 === 0;
      const t = iso(t0 - (i % 900) * DAY - 3600_000);
      fault.run(pointIds[(i * 7) % pointIds.length], open ? 'open' : 'resolved', t, open ? null : 'repaired', open ? null : 'Fixed', open ? null : 2, open ? null : t);
    }
  })();
  const counts = Object.fromEntries(['points', 'gear_items', 'sessions', 'session_points', 'inspections', 'faults'].map((t) => [t, (db.prepare(`SELECT count(*) n FROM ${t}`).get() as { n: number }).n]));
  db.close();
  return { counts, roomIds: [1, 2, 3], classTypeId: 1, instructorIds: [4, 5, 6, 7, 8, 9, 10, 11] };
}

/** Grows the calendar to `total` sessions (for the booking check at scale), far from the checked slot. */
export function growSessions(file: string, total: number, now: Date) {
  const db = new Database(file);
  db.pragma('synchronous = OFF');
  const have = (db.prepare('SELECT count(*) n FROM sessions').get() as { n: number }).n;
  const session = db.prepare('INSERT INTO sessions (class_type_id, instructor_id, room_id, starts_at, ends_at, cancelled, at_risk, created_at, updated_at) VALUES (1, ?, ?, ?, ?, 0, 0, ?, ?)');
  const sp = db.prepare('INSERT INTO session_points (session_id, point_id, starts_at, ends_at, cancelled) VALUES (?, ?, ?, ?, 0)');
  const at = now.toISOString();
  db.transaction(() => {
    for (let i = have; i < total; i++) {
      // Spread over the past 30 years, an hour apart: history the check must not scan.
      const start = now.getTime() - (i + 1) * 3 * 3600_000;
      const sid = Number(session.run(4 + (i % 8), 1 + (i % 3), new Date(start).toISOString(), new Date(start + 3600_000).toISOString(), at, at).lastInsertRowid);
      sp.run(sid, 1 + (i % 6), new Date(start).toISOString(), new Date(start + 3600_000).toISOString());
    }
  })();
  db.close();
}
