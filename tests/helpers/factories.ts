import type { Db } from '../../server/db/knex';
import type { Role } from '../../shared/schemas/vocabulary';
import { hashPassword } from '../../server/modules/staff/passwords';

export const TEST_PASSWORD = 'correct-horse-battery';
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
