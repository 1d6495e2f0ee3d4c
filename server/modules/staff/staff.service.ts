import type { Clock } from '../../clock';
import type { CreateUser, Instructor, UpdateUser, User } from '../../../shared/schemas/staff';
import { conflict, notFound } from '../../http/errors';
import type { StaffRepository } from './staff.repository';
import { hashPassword } from './passwords';
import { writeTransaction, type Db } from '../../db/knex';
import type { AuditRepository } from '../audit/audit.repository';

// People sort as a reader expects: "bea" after "Adam", "Émile" among the E's (SQLite's ORDER BY compares bytes).
const byName = new Intl.Collator('en', { sensitivity: 'base', numeric: true });

export function staffService(repo: StaffRepository, clock: Clock, deps: { db: Db; audit: AuditRepository }) {
  return {
    list: () => repo.list(),

    async activeInstructors(): Promise<Instructor[]> {
      return (await repo.activeInstructors()).sort((a, b) => byName.compare(a.name, b.name) || a.id - b.id);
    },

    async get(id: number): Promise<User> {
      const user = await repo.byId(id);
      if (!user) throw notFound('That staff member');
      return user;
    },

    async create(input: CreateUser, actorId: number): Promise<User> {
      if (await repo.emailTaken(input.email)) throw conflict('email_taken', 'Someone on the staff already uses that e-mail address.', { fields: { email: 'Already in use' } });
      const passwordHash = await hashPassword(input.password);
      return writeTransaction(deps.db, async (trx) => {
        const user = await repo.insert({ email: input.email, name: input.name, role: input.role, passwordHash }, clock.now(), trx);
        await deps.audit.record(trx, { actorId, action: 'user.created', entity: 'user', entityId: user.id, after: { email: user.email, name: user.name, role: user.role } }, clock.now());
        return user;
      });
    },

    async update(id: number, patch: UpdateUser, actorId: number): Promise<User> {
      const user = await this.get(id);
      const losesOwner = user.role === 'owner' && user.active && ((patch.role && patch.role !== 'owner') || patch.active === false);
      if (losesOwner && (await repo.countActiveOwners()) <= 1) {
        throw conflict('last_owner', 'The studio needs at least one active owner. Make someone else owner first.');
      }
      if (id === actorId && patch.active === false) throw conflict('self_deactivation', 'You cannot deactivate your own account.');
      await writeTransaction(deps.db, async (trx) => {
        await repo.update(id, patch, clock.now(), trx);
        const before = { name: user.name, role: user.role, active: user.active };
        await deps.audit.record(trx, { actorId, action: patch.role && patch.role !== user.role ? 'user.role_changed' : 'user.updated', entity: 'user', entityId: id, before, after: patch }, clock.now());
      });
      return this.get(id);
    },

    async setPreferences(id: number, prefs: { digestOptOut: boolean }) {
      await repo.update(id, { digestOptOut: prefs.digestOptOut }, clock.now());
      return { digestOptOut: (await this.get(id)).digestOptOut };
    },

    async resetPassword(id: number, password: string): Promise<void> {
      await this.get(id);
      await repo.update(id, { passwordHash: await hashPassword(password) }, clock.now());
    },
  };
}
export type StaffService = ReturnType<typeof staffService>;
