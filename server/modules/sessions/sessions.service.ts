import { createHash } from 'node:crypto';
import { readTransaction, writeTransaction, type Db } from '../../db/knex';
import type { Clock } from '../../clock';
import { HttpError, conflict, notFound } from '../../http/errors';
import type { AuditRepository } from '../audit/audit.repository';
import type { StudioRepository } from '../studio/studio.repository';
import type { RigRepository } from '../rig/rig.repository';
import { freshSnapshots, loadApparatus, type ApparatusBundle, type SnapshotBundle, type SnapshotSource } from '../rig/point-snapshots';
import { loadRecorded } from './session-rig';
import { sessionView } from './session-view';
import type { PlacesRepository } from '../places/places.repository';
import type { ClassTypesRepository } from '../class-types/class-types.repository';
import { profileFor } from '../class-types/class-types.service';
import { apparatusUnfitReasons, bookingReasons, formatStudioDateTime, formatStudioDay, byStrength, gearName, hangFor, instructorReasons, noApparatusReason, reasonCodes, splitPath, type Reason } from '../../../shared/clearance';
import { expandSeries, RecurrenceError } from '../../../shared/schedule/recurrence';
import { shiftWallClock, wallClockDelta } from '../../../shared/schedule/wall-clock';
import type { Policy } from '../../../shared/schemas/policy';
import type { ClassType } from '../../../shared/schemas/class-types';
import type { AvailabilityQuery, CancelSession, CreateSession, SessionListQuery, SwapPoints, UpdateSession } from '../../../shared/schemas/sessions';
import type { ApparatusChoice, SessionRecord, SessionsRepository } from './sessions.repository';
import { deriveInPieces, noDerivedCache, type DerivedCache } from '../../db/derived-cache';
import { unboundedWork, type HeavyWork } from '../../http/heavy-work';
import { sessionRecords, type SessionRecords } from './session-records';
import type { Writable } from 'node:stream';
import type { InspectionLogFilters } from '../../../shared/schemas/safety';
import { streamHeldCsv } from './classes-held-export';

export type SessionChangeKind = 'moved' | 'points_swapped' | 'room_changed' | 'cancelled' | 'instructor_changed';
/** Told inside the change's transaction, so the instructor's e-mail is queued with it or not at all. */
export interface SessionNotifier {
  sessionChanged(trx: Db, change: { kind: SessionChangeKind; sessionId: number; before: SessionRecord; after: SessionRecord; at: Date }): Promise<void>;
}

interface Occurrence {
  startsAt: Date;
  endsAt: Date;
}

/**
 * The longest range GET /api/sessions answers: the calendar's month view (six weeks) and a day, so
 * a month across a clock change (an hour longer) fits. Worked out afresh, a range is one
 * synchronous burst as long as the range; 100-day ranges asked forty at a time held every other
 * request (a health check, a booking) behind them.
 */
const MAX_RANGE_DAYS = 43;

/** Classes worked out between two turns of the event loop (a few milliseconds' work). */
const SESSIONS_PER_PIECE = 20;

const samePoints = (a: number[], b: number[]) => a.length === b.length && a.every((id) => b.includes(id));

export function sessionsService(deps: { db: Db; repo: SessionsRepository; rig: RigRepository; classTypes: ClassTypesRepository; studio: StudioRepository; audit: AuditRepository; clock: Clock; notifier?: SessionNotifier; derived?: DerivedCache; records?: SessionRecords; heavy?: HeavyWork; places?: Pick<PlacesRepository, 'liveForSessions'>; snapshots?: SnapshotSource }) {
  const { db, repo, rig, classTypes, studio, audit, clock } = deps;
  const heavy = deps.heavy ?? unboundedWork;
  const records = deps.records ?? sessionRecords({ db, rig, studio });
  const derived = deps.derived ?? noDerivedCache;
  const snapshots = deps.snapshots ?? freshSnapshots(db, rig);

  async function classTypeOrThrow(id: number, trx: Db = db): Promise<ClassType> {
    const c = await classTypes.byId(id, trx);
    if (!c) throw new HttpError(400, 'invalid_request', 'That class type does not exist.', { source: 'body', fields: { classTypeId: 'Pick a class type' } });
    return c;
  }
  async function checkInstructor(id: number, trx: Db) {
    const u = await trx('users').where({ id }).first('id', 'role', 'active');
    if (!u || !u.active || u.role !== 'instructor') throw new HttpError(400, 'invalid_request', 'Pick an active instructor.', { source: 'body', fields: { instructorId: 'Not an active instructor' } });
  }

  /**
   * Every reason of PRODUCT.md §4.4 for one occurrence, per point and for the session as a whole,
   * with the apparatus each point will hang for it (§4.7). Called inside the write transaction that
   * books, so no one can book between check and write.
   *
   * The apparatus for a point: the mounted one when it is of the class's kind; otherwise the item
   * named (`named`), or, for a `prefer`red one (kept from before a move or swap), that item while it
   * is still fit and free, else the server's choice: the strongest item of the kind in the gear room
   * (on no point) that is in service, with no open fault, inspected until after the class ends and
   * not past its service life by then, and hanging for no other class at that time.
   */
  async function checkOccurrence(
    trx: Db,
    a: { classType: ClassType; policy: Policy; now: Date; roomId: number; instructorId: number; occ: Occurrence; pointIds: number[]; bundles: Map<number, SnapshotBundle>; exclude: number[]; named?: Map<number, { gearId: number; prefer?: boolean }>; eachAlone?: boolean },
  ) {
    const profile = profileFor(a.classType, a.policy);
    const kind = a.classType.apparatus;
    const busy = await repo.pointsBusy(a.pointIds, a.occ.startsAt, a.occ.endsAt, a.exclude, trx);
    const named = a.named ?? new Map<number, { gearId: number; prefer?: boolean }>();
    const items = await loadApparatus(rig, { ids: [...named.values()].map((n) => n.gearId) }, trx);
    // Items of the kind in the gear room, strongest first, loaded only when some point needs one.
    const needsStock = a.pointIds.some((id) => {
      const mounted = a.bundles.get(id) && splitPath(a.bundles.get(id)!.snapshot.links).apparatus?.gear;
      return !(mounted && mounted.kind === kind) && (!named.has(id) || named.get(id)!.prefer);
    });
    const stock = needsStock ? [...(await loadApparatus(rig, { kind, unmounted: true }, trx)).values()].sort((x, y) => byStrength(x.gear, y.gear)) : [];
    const mountedIds = a.pointIds.map((id) => a.bundles.get(id) && splitPath(a.bundles.get(id)!.snapshot.links).apparatus?.gear.id).filter((x): x is number => typeof x === 'number');
    const itemBusy = await repo.apparatusBusy([...new Set([...items.keys(), ...stock.map((x) => x.gear.id), ...mountedIds])], a.occ.startsAt, a.occ.endsAt, a.exclude, trx);
    // Busy on another point; on this same point the clash is the point's own double booking.
    const busyElsewhere = (gearId: number, pointId: number) => [...(itemBusy.get(gearId) ?? [])].some((p) => p !== pointId);
    const taken = new Set<number>();
    const fitFor = (x: ApparatusBundle) => apparatusUnfitReasons(x.gear, x.openFaults, a.policy, a.now, a.occ.endsAt);
    const chooseFromStock = (): ApparatusBundle | null => stock.find((x) => !taken.has(x.gear.id) && !itemBusy.has(x.gear.id) && fitFor(x).length === 0) ?? null;

    const points = a.pointIds.map((pointId) => {
      const b = a.bundles.get(pointId);
      if (!b) return { pointId, reasons: [{ code: 'point_unknown', message: `There is no point with id ${pointId}.` }], warnings: [] as Reason[], apparatus: null };
      const label = b.point.label;
      const extra: Reason[] = [];
      const mounted = splitPath(b.snapshot.links).apparatus?.gear ?? null;
      const want = named.get(pointId);
      let recorded: ApparatusBundle | null = null;
      if (mounted && mounted.kind === kind) {
        if (want && !want.prefer && want.gearId !== mounted.id) {
          extra.push({ code: 'apparatus_already_mounted', message: `Point ${label} already has ${gearName(mounted)} mounted, and this class uses it; mount the other ${kind} on the point first to use that one.` });
        }
      } else {
        const item = want ? items.get(want.gearId) : undefined;
        if (want && !want.prefer && !item) extra.push({ code: 'unknown_gear', message: `There is no gear item with id ${want.gearId} to hang on point ${label}.` });
        else if (want && !want.prefer && item && item.gear.kind !== kind) extra.push({ code: 'apparatus_wrong_kind', message: `${gearName(item.gear)} is not a ${kind}: this class hangs a ${kind} on point ${label}.` });
        else if (item && item.gear.kind === kind && (!want!.prefer || (fitFor(item).length === 0 && !busyElsewhere(item.gear.id, pointId) && !taken.has(item.gear.id)))) recorded = item;
        else {
          recorded = chooseFromStock();
          if (!recorded) {
            const why = stock.length === 0 ? `the studio has no ${kind} in the gear room that is not retired` : stock.map((x) => `${x.gear.serial} (${itemBusy.has(x.gear.id) || taken.has(x.gear.id) ? 'hangs for another class at that time' : fitFor(x).map((r) => r.message.replace(/^The /, '')).join('; ')})`).join(', ');
            extra.push(noApparatusReason(b.point, kind, why));
          }
        }
      }
      const hanging = hangFor(b.snapshot, kind, recorded);
      const check = bookingReasons({
        point: hanging.snapshot,
        policy: a.policy,
        now: a.now,
        session: { startsAt: a.occ.startsAt, endsAt: a.occ.endsAt, apparatus: kind, performersPerPoint: a.classType.performersPerPoint, profile },
        pointBookedElsewhere: busy.has(pointId),
      });
      const reasons = [...check.reasons, ...extra];
      const hung = hanging.apparatus;
      if (hung && (busyElsewhere(hung.id, pointId) || taken.has(hung.id))) {
        reasons.push({ code: reasonCodes.apparatusDoubleBooked, message: `${gearName(hung)} already hangs for another class at that time, so it cannot also hang on point ${label}.` });
      }
      // Points asked about one by one (the picker, suggested replacements) do not share out the items.
      if (hung && !a.eachAlone) taken.add(hung.id);
      if (b.point.roomId !== a.roomId) reasons.push({ code: 'point_not_in_room', message: `${b.point.label} hangs in ${b.point.roomName}, not in this class’s room.` });
      const apparatus = hung ? { gearId: hung.id, kind: hung.kind, serial: hung.serial, changeover: hanging.changeover } : null;
      return { pointId, reasons, warnings: check.warnings, apparatus };
    });
    const clash = await repo.instructorClash(a.instructorId, a.occ.startsAt, a.occ.endsAt, a.exclude, trx);
    // The rule's reason, named: which instructor, and which class they teach then.
    const reasons: Reason[] = instructorReasons(clash !== null).map((r) =>
      clash ? { ...r, message: `${clash.instructorName} already teaches ${clash.className} in ${clash.roomName}, ${formatStudioDateTime(new Date(clash.startsAt), a.policy.timeZone)}–${formatStudioDateTime(new Date(clash.endsAt), a.policy.timeZone).split(', ').pop()}` } : r,
    );
    if (a.occ.endsAt.getTime() <= a.now.getTime()) reasons.push({ code: 'in_the_past', message: 'This class would already be over.' });
    return { points, reasons, ok: reasons.length === 0 && points.every((p) => p.reasons.length === 0) };
  }

  /** The apparatus rows to write for a checked occurrence. */
  const choicesOf = (points: Array<{ pointId: number; apparatus: { gearId: number } | null }>): ApparatusChoice[] =>
    points.filter((p) => p.apparatus).map((p) => ({ pointId: p.pointId, gearId: p.apparatus!.gearId }));

  /** Items named at booking, per point. */
  const namedOf = (list: Array<{ pointId: number; gearId: number }> | undefined, prefer = false) => new Map((list ?? []).map((x) => [x.pointId, { gearId: x.gearId, prefer }]));

  function refuse(points: Array<{ pointId: number; reasons: Reason[] }>, reasons: Reason[], extra: Record<string, unknown> = {}): never {
    const named = points.filter((p) => p.reasons.length).map(refusedPoint);
    throw conflict('points_unavailable', 'Some points cannot take this class at that time.', { points: named, reasons, ...extra });
  }

  /** A refused occurrence of a series, as a 409 lists it (creating a series, or changing "this and the following"). */
  function occurrenceOf(c: { occ: Occurrence; points: Array<{ pointId: number; reasons: Reason[] }>; reasons: Reason[] }) {
    return { startsAt: c.occ.startsAt.toISOString(), endsAt: c.occ.endsAt.toISOString(), points: c.points.filter((p) => p.reasons.length).map(refusedPoint), reasons: c.reasons };
  }
  /** A refused point as the 409 lists it: its reasons and warnings (the apparatus it would have hung is moot). */
  const refusedPoint = <P extends { pointId: number; reasons: Reason[] }>({ apparatus: _a, ...p }: P & { apparatus?: unknown }) => p;

  /** The kept records of the sessions that have started by `now` (kept first where a worker cycle has not yet). */
  const startRecords = (sessions: SessionRecord[], now: Date) => records.ensure(sessions.filter((s) => new Date(s.startsAt) <= now).map((s) => s.id), now);

  async function bundlesFor(pointIds: number[] | 'all', trx: Db = db) {
    const list = await snapshots.load(pointIds === 'all' ? {} : { ids: pointIds }, trx);
    return new Map(list.map((b) => [b.point.id, b]));
  }

  async function sessionOrThrow(id: number, trx: Db = db) {
    const s = await repo.byId(id, trx);
    if (!s) throw notFound('That session');
    return s;
  }

  /**
   * A class that has begun is part of the record: it is not cancelled or moved (a cancellation
   * would reach its instructor after it began), and once over nothing about it changes. While it
   * runs, points can still be swapped (a point that fails mid-class) and a cover instructor named.
   * Refused before anything is written, so no one is e-mailed.
   */
  function refuseIfPast(s: SessionRecord, now: Date, what: string, once: 'begun' | 'over') {
    const begun = new Date(s.startsAt).getTime() <= now.getTime();
    const over = new Date(s.endsAt).getTime() <= now.getTime();
    if (over || (once === 'begun' && begun)) {
      throw conflict('session_in_past', `This class has ${over ? 'already taken place' : 'already begun'}, so it cannot be ${what}.`, { sessionId: s.id, startsAt: s.startsAt });
    }
  }

  return {
    /**
     * The classes held in a range (PRODUCT.md §10): each booked point as recorded at the class's
     * start, streamed as CSV with the chain head at the foot. Missing records of started classes
     * are kept first; the head and the newest record are read together, so the foot vouches for
     * exactly the rows above it. The log's `kind` filter is for inspections and is ignored here.
     */
    async exportHeld(f: InspectionLogFilters, out: Writable): Promise<number> {
      const { name, policy } = await studio.get();
      await records.keepInRange(f.from, f.to, clock.now());
      const { head, upToId } = await readTransaction(db, async (trx) => ({ head: await audit.head(trx), upToId: await records.maxId(trx) }));
      const point = f.pointId ? await rig.pointById(f.pointId) : null;
      const gear = f.gearId ? await rig.gearById(f.gearId) : null;
      const day = (iso: string) => formatStudioDateTime(new Date(iso), policy.timeZone);
      const scope = [
        'Classes',
        point ? `on point ${point.label}` : f.pointId ? `on point #${f.pointId}` : '',
        gear ? `that hung gear ${gear.serial}` : f.gearId ? `that hung gear #${f.gearId}` : '',
        f.from ? `starting from ${day(f.from)}` : '',
        f.to ? `before ${day(f.to)}` : '',
      ].filter(Boolean).join(' ');
      return streamHeldCsv(out, records.heldBatches(f, upToId), { studioName: name, timeZone: policy.timeZone, exportedAt: clock.now(), head, scope });
    },
    async list(q: SessionListQuery) {
      const from = new Date(q.from);
      const to = new Date(q.to);
      if (to <= from) throw new HttpError(400, 'invalid_request', '“to” must be after “from”.', { source: 'query', fields: { to: 'Must be after from' } });
      if (to.getTime() - from.getTime() > MAX_RANGE_DAYS * 86_400_000) throw new HttpError(400, 'invalid_request', `Ask for at most ${MAX_RANGE_DAYS} days at a time.`, { source: 'query', fields: { to: 'Range too long' } });
      // The calendar's week is asked for again and again; the answer holds until a record changes
      // or the clock passes an instant it depends on (a class starting, a clearance running out).
      // Worked out one range at a time, in pieces of SESSIONS_PER_PIECE classes (server/http/heavy-work.ts).
      return derived.get(`sessions|${from.toISOString()}|${to.toISOString()}|${q.roomId ?? ''}|${q.instructorId ?? ''}`, () =>
        heavy.run(async () => {
          const { policy } = await studio.get();
          const now = clock.now();
          // A turn of the loop between the loads too: each is a synchronous burst on better-sqlite3.
          const sessions = await repo.list({ from, to, roomId: q.roomId, instructorId: q.instructorId });
          await heavy.pause();
          const kept = await startRecords(sessions, now);
          await heavy.pause();
          const bundles = await bundlesFor([...new Set(sessions.flatMap((s) => s.pointIds))]);
          await heavy.pause();
          const recorded = await loadRecorded(rig, sessions, db);
          const live = await deps.places?.liveForSessions(sessions.map((s) => s.id));
          return deriveInPieces(policy, now, async (track) => {
            const views = [];
            const context = { bundles, recorded, policy, now: track.now, track, kept, live };
            for (let i = 0; i < sessions.length; i += SESSIONS_PER_PIECE) {
              await heavy.pause();
              for (const s of sessions.slice(i, i + SESSIONS_PER_PIECE)) views.push(sessionView(s, context));
            }
            return views;
          });
        }),
      );
    },

    async get(id: number) {
      const s = await sessionOrThrow(id);
      const { policy } = await studio.get();
      const now = clock.now();
      const kept = await startRecords([s], now);
      const live = await deps.places?.liveForSessions([s.id]);
      return sessionView(s, { bundles: await bundlesFor(s.pointIds), recorded: await loadRecorded(rig, [s], db), policy, now, kept, live, pointStudents: true });
    },

    /**
     * What the booking dialog asks: each point of the room, bookable or not for that exact time,
     * with reasons. For a series (`rrule`), every class of it is checked: a point is bookable only
     * if it can take every one, and a reason true of some dates only names them.
     */
    async availability(q: AvailabilityQuery) {
      const { policy } = await studio.get();
      const classType = await classTypeOrThrow(q.classTypeId);
      const bundles = await bundlesFor('all');
      const roomPoints = [...bundles.values()].filter((b) => b.point.roomId === q.roomId).map((b) => b.point.id);
      const first: Occurrence = { startsAt: new Date(q.startsAt), endsAt: new Date(q.endsAt) };
      let occurrences = [first];
      if (q.rrule) {
        const duration = first.endsAt.getTime() - first.startsAt.getTime();
        try {
          occurrences = expandSeries(q.rrule, first.startsAt, policy.timeZone, { skipDays: q.skipDays?.split(',') }).map((s) => ({ startsAt: s, endsAt: new Date(s.getTime() + duration) }));
        } catch (err) {
          if (err instanceof RecurrenceError) throw new HttpError(400, 'invalid_request', err.message, { source: 'query', fields: { rrule: err.message } });
          throw err;
        }
        if (!occurrences.length) occurrences = [first];
      }
      const now = clock.now();
      const checks: Array<Awaited<ReturnType<typeof checkOccurrence>>> = [];
      for (const occ of occurrences) {
        checks.push((await checkOccurrence(db, { classType, policy, now, roomId: q.roomId, instructorId: q.instructorId ?? 0, occ, pointIds: roomPoints, bundles, exclude: q.excludeSessionId ? [q.excludeSessionId] : [], eachAlone: true })));
      }
      const day = (d: Date) => formatStudioDay(d, policy.timeZone);
      /** Each reason once; one true of only some classes of a series names their days. */
      const merge = (lists: Reason[][]) => {
        const byMessage = new Map<string, { reason: Reason; on: Date[] }>();
        lists.forEach((list, i) => {
          for (const r of list) {
            const e = byMessage.get(r.message) ?? { reason: r, on: [] };
            e.on.push(occurrences[i].startsAt);
            byMessage.set(r.message, e);
          }
        });
        return [...byMessage.values()].map(({ reason, on }) =>
          occurrences.length > 1 && on.length < occurrences.length ? { ...reason, message: `${reason.message} (${on.length === 1 ? 'on' : `${on.length} classes:`} ${on.slice(0, 4).map(day).join(', ')}${on.length > 4 ? ', …' : ''})` } : reason,
        );
      };
      const points = roomPoints.map((pointId, i) => {
        const reasons = merge(checks.map((c) => c.points[i].reasons));
        return { pointId, label: bundles.get(pointId)!.point.label, bookable: reasons.length === 0, reasons, warnings: merge(checks.map((c) => c.points[i].warnings)), apparatus: checks[0].points[i].apparatus };
      });
      const reasons = merge(checks.map((c) => c.reasons));
      return {
        points,
        reasons: q.instructorId ? reasons : reasons.filter((r) => r.code !== 'instructor_double_booked'),
        /** How many classes were checked (1, or every class of the series). */
        classes: occurrences.length,
      };
    },

    async create(request: CreateSession, actorId: number) {
      const { idempotencyKey, ...body } = request;
      const requestHash = createHash('sha256').update(JSON.stringify(body)).digest('hex');
      const { policy } = await studio.get();
      const first: Occurrence = { startsAt: new Date(body.startsAt), endsAt: new Date(body.endsAt) };
      const duration = first.endsAt.getTime() - first.startsAt.getTime();
      let occurrences: Occurrence[] = [first];
      if (body.rrule) {
        try {
          occurrences = expandSeries(body.rrule, first.startsAt, policy.timeZone, { skipDays: body.skipDays }).map((s) => ({ startsAt: s, endsAt: new Date(s.getTime() + duration) }));
        } catch (err) {
          if (err instanceof RecurrenceError) throw new HttpError(400, 'invalid_request', err.message, { source: 'body', fields: { rrule: err.message } });
          throw err;
        }
        if (!occurrences.length) throw new HttpError(400, 'invalid_request', 'The repeat rule gives no classes.', { source: 'body', fields: { rrule: 'No occurrences' } });
      }
      type Created = { ids: number[]; seriesId: number | null; warnings: Array<Reason & { pointId: number; startsAt: string }>; skipped: unknown[]; replayed?: boolean };
      const created = await writeTransaction(db, async (trx): Promise<Created> => {
        const now = clock.now();
        // Looked up inside the write transaction: a second request with the key waits for the
        // first to commit, then finds its result (one connection serialises the two).
        if (idempotencyKey) {
          const prior = await repo.idempotentResult('sessions.create', idempotencyKey, trx);
          if (prior) {
            if (prior.actorId !== actorId || prior.requestHash !== requestHash) throw conflict('idempotency_key_reused', 'This booking form already booked a different class. Close it and open a new one.');
            return { ...(prior.result as Created), replayed: true };
          }
        }
        const classType = await classTypeOrThrow(body.classTypeId, trx);
        // A retired type keeps its classes already booked, but takes no new ones.
        if (!classType.active) throw new HttpError(400, 'invalid_request', `“${classType.name}” is retired and takes no new bookings. Bring it back on the Class types page, or pick another.`, { source: 'body', fields: { classTypeId: `“${classType.name}” is retired: pick another class type` } });
        await checkInstructor(body.instructorId, trx);
        if (!(await rig.roomById(body.roomId, trx))) throw new HttpError(400, 'invalid_request', 'That room does not exist.', { source: 'body', fields: { roomId: 'Pick a room' } });
        const bundles = await bundlesFor(body.pointIds, trx);
        const checks = [];
        for (const occ of occurrences) {
          checks.push({ occ, ...(await checkOccurrence(trx, { classType, policy, now, roomId: body.roomId, instructorId: body.instructorId, occ, pointIds: body.pointIds, bundles, exclude: [], named: namedOf(body.apparatus) })) });
        }
        const refused = checks.filter((c) => !c.ok);
        if (refused.length && !(body.rrule && body.bookAvailable && refused.length < checks.length)) {
          if (!body.rrule) refuse(refused[0].points, refused[0].reasons);
          // A series books nothing until reception chooses: book the rest, or change points.
          refuse(refused[0].points, refused[0].reasons, {
            occurrences: refused.map(occurrenceOf),
            bookable: checks.length - refused.length,
            total: checks.length,
          });
        }
        const seriesId = body.rrule ? await repo.insertSeries(body.rrule, now, trx) : null;
        const ids: number[] = [];
        for (const c of checks.filter((x) => x.ok)) {
          ids.push(await repo.insert({ classTypeId: body.classTypeId, instructorId: body.instructorId, roomId: body.roomId, startsAt: c.occ.startsAt, endsAt: c.occ.endsAt, seriesId, pointIds: body.pointIds, apparatus: choicesOf(c.points) }, now, trx));
        }
        const apparatus = checks.filter((x) => x.ok).map((x) => choicesOf(x.points));
        await audit.record(trx, { actorId, action: 'session.booked', entity: 'session', entityId: ids[0], after: { ...body, sessionIds: ids, apparatus } }, now);
        const warnings = checks.filter((c) => c.ok).flatMap((c) => c.points.flatMap((p) => p.warnings.map((w) => ({ ...w, pointId: p.pointId, startsAt: c.occ.startsAt.toISOString() }))));
        const result: Created = { ids, seriesId, warnings, skipped: refused.map((c) => ({ startsAt: c.occ.startsAt.toISOString(), points: c.points.filter((p) => p.reasons.length).map(refusedPoint), reasons: c.reasons })) };
        if (idempotencyKey) await repo.keepIdempotentResult({ route: 'sessions.create', key: idempotencyKey, actorId, requestHash, result }, now, trx);
        return result;
      });
      const firstSession = await this.get(created.ids[0]);
      // A repeat says so, so the desk can tell "booked by your first click" from a second booking.
      return { ...firstSession, warnings: created.warnings, seriesId: created.seriesId, sessionIds: created.ids, skipped: created.skipped, replayed: created.replayed ?? false };
    },

    /** Move, stretch or change instructor, re-checked; `following` applies the same change to the rest of the series. */
    async update(id: number, patch: UpdateSession, actorId: number) {
      const { policy } = await studio.get();
      await writeTransaction(db, async (trx) => {
        const now = clock.now();
        const s = await sessionOrThrow(id, trx);
        if (s.cancelled) throw conflict('session_cancelled', 'A cancelled class cannot be changed.');
        const moves = patch.startsAt !== undefined || patch.endsAt !== undefined;
        refuseIfPast(s, now, moves ? 'moved' : 'changed', moves ? 'begun' : 'over');
        const targets = patch.scope === 'following' && s.seriesId ? await repo.bySeriesFrom(s.seriesId, s.startsAt, trx) : [s];
        // The change is applied to every class as wall-clock time in the studio's zone: moving
        // Tuesday 18:00 to 19:00 moves each later Tuesday to 19:00 local, across a clock change too.
        const zone = policy.timeZone;
        const dStart = patch.startsAt ? wallClockDelta(new Date(s.startsAt), new Date(patch.startsAt), zone) : 0;
        const dEnd = patch.endsAt ? wallClockDelta(new Date(s.endsAt), new Date(patch.endsAt), zone) : dStart;
        if (patch.instructorId !== undefined) await checkInstructor(patch.instructorId, trx);
        const classType = await classTypeOrThrow(s.classTypeId, trx);
        const pointsOf = (t: SessionRecord) => patch.pointIds ?? t.pointIds;
        const bundles = await bundlesFor([...new Set([...targets.flatMap((t) => t.pointIds), ...(patch.pointIds ?? [])])], trx);
        const exclude = targets.map((t) => t.id);
        // Every class is checked before any is written: a refusal names each one that cannot take the change.
        const checks = [];
        for (const t of targets) {
          const occ =
            t.id === s.id
              ? { startsAt: new Date(patch.startsAt ?? s.startsAt), endsAt: patch.endsAt ? new Date(patch.endsAt) : shiftWallClock(new Date(s.endsAt), dEnd, zone) }
              : { startsAt: shiftWallClock(new Date(t.startsAt), dStart, zone), endsAt: shiftWallClock(new Date(t.endsAt), dEnd, zone) };
          if (occ.endsAt <= occ.startsAt) throw new HttpError(400, 'invalid_request', 'The class must end after it starts.', { source: 'body', fields: { endsAt: 'Must be after the start' } });
          checks.push({ t, occ, ...(await checkOccurrence(trx, { classType, policy, now, roomId: t.roomId, instructorId: patch.instructorId ?? t.instructorId, occ, pointIds: pointsOf(t), bundles, exclude, named: namedOf(t.recordedApparatus, true) })) });
        }
        const refused = checks.filter((c) => !c.ok);
        if (refused.length) {
          const [first] = refused;
          const series = patch.scope === 'following' && s.seriesId ? { occurrences: refused.map((c) => ({ sessionId: c.t.id, ...occurrenceOf(c) })), bookable: checks.length - refused.length, total: checks.length } : {};
          refuse(first.points, first.reasons, { sessionId: first.t.id, startsAt: first.occ.startsAt.toISOString(), ...series });
        }
        for (const { t, occ, points } of checks) {
          await repo.update(t.id, { startsAt: occ.startsAt, endsAt: occ.endsAt, instructorId: patch.instructorId }, now, trx);
          const newPoints = patch.pointIds && !samePoints(patch.pointIds, t.pointIds) ? patch.pointIds : null;
          // A move may need another item where the one recorded is taken at the new time; new points go with it.
          await repo.replacePoints(t.id, pointsOf(t), choicesOf(points), occ.startsAt.toISOString(), occ.endsAt.toISOString(), trx);
          const after = (await repo.byId(t.id, trx))!;
          // One notice per class: a move that also changes points is told as the move (it names the points).
          const moved = occ.startsAt.getTime() !== new Date(t.startsAt).getTime() || occ.endsAt.getTime() !== new Date(t.endsAt).getTime();
          if (moved) await deps.notifier?.sessionChanged(trx, { kind: 'moved', sessionId: t.id, before: t, after, at: now });
          else if (newPoints) await deps.notifier?.sessionChanged(trx, { kind: 'points_swapped', sessionId: t.id, before: t, after, at: now });
          if (patch.instructorId !== undefined && patch.instructorId !== t.instructorId) await deps.notifier?.sessionChanged(trx, { kind: 'instructor_changed', sessionId: t.id, before: t, after, at: now });
        }
        await audit.record(trx, { actorId, action: dStart || dEnd ? 'session.moved' : patch.instructorId === undefined && patch.pointIds ? 'session.points_swapped' : 'session.instructor_changed', entity: 'session', entityId: id, before: { startsAt: s.startsAt, endsAt: s.endsAt, instructorId: s.instructorId, ...(patch.pointIds ? { pointIds: s.pointIds } : {}) }, after: patch }, now);
      });
      return this.get(id);
    },

    /**
     * Replace the points; with another `roomId` the class moves to that room on them. Same §4.4
     * checks either way. `following` gives every later class of the series the same points (and
     * room), all or nothing, refused with the same shape as a move of the following classes.
     */
    async swapPoints(id: number, body: SwapPoints, actorId: number) {
      const { pointIds } = body;
      const { policy } = await studio.get();
      await writeTransaction(db, async (trx) => {
        const now = clock.now();
        const s = await sessionOrThrow(id, trx);
        if (s.cancelled) throw conflict('session_cancelled', 'A cancelled class cannot be changed.');
        refuseIfPast(s, now, 'given other points', 'over');
        const roomId = body.roomId ?? s.roomId;
        if (roomId !== s.roomId && !(await rig.roomById(roomId, trx))) throw new HttpError(400, 'invalid_request', 'That room does not exist.', { source: 'body', fields: { roomId: 'Pick a room' } });
        const following = body.scope === 'following' && s.seriesId !== null;
        const targets = following ? await repo.bySeriesFrom(s.seriesId!, s.startsAt, trx) : [s];
        const classType = await classTypeOrThrow(s.classTypeId, trx);
        const bundles = await bundlesFor(pointIds, trx);
        const exclude = targets.map((t) => t.id);
        const checks = [];
        for (const t of targets) {
          const occ = { startsAt: new Date(t.startsAt), endsAt: new Date(t.endsAt) };
          const named = new Map([...namedOf(t.recordedApparatus, true), ...namedOf(body.apparatus)]);
          checks.push({ t, occ, ...(await checkOccurrence(trx, { classType, policy, now, roomId, instructorId: t.instructorId, occ, pointIds, bundles, exclude, named })) });
        }
        const refused = checks.filter((c) => !c.ok);
        if (refused.length) {
          const [first] = refused;
          const series = following ? { occurrences: refused.map((c) => ({ sessionId: c.t.id, ...occurrenceOf(c) })), bookable: checks.length - refused.length, total: checks.length } : {};
          refuse(first.points, first.reasons, { sessionId: first.t.id, startsAt: first.occ.startsAt.toISOString(), ...series });
        }
        for (const { t, points } of checks) {
          const changesRoom = roomId !== t.roomId;
          if (!changesRoom && samePoints(pointIds, t.pointIds) && !body.apparatus?.length) continue;
          await repo.replacePoints(t.id, pointIds, choicesOf(points), t.startsAt, t.endsAt, trx);
          await repo.update(t.id, changesRoom ? { roomId } : {}, now, trx);
          const after = (await repo.byId(t.id, trx))!;
          await deps.notifier?.sessionChanged(trx, { kind: changesRoom ? 'room_changed' : 'points_swapped', sessionId: t.id, before: t, after, at: now });
        }
        const sessionIds = following ? { sessionIds: targets.map((t) => t.id) } : {};
        const chosen = choicesOf(checks[0].points);
        if (roomId !== s.roomId) {
          await audit.record(trx, { actorId, action: 'session.room_changed', entity: 'session', entityId: id, before: { roomId: s.roomId, pointIds: s.pointIds }, after: { roomId, pointIds, ...sessionIds } }, now);
        } else {
          await audit.record(trx, { actorId, action: 'session.points_swapped', entity: 'session', entityId: id, before: { pointIds: s.pointIds, apparatus: s.recordedApparatus }, after: { pointIds, apparatus: chosen, ...sessionIds } }, now);
        }
      });
      return this.get(id);
    },

    /** Kept and marked, and the instructor told; `following` cancels the rest of the series too. */
    async cancel(id: number, body: CancelSession, actorId: number) {
      await writeTransaction(db, async (trx) => {
        const now = clock.now();
        const s = await sessionOrThrow(id, trx);
        if (s.cancelled) throw conflict('session_cancelled', 'This class is already cancelled.');
        refuseIfPast(s, now, 'cancelled', 'begun');
        const targets = body.scope === 'following' && s.seriesId ? await repo.bySeriesFrom(s.seriesId, s.startsAt, trx) : [s];
        for (const t of targets) {
          await repo.update(t.id, { cancelled: true, cancelReason: body.reason }, now, trx);
          await deps.notifier?.sessionChanged(trx, { kind: 'cancelled', sessionId: t.id, before: t, after: (await repo.byId(t.id, trx))!, at: now });
        }
        await audit.record(trx, { actorId, action: 'session.cancelled', entity: 'session', entityId: id, after: { reason: body.reason, sessionIds: targets.map((t) => t.id) } }, now);
      });
      return this.get(id);
    },

    /** Free, allowed, passing, unblocked points to swap in: same room first. */
    async alternatives(id: number) {
      const { policy } = await studio.get();
      const s = await sessionOrThrow(id);
      const classType = await classTypeOrThrow(s.classTypeId);
      const bundles = await bundlesFor('all');
      const candidates = [...bundles.keys()].filter((p) => !s.pointIds.includes(p));
      const now = clock.now();
      const occ = { startsAt: new Date(s.startsAt), endsAt: new Date(s.endsAt) };
      const c = await checkOccurrence(db, { classType, policy, now, roomId: s.roomId, instructorId: s.instructorId, occ, pointIds: candidates, bundles, exclude: [id], eachAlone: true });
      return c.points
        .filter((p) => p.reasons.every((r) => r.code === 'point_not_in_room'))
        .map((p) => ({ pointId: p.pointId, label: bundles.get(p.pointId)!.point.label, roomId: bundles.get(p.pointId)!.point.roomId, roomName: bundles.get(p.pointId)!.point.roomName, sameRoom: p.reasons.length === 0, warnings: p.warnings }))
        .sort((a, b) => Number(b.sameRoom) - Number(a.sameRoom) || a.warnings.length - b.warnings.length || a.label.localeCompare(b.label));
    },
  };
}
export type SessionsService = ReturnType<typeof sessionsService>;
