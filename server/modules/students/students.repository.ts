import type { Db } from '../../db/knex';
import { cutPage, keyset, pageLimit } from '../../db/keyset';
import type { WaiverMethod } from '../../../shared/schemas/vocabulary';

/** A student as stored (PRODUCT.md §11); `mergedIntoId` set on a duplicate merged into another. */
export interface StudentRecord extends StudentFields {
  id: number;
  mergedIntoId: number | null;
  createdAt: string;
  updatedAt: string;
}

interface Row {
  id: number;
  name: string;
  email: string;
  email_key: string;
  phone: string | null;
  emergency_name: string | null;
  emergency_phone: string | null;
  merged_into_id: number | null;
  created_at: string;
  updated_at: string;
}
const toStudent = (r: Row): StudentRecord => ({
  id: r.id,
  name: r.name,
  email: r.email,
  emailKey: r.email_key,
  phone: r.phone,
  emergencyName: r.emergency_name,
  emergencyPhone: r.emergency_phone,
  mergedIntoId: r.merged_into_id,
  createdAt: r.created_at,
  updatedAt: r.updated_at,
});

export interface StudentFields {
  name: string;
  email: string;
  emailKey: string;
  phone: string | null;
  emergencyName: string | null;
  emergencyPhone: string | null;
}

export interface AcceptanceRecord {
  id: number;
  studentId: number;
  waiverVersionId: number;
  version: number;
  fullName: string;
  method: WaiverMethod;
  recordedBy: number | null;
  acceptedAt: string;
  validUntil: string;
}

export interface WaiverVersionRecord {
  id: number;
  version: number;
  text: string;
  createdBy: number;
  createdAt: string;
}

/** `%`, `_` and the escape itself taken literally in a LIKE pattern (with ESCAPE '\'). */
const likeEscape = (s: string) => s.replace(/[\\%_]/g, (c) => `\\${c}`);

export function studentsRepository(db: Db) {
  const acceptanceSelect = (trx: Db) =>
    trx('waiver_acceptances')
      .join('waiver_versions', 'waiver_versions.id', 'waiver_acceptances.waiver_version_id')
      .select('waiver_acceptances.*', 'waiver_versions.version');
  const toAcceptance = (r: { id: number; student_id: number; waiver_version_id: number; version: number; full_name: string; method: WaiverMethod; recorded_by: number | null; accepted_at: string; valid_until: string }): AcceptanceRecord => ({
    id: r.id,
    studentId: r.student_id,
    waiverVersionId: r.waiver_version_id,
    version: r.version,
    fullName: r.full_name,
    method: r.method,
    recordedBy: r.recorded_by,
    acceptedAt: r.accepted_at,
    validUntil: r.valid_until,
  });

  return {
    async byId(id: number, trx: Db = db): Promise<StudentRecord | null> {
      const r = await trx<Row>('students').where({ id }).first();
      return r ? toStudent(r) : null;
    },
    async byIds(ids: number[], trx: Db = db): Promise<StudentRecord[]> {
      if (!ids.length) return [];
      return ((await trx<Row>('students').whereIn('id', [...new Set(ids)])) as Row[]).map(toStudent);
    },
    /** The live (not merged) student with this e-mail key, other than `exceptId`. */
    async byEmailKey(emailKey: string, exceptId?: number, trx: Db = db): Promise<StudentRecord | null> {
      const q = trx<Row>('students').where({ email_key: emailKey }).whereNull('merged_into_id');
      if (exceptId) q.whereNot('id', exceptId);
      const r = await q.first();
      return r ? toStudent(r) : null;
    },
    async insert(s: StudentFields, at: Date, trx: Db = db): Promise<number> {
      const [row] = await trx('students')
        .insert({
          name: s.name,
          email: s.email,
          email_key: s.emailKey,
          phone: s.phone,
          emergency_name: s.emergencyName,
          emergency_phone: s.emergencyPhone,
          created_at: at.toISOString(),
          updated_at: at.toISOString(),
        })
        .returning('id');
      return (row as { id: number }).id;
    },
    async update(id: number, s: Partial<StudentFields>, at: Date, trx: Db = db): Promise<void> {
      const patch: Record<string, unknown> = { updated_at: at.toISOString() };
      if (s.name !== undefined) patch.name = s.name;
      if (s.email !== undefined) patch.email = s.email;
      if (s.emailKey !== undefined) patch.email_key = s.emailKey;
      if (s.phone !== undefined) patch.phone = s.phone;
      if (s.emergencyName !== undefined) patch.emergency_name = s.emergencyName;
      if (s.emergencyPhone !== undefined) patch.emergency_phone = s.emergencyPhone;
      await trx('students').where({ id }).update(patch);
    },
    async markMerged(id: number, intoId: number, at: Date, trx: Db = db): Promise<void> {
      await trx('students').where({ id }).update({ merged_into_id: intoId, updated_at: at.toISOString() });
    },
    /**
     * Live students by name then id, keyset-paged; `q` matches part of the name (any case), of the
     * e-mail key, or of the phone number (as typed, or by its digits).
     */
    async list(f: { q?: string; cursor?: [string, number]; limit?: number }, trx: Db = db) {
      const q = trx<Row>('students').whereNull('merged_into_id').select('*');
      const term = f.q?.normalize('NFKC').trim().toLowerCase();
      if (term) {
        const pattern = `%${likeEscape(term)}%`;
        const digits = term.replace(/\D/g, '');
        q.where((w) => {
          w.whereRaw("lower(name) LIKE ? ESCAPE '\\'", [pattern]).orWhereRaw("email_key LIKE ? ESCAPE '\\'", [pattern]).orWhereRaw("phone LIKE ? ESCAPE '\\'", [pattern]);
          // "07700 900123" finds "07700-900-123": digits compared with the separators taken out.
          if (digits.length >= 3) w.orWhereRaw("replace(replace(replace(replace(replace(phone, ' ', ''), '-', ''), '(', ''), ')', ''), '.', '') LIKE ?", [`%${digits}%`]);
        });
      }
      keyset(q, [{ col: 'name', dir: 'asc' }, { col: 'id', dir: 'asc' }], f.cursor);
      q.limit(pageLimit(f.limit));
      const rows = ((await q) as Row[]).map(toStudent);
      return cutPage(rows, f.limit, (r) => [r.name, r.id]);
    },

    // ---- Waivers

    async currentVersion(trx: Db = db): Promise<WaiverVersionRecord | null> {
      const r = await trx('waiver_versions').orderBy('version', 'desc').first();
      return r ? { id: r.id, version: r.version, text: r.text, createdBy: r.created_by, createdAt: r.created_at } : null;
    },
    async versionByNumber(version: number, trx: Db = db): Promise<WaiverVersionRecord | null> {
      const r = await trx('waiver_versions').where({ version }).first();
      return r ? { id: r.id, version: r.version, text: r.text, createdBy: r.created_by, createdAt: r.created_at } : null;
    },
    async listVersions(trx: Db = db): Promise<WaiverVersionRecord[]> {
      const rows = await trx('waiver_versions').orderBy('version', 'desc');
      return rows.map((r: { id: number; version: number; text: string; created_by: number; created_at: string }) => ({ id: r.id, version: r.version, text: r.text, createdBy: r.created_by, createdAt: r.created_at }));
    },
    async insertVersion(v: { version: number; text: string; createdBy: number }, at: Date, trx: Db = db): Promise<number> {
      const [row] = await trx('waiver_versions').insert({ version: v.version, text: v.text, created_by: v.createdBy, created_at: at.toISOString() }).returning('id');
      return (row as { id: number }).id;
    },
    async insertAcceptance(a: { studentId: number; waiverVersionId: number; fullName: string; method: WaiverMethod; recordedBy: number | null; acceptedAt: Date; validUntil: Date }, trx: Db = db): Promise<number> {
      const [row] = await trx('waiver_acceptances')
        .insert({
          student_id: a.studentId,
          waiver_version_id: a.waiverVersionId,
          full_name: a.fullName,
          method: a.method,
          recorded_by: a.recordedBy,
          accepted_at: a.acceptedAt.toISOString(),
          valid_until: a.validUntil.toISOString(),
        })
        .returning('id');
      return (row as { id: number }).id;
    },
    async acceptanceById(id: number, trx: Db = db): Promise<AcceptanceRecord | null> {
      const r = await acceptanceSelect(trx).where('waiver_acceptances.id', id).first();
      return r ? toAcceptance(r) : null;
    },
    /** Each student's acceptance that holds longest (the one that says whether their waiver is valid). */
    async latestAcceptances(studentIds: number[], trx: Db = db): Promise<Map<number, AcceptanceRecord>> {
      const out = new Map<number, AcceptanceRecord>();
      if (!studentIds.length) return out;
      const rows = await acceptanceSelect(trx).whereIn('waiver_acceptances.student_id', [...new Set(studentIds)]).orderBy('waiver_acceptances.valid_until', 'asc').orderBy('waiver_acceptances.id', 'asc');
      for (const r of rows) out.set(r.student_id, toAcceptance(r));
      return out;
    },
    /** Moves a duplicate's waivers to the student kept. */
    async moveAcceptances(fromId: number, intoId: number, trx: Db = db): Promise<number> {
      return trx('waiver_acceptances').where({ student_id: fromId }).update({ student_id: intoId });
    },
  };
}
export type StudentsRepository = ReturnType<typeof studentsRepository>;
