import { writeTransaction, type Db } from '../../db/knex';
import type { Clock } from '../../clock';
import { HttpError, conflict, notFound } from '../../http/errors';
import type { AuditRepository } from '../audit/audit.repository';
import type { StudioRepository } from '../studio/studio.repository';
import type { PlacesRepository } from '../places/places.repository';
import { waiverStateAt, waiverValidUntil } from '../../../shared/places';
import { studentEmailKey, type CreateStudent, type OnlineWaiver, type PaperWaiver, type Student, type StudentDetail, type StudentListQuery, type UpdateStudent, type WaiverAcceptance, type WaiverStatus, type WaiverVersion } from '../../../shared/schemas/students';
import type { AcceptanceRecord, StudentRecord, StudentsRepository, WaiverVersionRecord } from './students.repository';

/** A waiver's state at `at` for the wire. */
export function waiverStatus(latest: AcceptanceRecord | null, at: Date): WaiverStatus {
  const state = waiverStateAt(latest, at);
  return { state, ok: state === 'valid', version: latest?.version ?? null, method: latest?.method ?? null, acceptedAt: latest?.acceptedAt ?? null, validUntil: latest?.validUntil ?? null };
}

const versionWire = (v: WaiverVersionRecord): WaiverVersion => ({ id: v.id, version: v.version, text: v.text, createdAt: v.createdAt });
const acceptanceWire = (a: AcceptanceRecord): WaiverAcceptance => ({ id: a.id, studentId: a.studentId, version: a.version, fullName: a.fullName, method: a.method, acceptedAt: a.acceptedAt, validUntil: a.validUntil });

/** Is this error a unique index refusing a second live student with the same address? */
const uniqueClash = (err: unknown) => {
  const e = err as { code?: string; message?: string };
  return e.code === '23505' || e.code === 'SQLITE_CONSTRAINT_UNIQUE' || /UNIQUE constraint failed/.test(e.message ?? '');
};

export function studentsService(deps: { db: Db; repo: StudentsRepository; places: PlacesRepository; studio: StudioRepository; audit: AuditRepository; clock: Clock }) {
  const { db, repo, places, studio, audit, clock } = deps;

  function duplicate(existing: StudentRecord): never {
    throw conflict('student_exists', `${existing.name} already has this e-mail address. Open their record instead of adding them again.`, { studentId: existing.id, name: existing.name, source: 'body', fields: { email: `Already used by ${existing.name}` } });
  }

  async function liveOrThrow(id: number, trx: Db = db): Promise<StudentRecord> {
    const s = await repo.byId(id, trx);
    if (!s) throw notFound('That student');
    if (s.mergedIntoId !== null) throw new HttpError(404, 'student_merged', 'This student record was merged into another one.', { mergedIntoId: s.mergedIntoId });
    return s;
  }

  function wire(s: StudentRecord, latest: AcceptanceRecord | null): Student {
    return { id: s.id, name: s.name, email: s.email, phone: s.phone, emergencyName: s.emergencyName, emergencyPhone: s.emergencyPhone, waiver: waiverStatus(latest, clock.now()), createdAt: s.createdAt, updatedAt: s.updatedAt };
  }

  async function one(id: number, trx: Db = db): Promise<Student> {
    const s = await liveOrThrow(id, trx);
    return wire(s, (await repo.latestAcceptances([id], trx)).get(id) ?? null);
  }

  const fieldsOf = (b: CreateStudent) => ({ name: b.name, email: b.email, emailKey: studentEmailKey(b.email), phone: b.phone ?? null, emergencyName: b.emergencyName ?? null, emergencyPhone: b.emergencyPhone ?? null });

  async function recordAcceptance(trx: Db, a: { student: StudentRecord; version: WaiverVersionRecord; fullName: string; method: 'online' | 'paper'; recordedBy: number | null; acceptedAt: Date }) {
    const { policy } = await studio.get(trx);
    const validUntil = waiverValidUntil(a.acceptedAt, policy.waiverValidMonths);
    const id = await repo.insertAcceptance({ studentId: a.student.id, waiverVersionId: a.version.id, fullName: a.fullName, method: a.method, recordedBy: a.recordedBy, acceptedAt: a.acceptedAt, validUntil }, trx);
    await audit.record(trx, { actorId: a.recordedBy, action: 'waiver.accepted', entity: 'student', entityId: a.student.id, after: { acceptanceId: id, version: a.version.version, method: a.method, fullName: a.fullName, acceptedAt: a.acceptedAt.toISOString(), validUntil: validUntil.toISOString() } }, clock.now());
    return acceptanceWire((await repo.acceptanceById(id, trx))!);
  }

  return {
    waiverStatus,

    async create(body: CreateStudent, actorId: number): Promise<Student> {
      const fields = fieldsOf(body);
      const id = await writeTransaction(db, async (trx) => {
        const now = clock.now();
        const existing = await repo.byEmailKey(fields.emailKey, undefined, trx);
        if (existing) duplicate(existing);
        let newId: number;
        try {
          newId = await repo.insert(fields, now, trx);
        } catch (err) {
          if (uniqueClash(err)) throw conflict('student_exists', 'A student with this e-mail address already exists.', { source: 'body', fields: { email: 'Already used' } });
          throw err;
        }
        await audit.record(trx, { actorId, action: 'student.created', entity: 'student', entityId: newId, after: { name: fields.name, email: fields.email } }, now);
        return newId;
      });
      return one(id);
    },

    async list(q: StudentListQuery) {
      const page = await repo.list({ q: q.q, cursor: q.cursor as [string, number] | undefined, limit: q.limit });
      const latest = await repo.latestAcceptances(page.rows.map((r) => r.id));
      return { items: page.rows.map((s) => wire(s, latest.get(s.id) ?? null)), nextCursor: page.nextCursor };
    },

    get: (id: number) => one(id),

    /** The student's page: contact, waiver, bookings ahead and past, how many classes attended. */
    async detail(id: number): Promise<StudentDetail> {
      const student = await one(id);
      const now = clock.now();
      const mine = await places.forStudent(id);
      const waitlists = new Map<number, number>();
      for (const p of mine.filter((x) => x.status === 'waitlisted')) {
        const all = (await places.forSession(p.sessionId)).filter((x) => x.status === 'waitlisted').sort((a, b) => (a.waitlistedAt ?? '').localeCompare(b.waitlistedAt ?? '') || a.id - b.id);
        waitlists.set(p.id, all.findIndex((x) => x.id === p.id) + 1);
      }
      const toWire = (p: (typeof mine)[number]) => ({ id: p.id, sessionId: p.sessionId, className: p.className, apparatus: p.apparatus, startsAt: p.startsAt, endsAt: p.endsAt, sessionCancelled: p.sessionCancelled, pointId: p.pointId, pointLabel: p.pointLabel, status: p.status, position: waitlists.get(p.id) ?? null });
      const upcoming = mine.filter((p) => new Date(p.endsAt) > now).reverse().map(toWire);
      const past = mine.filter((p) => new Date(p.endsAt) <= now).map(toWire);
      return { ...student, upcoming, past, attendanceCount: await places.attendedCount(id) };
    },

    async update(id: number, patch: UpdateStudent, actorId: number): Promise<Student> {
      await writeTransaction(db, async (trx) => {
        const now = clock.now();
        const s = await liveOrThrow(id, trx);
        const next: Partial<ReturnType<typeof fieldsOf>> = {};
        if (patch.name !== undefined) next.name = patch.name;
        if (patch.email !== undefined) {
          next.email = patch.email;
          next.emailKey = studentEmailKey(patch.email);
          const existing = await repo.byEmailKey(next.emailKey, id, trx);
          if (existing) duplicate(existing);
        }
        if (patch.phone !== undefined) next.phone = patch.phone ?? null;
        if (patch.emergencyName !== undefined) next.emergencyName = patch.emergencyName ?? null;
        if (patch.emergencyPhone !== undefined) next.emergencyPhone = patch.emergencyPhone ?? null;
        const before: Record<string, unknown> = {};
        const after: Record<string, unknown> = {};
        for (const [k, v] of Object.entries(next)) {
          if (k === 'emailKey') continue;
          const old = (s as unknown as Record<string, unknown>)[k];
          if (old !== v) {
            before[k] = old;
            after[k] = v;
          }
        }
        if (!Object.keys(after).length) return;
        try {
          await repo.update(id, next, now, trx);
        } catch (err) {
          if (uniqueClash(err)) throw conflict('student_exists', 'A student with this e-mail address already exists.', { source: 'body', fields: { email: 'Already used' } });
          throw err;
        }
        await audit.record(trx, { actorId, action: 'student.updated', entity: 'student', entityId: id, before, after }, now);
      });
      return one(id);
    },

    /**
     * The owner merges a duplicate (`id`) into the student kept (`intoId`): its places and waivers
     * move to the kept one (where both hold a place in the same class, the kept one's stays and the
     * duplicate's is cancelled), the duplicate is marked merged, and the whole is audited.
     */
    async merge(id: number, intoId: number, actorId: number) {
      if (id === intoId) throw new HttpError(400, 'invalid_request', 'Pick another student to merge into.', { source: 'body', fields: { intoId: 'Cannot merge a student into themself' } });
      await writeTransaction(db, async (trx) => {
        const now = clock.now();
        const dup = await liveOrThrow(id, trx);
        const kept = await repo.byId(intoId, trx);
        if (!kept || kept.mergedIntoId !== null) throw new HttpError(400, 'invalid_request', 'The student to keep does not exist.', { source: 'body', fields: { intoId: 'Pick a student' } });
        const mine = await places.forStudent(id, trx);
        const movedPlaces: number[] = [];
        const cancelledPlaces: number[] = [];
        for (const p of mine) {
          if (p.status !== 'cancelled' && (await places.liveFor(p.sessionId, intoId, trx))) {
            await places.update(p.id, { status: 'cancelled', cancelledAt: now.toISOString() }, now, trx);
            cancelledPlaces.push(p.id);
          }
          await places.update(p.id, { studentId: intoId }, now, trx);
          movedPlaces.push(p.id);
        }
        const movedWaivers = await repo.moveAcceptances(id, intoId, trx);
        await repo.markMerged(id, intoId, now, trx);
        await audit.record(trx, { actorId, action: 'student.merged', entity: 'student', entityId: id, before: { student: { id: dup.id, name: dup.name, email: dup.email, phone: dup.phone } }, after: { mergedIntoId: intoId, movedPlaces, cancelledPlaces, movedWaivers } }, now);
      });
      return one(intoId);
    },

    // ---- Waivers

    async waivers(includeHistory: boolean) {
      const versions = await repo.listVersions();
      return { current: versions[0] ? versionWire(versions[0]) : null, versions: includeHistory ? versions.map(versionWire) : [] };
    },

    async currentWaiver(): Promise<WaiverVersion | null> {
      const v = await repo.currentVersion();
      return v ? versionWire(v) : null;
    },

    /** The owner writes a new version of the waiver; earlier ones are kept as they were signed. */
    async addWaiverVersion(text: string, actorId: number): Promise<WaiverVersion> {
      const id = await writeTransaction(db, async (trx) => {
        const now = clock.now();
        const current = await repo.currentVersion(trx);
        if (current && current.text === text) throw conflict('waiver_unchanged', 'This text is the same as the current waiver.');
        const version = (current?.version ?? 0) + 1;
        const newId = await repo.insertVersion({ version, text, createdBy: actorId }, now, trx);
        await audit.record(trx, { actorId, action: 'waiver.version_added', entity: 'waiver_version', entityId: newId, after: { version, length: text.length } }, now);
        return newId;
      });
      return versionWire((await repo.listVersions()).find((v) => v.id === id)!);
    },

    /** The desk records a paper waiver the student signed (today, or on `signedOn`). */
    async recordPaper(studentId: number, body: PaperWaiver, actorId: number): Promise<WaiverAcceptance> {
      return writeTransaction(db, async (trx) => {
        const now = clock.now();
        const student = await liveOrThrow(studentId, trx);
        const version = body.version !== undefined ? await repo.versionByNumber(body.version, trx) : await repo.currentVersion(trx);
        if (!version) {
          if (body.version !== undefined) throw new HttpError(400, 'invalid_request', `There is no waiver version ${body.version}.`, { source: 'body', fields: { version: 'No such version' } });
          throw conflict('no_waiver', 'The owner has not written the waiver yet, so none can be recorded.');
        }
        let acceptedAt = now;
        if (body.signedOn) {
          // Noon UTC of the day signed: within that calendar day in any studio's zone.
          acceptedAt = new Date(`${body.signedOn}T12:00:00Z`);
          if (acceptedAt.getTime() > now.getTime() + 12 * 3_600_000) throw new HttpError(400, 'invalid_request', 'The signing date cannot be in the future.', { source: 'body', fields: { signedOn: 'Pick today or an earlier day' } });
          if (acceptedAt > now) acceptedAt = now;
        }
        return recordAcceptance(trx, { student, version, fullName: body.fullName, method: 'paper', recordedBy: actorId, acceptedAt });
      });
    },

    /** A student accepts the current waiver online by typing their full name (i17b's `POST /api/my/waiver`). */
    async acceptOnline(studentId: number, body: OnlineWaiver, userId: number | null): Promise<WaiverAcceptance> {
      return writeTransaction(db, async (trx) => {
        const student = await liveOrThrow(studentId, trx);
        const current = await repo.currentVersion(trx);
        if (!current) throw conflict('no_waiver', 'The studio has not published a waiver yet.');
        if (current.version !== body.version) throw conflict('waiver_version_outdated', 'The waiver text changed while you were reading it. Please read the new version and sign again.', { current: current.version });
        return recordAcceptance(trx, { student, version: current, fullName: body.fullName, method: 'online', recordedBy: userId, acceptedAt: clock.now() });
      });
    },
  };
}
export type StudentsService = ReturnType<typeof studentsService>;
