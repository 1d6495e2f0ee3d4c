import type { Db } from '../db/knex';
import type { Role } from '../../shared/schemas/vocabulary';
import { toGear, type GearRecord, type GearRow } from '../modules/rig/rig.repository';

/** A session as the mail needs it: what, where, when and who teaches. */
export interface MailSession {
  id: number;
  className: string;
  roomId: number;
  roomName: string;
  startsAt: string;
  endsAt: string;
  cancelled: boolean;
  cancelReason: string | null;
  atRisk: boolean;
  instructor: { id: number; name: string; email: string; active: boolean };
  /** The class's kind and load figures, for the §4.6 re-check of its points. */
  apparatus: string;
  performersPerPoint: number;
  dynamicFactor: number | null;
  bodyMassKg: number | null;
}

export interface StaffMember {
  id: number;
  name: string;
  email: string;
  role: Role;
  digestOptOut: boolean;
}

interface SessionJoinRow {
  id: number;
  class_name: string;
  room_id: number;
  room_name: string;
  starts_at: string;
  ends_at: string;
  cancelled: number | boolean;
  cancel_reason: string | null;
  at_risk: number | boolean;
  instructor_id: number;
  instructor_name: string;
  instructor_email: string;
  instructor_active: number | boolean;
  apparatus: string;
  performers_per_point: number;
  dynamic_factor: number | null;
  body_mass_kg: number | null;
}

const toSession = (r: SessionJoinRow): MailSession => ({
  id: r.id,
  className: r.class_name,
  roomId: r.room_id,
  roomName: r.room_name,
  startsAt: new Date(r.starts_at).toISOString(),
  endsAt: new Date(r.ends_at).toISOString(),
  cancelled: Boolean(r.cancelled),
  cancelReason: r.cancel_reason,
  atRisk: Boolean(r.at_risk),
  instructor: { id: r.instructor_id, name: r.instructor_name, email: r.instructor_email, active: Boolean(r.instructor_active) },
  apparatus: r.apparatus,
  performersPerPoint: r.performers_per_point,
  dynamicFactor: r.dynamic_factor,
  bodyMassKg: r.body_mass_kg,
});

function sessionSelect(trx: Db) {
  return trx('sessions')
    .join('class_types', 'class_types.id', 'sessions.class_type_id')
    .join('rooms', 'rooms.id', 'sessions.room_id')
    .join('users', 'users.id', 'sessions.instructor_id')
    .orderBy([{ column: 'sessions.starts_at' }, { column: 'sessions.id' }])
    .select(
      'sessions.id',
      'sessions.room_id',
      'sessions.starts_at',
      'sessions.ends_at',
      'sessions.cancelled',
      'sessions.cancel_reason',
      'sessions.at_risk',
      'sessions.instructor_id',
      'class_types.name as class_name',
      'class_types.apparatus',
      'class_types.performers_per_point',
      'class_types.dynamic_factor',
      'class_types.body_mass_kg',
      'rooms.name as room_name',
      'users.name as instructor_name',
      'users.email as instructor_email',
      'users.active as instructor_active',
    );
}

export interface OpenFaultRow {
  id: number;
  severity: string;
  description: string;
  reportedAt: Date;
  pointLabel: string | null;
  roomName: string | null;
  gear: { kind: string; serial: string; pointLabel: string | null } | null;
}

/** The reads (and the one flag write) the mail worker and the outbox make on other modules' tables. */
export function mailDataRepository(db: Db) {
  return {
    /** Not cancelled sessions starting in (from, to]. */
    async sessionsStartingIn(from: Date, to: Date, trx: Db = db): Promise<MailSession[]> {
      const rows = (await sessionSelect(trx)
        .where('sessions.cancelled', false)
        .where('sessions.starts_at', '>', from.toISOString())
        .where('sessions.starts_at', '<=', to.toISOString())) as SessionJoinRow[];
      return rows.map(toSession);
    },

    /** Future, not cancelled sessions, and any still flagged at risk (so a stale flag gets cleared). */
    async sessionsToWatch(now: Date, trx: Db = db): Promise<MailSession[]> {
      const rows = (await sessionSelect(trx).where((w) =>
        w.where((f) => f.where('sessions.cancelled', false).where('sessions.starts_at', '>', now.toISOString())).orWhere('sessions.at_risk', true),
      )) as SessionJoinRow[];
      return rows.map(toSession);
    },

    /** Future, not cancelled sessions starting before `to` (all of them when `to` is null). */
    async futureSessions(now: Date, to: Date | null, trx: Db = db): Promise<MailSession[]> {
      const q = sessionSelect(trx).where('sessions.cancelled', false).where('sessions.starts_at', '>', now.toISOString());
      if (to) q.where('sessions.starts_at', '<', to.toISOString());
      return ((await q) as SessionJoinRow[]).map(toSession);
    },

    async sessionById(id: number, trx: Db = db): Promise<MailSession | null> {
      const row = (await sessionSelect(trx).where('sessions.id', id).first()) as SessionJoinRow | undefined;
      return row ? toSession(row) : null;
    },

    async sessionsByIds(ids: number[], trx: Db = db): Promise<Map<number, MailSession>> {
      if (!ids.length) return new Map();
      const rows = (await sessionSelect(trx).whereIn('sessions.id', ids)) as SessionJoinRow[];
      return new Map(rows.map((r) => [r.id, toSession(r)]));
    },

    /** Whether a live class still to end after `now` is booked on the point. */
    async pointBookedAfter(pointId: number, now: Date, trx: Db = db): Promise<boolean> {
      return Boolean(await trx('session_points').where({ point_id: pointId, cancelled: false }).where('ends_at', '>', now.toISOString()).first('session_id'));
    },

    /** Booked point ids per session. */
    async pointIdsOf(sessionIds: number[], trx: Db = db): Promise<Map<number, number[]>> {
      const out = new Map<number, number[]>(sessionIds.map((id) => [id, []]));
      if (!sessionIds.length) return out;
      const rows = (await trx('session_points').whereIn('session_id', sessionIds).orderBy('point_id').select('session_id', 'point_id')) as Array<{ session_id: number; point_id: number }>;
      for (const r of rows) out.get(r.session_id)?.push(r.point_id);
      return out;
    },

    /** The apparatus recorded per point of each session (PRODUCT.md §4.7). */
    async recordedApparatusOf(sessionIds: number[], trx: Db = db): Promise<Map<number, Array<{ pointId: number; gearId: number }>>> {
      const out = new Map<number, Array<{ pointId: number; gearId: number }>>(sessionIds.map((id) => [id, []]));
      if (!sessionIds.length) return out;
      const rows = (await trx('session_apparatus').whereIn('session_id', sessionIds).orderBy('point_id').select('session_id', 'point_id', 'gear_id')) as Array<{ session_id: number; point_id: number; gear_id: number }>;
      for (const r of rows) out.get(r.session_id)?.push({ pointId: r.point_id, gearId: r.gear_id });
      return out;
    },

    async pointLabels(ids: number[], trx: Db = db): Promise<string[]> {
      if (!ids.length) return [];
      const rows = (await trx('points').whereIn('id', ids).orderBy('label').select('label')) as Array<{ label: string }>;
      return rows.map((r) => r.label);
    },

    /** Sets `sessions.at_risk` from `from` to `to`; false when it no longer held `from` (someone else changed it). */
    async setAtRiskIf(sessionId: number, from: boolean, to: boolean, trx: Db = db): Promise<boolean> {
      const n = await trx('sessions').where({ id: sessionId, at_risk: from }).update({ at_risk: to });
      return Number(n) > 0;
    },

    async activeStaff(roles: Role[], trx: Db = db): Promise<StaffMember[]> {
      const rows = (await trx('users').where('active', true).whereIn('role', roles).orderBy('id').select('id', 'name', 'email', 'role', 'digest_opt_out')) as Array<{
        id: number;
        name: string;
        email: string;
        role: Role;
        digest_opt_out: number | boolean;
      }>;
      return rows.map((r) => ({ id: r.id, name: r.name, email: r.email, role: r.role, digestOptOut: Boolean(r.digest_opt_out) }));
    },

    async userById(id: number, trx: Db = db): Promise<(StaffMember & { active: boolean }) | null> {
      const r = await trx('users').where({ id }).first('id', 'name', 'email', 'role', 'digest_opt_out', 'active');
      return r ? { id: r.id, name: r.name, email: r.email, role: r.role, digestOptOut: Boolean(r.digest_opt_out), active: Boolean(r.active) } : null;
    },

    /** Every open fault, newest first, with what it is on: the point (and its room), or the gear item and the point holding it. */
    async openFaults(trx: Db = db): Promise<OpenFaultRow[]> {
      const rows = (await trx('faults')
        .leftJoin('points', 'points.id', 'faults.point_id')
        .leftJoin('rooms', 'rooms.id', 'points.room_id')
        .leftJoin('gear_items', 'gear_items.id', 'faults.gear_id')
        .leftJoin('load_path_links', 'load_path_links.gear_id', 'faults.gear_id')
        .leftJoin('points as holders', 'holders.id', 'load_path_links.point_id')
        .where('faults.status', 'open')
        .orderBy([{ column: 'faults.reported_at', order: 'desc' }, { column: 'faults.id', order: 'desc' }])
        .select('faults.id', 'faults.severity', 'faults.description', 'faults.reported_at', 'points.label as point_label', 'rooms.name as room_name', 'gear_items.kind as gear_kind', 'gear_items.serial as gear_serial', 'holders.label as holder_label')) as Array<{ id: number; severity: string; description: string; reported_at: string; point_label: string | null; room_name: string | null; gear_kind: string | null; gear_serial: string | null; holder_label: string | null }>;
      return rows.map((r) => ({ id: r.id, severity: r.severity, description: r.description, reportedAt: new Date(r.reported_at), pointLabel: r.point_label, roomName: r.room_name, gear: r.gear_kind && r.gear_serial !== null ? { kind: r.gear_kind, serial: r.gear_serial, pointLabel: r.holder_label } : null }));
    },

    /** Gear not retired that has a service life set, with the point it hangs on. */
    async gearWithServiceLife(trx: Db = db): Promise<GearRecord[]> {
      const rows = (await trx('gear_items')
        .leftJoin('load_path_links', 'load_path_links.gear_id', 'gear_items.id')
        .leftJoin('points', 'points.id', 'load_path_links.point_id')
        .whereNot('gear_items.status', 'retired')
        .whereNotNull('gear_items.service_life_years')
        .orderBy('gear_items.serial')
        .select('gear_items.*', 'load_path_links.point_id as point_id', 'points.label as point_label')) as GearRow[];
      return rows.map(toGear);
    },
  };
}
export type MailDataRepository = ReturnType<typeof mailDataRepository>;
