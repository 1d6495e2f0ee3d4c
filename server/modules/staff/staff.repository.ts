import type { Db } from '../../db/knex';
import type { Role } from '../../../shared/schemas/vocabulary';
import type { Instructor, User } from '../../../shared/schemas/staff';

interface UserRow {
  id: number;
  email: string;
  name: string;
  role: Role;
  password_hash: string;
  active: number | boolean;
  digest_opt_out: number | boolean;
  session_version: number;
}

const toUser = (r: UserRow): User => ({
  id: r.id,
  email: r.email,
  name: r.name,
  role: r.role,
  active: Boolean(r.active),
  digestOptOut: Boolean(r.digest_opt_out),
});

export function staffRepository(db: Db) {
  return {
    /** Staff accounts only: students' accounts (role `student`, PRODUCT.md §11) are not staff. */
    async list(): Promise<User[]> {
      return (await db<UserRow>('users').whereNot({ role: 'student' }).orderBy('name')).map(toUser);
    },
    /** Only the two columns anyone may see: the query itself cannot leak an e-mail. */
    async activeInstructors(): Promise<Instructor[]> {
      return db<UserRow>('users').where({ role: 'instructor', active: true }).select('id', 'name');
    },
    async byId(id: number): Promise<User | null> {
      const row = await db<UserRow>('users').where({ id }).first();
      return row ? toUser(row) : null;
    },
    /** The student record a student's account is linked to (null when none, or no such account). */
    async studentIdOfAccount(id: number, trx: Db = db): Promise<number | null> {
      const row = (await trx('users').where({ id }).first('student_id')) as { student_id: number | null } | undefined;
      return row?.student_id ?? null;
    },
    /** The person with the version a session cookie must carry (never part of a User on the wire). */
    async withSessionVersion(id: number): Promise<(User & { sessionVersion: number }) | null> {
      const row = await db<UserRow>('users').where({ id }).first();
      return row ? { ...toUser(row), sessionVersion: Number(row.session_version) } : null;
    },
    async credentialsByEmail(email: string): Promise<(User & { passwordHash: string; sessionVersion: number }) | null> {
      const row = await db<UserRow>('users').where({ email }).first();
      return row ? { ...toUser(row), passwordHash: row.password_hash, sessionVersion: Number(row.session_version) } : null;
    },
    /** Ends every session the person holds: cookies issued under the old version are refused. */
    async moveSessionVersion(id: number, at: Date, trx: Db = db): Promise<number> {
      await trx('users').where({ id }).update({ session_version: trx.raw('session_version + 1'), updated_at: at.toISOString() });
      const row = await trx<UserRow>('users').where({ id }).first('session_version');
      return Number(row?.session_version ?? 0);
    },
    async emailTaken(email: string): Promise<boolean> {
      return Boolean(await db('users').where({ email }).first('id'));
    },
    async insert(u: { email: string; name: string; role: Role; passwordHash: string }, at: Date, trx: Db = db): Promise<User> {
      const now = at.toISOString();
      const [row] = await trx<UserRow>('users')
        .insert({ email: u.email, name: u.name, role: u.role, password_hash: u.passwordHash, active: true, digest_opt_out: false, created_at: now, updated_at: now } as never)
        .returning('*');
      return toUser(row as UserRow);
    },
    async update(id: number, patch: Partial<{ name: string; role: Role; active: boolean; digestOptOut: boolean; passwordHash: string }>, at: Date, trx: Db = db) {
      const row: Record<string, unknown> = { updated_at: at.toISOString() };
      if (patch.name !== undefined) row.name = patch.name;
      if (patch.role !== undefined) row.role = patch.role;
      if (patch.active !== undefined) row.active = patch.active;
      if (patch.digestOptOut !== undefined) row.digest_opt_out = patch.digestOptOut;
      if (patch.passwordHash !== undefined) row.password_hash = patch.passwordHash;
      await trx('users').where({ id }).update(row);
    },
    async countActiveOwners(trx: Db = db): Promise<number> {
      const r = await trx('users').where({ role: 'owner', active: true }).count<{ n: number }[]>({ n: '*' });
      return Number(r[0].n);
    },
  };
}
export type StaffRepository = ReturnType<typeof staffRepository>;
