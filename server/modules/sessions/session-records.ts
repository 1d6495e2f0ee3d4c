import { writeTransaction, type Db } from '../../db/knex';
import { keyset, type SortColumn } from '../../db/keyset';
import type { RigRepository } from '../rig/rig.repository';
import type { StudioRepository } from '../studio/studio.repository';
import { loadApparatus, loadSnapshots } from '../rig/point-snapshots';
import { hangFor, recordAtStart, type RecordedStatus } from '../../../shared/clearance';
import type { ApparatusKind } from '../../../shared/schemas/vocabulary';
import type { Reason } from '../../../shared/clearance';

/** One booked point of a session as it stood when the class started; never rewritten. */
export interface SessionPointRecord {
  sessionId: number;
  pointId: number;
  label: string;
  startsAt: string;
  status: RecordedStatus;
  clearedUntil: string | null;
  reasons: Reason[];
  apparatus: { gearId: number; kind: string; serial: string } | null;
  recordedAt: string;
}

interface Row {
  id: number;
  session_id: number;
  point_id: number;
  point_label: string;
  starts_at: string;
  status: RecordedStatus;
  cleared_until: string | null;
  reasons_json: string;
  apparatus_json: string | null;
  recorded_at: string;
}

const toRecord = (r: Row): SessionPointRecord => ({
  sessionId: r.session_id,
  pointId: r.point_id,
  label: r.point_label,
  startsAt: r.starts_at,
  status: r.status,
  clearedUntil: r.cleared_until,
  reasons: JSON.parse(r.reasons_json) as Reason[],
  apparatus: r.apparatus_json ? (JSON.parse(r.apparatus_json) as SessionPointRecord['apparatus']) : null,
  recordedAt: r.recorded_at,
});

/** A record with its class as the export prints it: name, room, instructor, cancelled or not. */
export interface ClassHeldRecord extends SessionPointRecord {
  id: number;
  endsAt: string;
  cancelled: boolean;
  className: string;
  roomName: string;
  instructorName: string;
}

/** The classes-held export's filters: the log's range and point; `gearId` keeps classes that hung that item. */
export interface ClassHeldFilters {
  from?: string;
  to?: string;
  pointId?: number;
  gearId?: number;
}

/** Newest class first; a class's points together (by record id, unique, so the keyset is exact). */
const HELD_SORT: SortColumn[] = [
  { col: 'r.starts_at', dir: 'desc' },
  { col: 'r.session_id', dir: 'desc' },
  { col: 'r.id', dir: 'asc' },
];

/** How far back the worker looks for a started class without its record; older ones are kept when read. */
const WORKER_LOOKBACK_MS = 2 * 86_400_000;

/**
 * PRODUCT.md §10, history is not rewritten: when a class starts, each booked point's status,
 * reasons and hanging apparatus are kept in `session_records` (append-only). The mail worker keeps
 * them every cycle, and a read of a started class without its record keeps it first, so a record
 * is the rig as it stood at the start within a worker cycle. Past sessions are shown from these
 * rows, never from today's status.
 */
export function sessionRecords(deps: { db: Db; rig: RigRepository; studio: StudioRepository }) {
  const { db, rig, studio } = deps;

  /** The booked points of started classes with no record yet: all such, or those of `sessionIds`. */
  async function missing(trx: Db, now: Date, sessionIds?: number[] | 'all') {
    const q = trx('session_points as sp')
      .join('sessions as s', 's.id', 'sp.session_id')
      .leftJoin('session_records as r', (j) => j.on('r.session_id', '=', 'sp.session_id').andOn('r.point_id', '=', 'sp.point_id').andOn('r.starts_at', '=', 's.starts_at'))
      .join('class_types as c', 'c.id', 's.class_type_id')
      .leftJoin('session_apparatus as sa', (j) => j.on('sa.session_id', '=', 'sp.session_id').andOn('sa.point_id', '=', 'sp.point_id'))
      .whereNull('r.id')
      .where('s.starts_at', '<=', now.toISOString())
      .select('sp.session_id', 'sp.point_id', 's.starts_at', 'c.apparatus as kind', 'sa.gear_id');
    if (Array.isArray(sessionIds)) q.whereIn('sp.session_id', sessionIds);
    else if (sessionIds !== 'all') q.where('s.starts_at', '>', new Date(now.getTime() - WORKER_LOOKBACK_MS).toISOString());
    return (await q) as Array<{ session_id: number; point_id: number; starts_at: string; kind: string; gear_id: number | null }>;
  }

  /**
   * Keeps the record of every started class lacking one: of `sessionIds`, every one (`'all'`, at
   * start-up), or by default those started lately (each worker cycle). Returns how many points were recorded.
   */
  async function keepStarted(now: Date, sessionIds?: number[] | 'all'): Promise<number> {
    if (Array.isArray(sessionIds) && sessionIds.length === 0) return 0;
    // Usually every record is kept already: a read, and no write transaction.
    if (!(await missing(db, now, sessionIds)).length) return 0;
    return writeTransaction(db, async (trx) => {
      const rows = await missing(trx, now, sessionIds);
      if (!rows.length) return 0;
      const { policy } = await studio.get(trx);
      const bundles = new Map((await loadSnapshots(db, rig, { ids: [...new Set(rows.map((r) => r.point_id))] }, trx)).map((b) => [b.point.id, b]));
      const items = await loadApparatus(rig, { ids: rows.flatMap((r) => (r.gear_id === null ? [] : [r.gear_id])) }, trx);
      const inserts = rows.flatMap((r) => {
        const b = bundles.get(r.point_id);
        if (!b) return [];
        // The point as it hung for this class (PRODUCT.md §4.7): a changeover's item, not whatever is mounted.
        const hung = hangFor(b.snapshot, r.kind as ApparatusKind, r.gear_id === null ? null : (items.get(r.gear_id) ?? null));
        const rec = recordAtStart(hung.snapshot, policy, new Date(r.starts_at));
        return [{
          session_id: r.session_id,
          point_id: r.point_id,
          point_label: b.point.label,
          starts_at: r.starts_at,
          status: rec.status,
          cleared_until: rec.clearedUntil?.toISOString() ?? null,
          reasons_json: JSON.stringify(rec.reasons),
          apparatus_json: rec.apparatus ? JSON.stringify(rec.apparatus) : null,
          recorded_at: now.toISOString(),
        }];
      });
      for (let i = 0; i < inserts.length; i += 100) await trx('session_records').insert(inserts.slice(i, i + 100)).onConflict(['session_id', 'starts_at', 'point_id']).ignore();
      return inserts.length;
    });
  }

  async function bySession(sessionIds: number[], trx: Db = db): Promise<Map<number, SessionPointRecord[]>> {
    const out = new Map<number, SessionPointRecord[]>();
    for (let i = 0; i < sessionIds.length; i += 500) {
      const rows = (await trx('session_records').whereIn('session_id', sessionIds.slice(i, i + 500)).orderBy([{ column: 'session_id' }, { column: 'point_id' }])) as Row[];
      for (const r of rows) {
        const list = out.get(r.session_id);
        if (list) list.push(toRecord(r));
        else out.set(r.session_id, [toRecord(r)]);
      }
    }
    return out;
  }

  /** Keeps the record of every class started in [from, to) that lacks one, 500 classes at a time. */
  async function keepInRange(from: string | undefined, to: string | undefined, now: Date): Promise<void> {
    const q = db('sessions').where('starts_at', '<=', now.toISOString()).orderBy('id').pluck('id');
    if (from) q.where('starts_at', '>=', new Date(from).toISOString());
    if (to) q.where('starts_at', '<', new Date(to).toISOString());
    const started = (await q) as number[];
    for (let i = 0; i < started.length; i += 500) await keepStarted(now, started.slice(i, i + 500));
  }

  return {
    keepStarted,
    keepInRange,
    bySession,
    async maxId(trx: Db = db): Promise<number> {
      const row = (await trx('session_records').max({ id: 'id' }).first()) as { id: number | null } | undefined;
      return Number(row?.id ?? 0);
    },
    /**
     * Every record of classes started in [from, to), newest class first, in batches read one after
     * another by keyset (the export): memory holds one batch whatever the range. Only records up to
     * `upToId` are read, so the foot's chain head vouches for exactly the rows above it.
     */
    async *heldBatches(f: ClassHeldFilters, upToId: number, batchSize = 500): AsyncGenerator<ClassHeldRecord[]> {
      let after: Array<string | number> | undefined;
      for (;;) {
        const q = db('session_records as r')
          .join('sessions as s', 's.id', 'r.session_id')
          .join('class_types as c', 'c.id', 's.class_type_id')
          .join('rooms as m', 'm.id', 's.room_id')
          .leftJoin('users as u', 'u.id', 's.instructor_id')
          .where('r.id', '<=', upToId)
          .select('r.*', 's.ends_at', 's.cancelled', 'c.name as class_name', 'm.name as room_name', 'u.name as instructor_name');
        if (f.from) q.where('r.starts_at', '>=', new Date(f.from).toISOString());
        if (f.to) q.where('r.starts_at', '<', new Date(f.to).toISOString());
        if (f.pointId) q.where('r.point_id', f.pointId);
        const rows = (await keyset(q, HELD_SORT, after).limit(batchSize)) as Array<Row & { ends_at: string; cancelled: number | boolean; class_name: string; room_name: string; instructor_name: string | null }>;
        if (!rows.length) return;
        const items = rows
          .map((r) => ({ ...toRecord(r), id: r.id, endsAt: r.ends_at, cancelled: Boolean(r.cancelled), className: r.class_name, roomName: r.room_name, instructorName: r.instructor_name ?? 'former staff member' }))
          // The item that hung is kept in the record's JSON; a gear filter reads it there.
          .filter((r) => !f.gearId || r.apparatus?.gearId === f.gearId);
        if (items.length) yield items;
        if (rows.length < batchSize) return;
        const last = rows[rows.length - 1];
        after = [last.starts_at, last.session_id, last.id];
      }
    },
    /** The records of the given started sessions, keeping any not yet kept first. */
    async ensure(sessionIds: number[], now: Date): Promise<Map<number, SessionPointRecord[]>> {
      if (!sessionIds.length) return new Map();
      await keepStarted(now, sessionIds);
      return bySession(sessionIds);
    },
    /** A point's history of classes, newest first, with the class's name and room; `cursor` continues a page. */
    async forPoint(pointId: number, o: { limit: number; cursor?: { startsAt: string; id: number } }) {
      const q = db('session_records as r')
        .join('sessions as s', 's.id', 'r.session_id')
        .join('class_types as c', 'c.id', 's.class_type_id')
        .join('rooms as m', 'm.id', 's.room_id')
        .join('users as u', 'u.id', 's.instructor_id')
        .where('r.point_id', pointId)
        .orderBy([{ column: 'r.starts_at', order: 'desc' }, { column: 'r.id', order: 'desc' }])
        .limit(o.limit + 1)
        .select('r.*', 's.ends_at', 's.cancelled', 'c.name as class_name', 'm.name as room_name', 'u.name as instructor_name');
      if (o.cursor) q.where((w) => w.where('r.starts_at', '<', o.cursor!.startsAt).orWhere((w2) => w2.where('r.starts_at', o.cursor!.startsAt).where('r.id', '<', o.cursor!.id)));
      const rows = (await q) as Array<Row & { ends_at: string; cancelled: number | boolean; class_name: string; room_name: string; instructor_name: string }>;
      const page = rows.slice(0, o.limit);
      const last = page[page.length - 1];
      return {
        items: page.map((r) => ({ ...toRecord(r), endsAt: r.ends_at, cancelled: Boolean(r.cancelled), className: r.class_name, roomName: r.room_name, instructorName: r.instructor_name })),
        nextCursor: rows.length > o.limit && last ? `${last.starts_at}_${last.id}` : null,
      };
    },
  };
}
export type SessionRecords = ReturnType<typeof sessionRecords>;
