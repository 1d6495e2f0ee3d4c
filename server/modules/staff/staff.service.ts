import type { Clock } from '../../clock';
import type { CreateUser, Instructor, UpdateUser, User } from '../../../shared/schemas/staff';
import { conflict, notFound } from '../../http/errors';
import type { StaffRepository } from './staff.repository';
import { hashPassword } from './passwords';
import { writeTransaction, type Db } from '../../db/knex';
import type { AuditRepository } from '../audit/audit.repository';

// People sort as a reader expects: "bea" after "Adam", "Émile" among the E's (SQLite's ORDER BY compares bytes).
const byName = new Intl.Collator('en', { sensitivity: 'base', numeric: true });

export type SessionsEndedReason = 'signed_out' | 'password_reset' | 'deactivated' | 'role_changed';

export function staffService(repo: StaffRepository, clock: Clock, deps: { db: Db; audit: AuditRepository }) {
  const endSessions = async (trx: Db, id: number, actorId: number, reason: SessionsEndedReason) => {
    const sessionVersion = await repo.moveSessionVersion(id, clock.now(), trx);
    await deps.audit.record(trx, { actorId, action: 'user.sessions_ended', entity: 'user', entityId: id, after: { reason, sessionVersion } }, clock.now());
  };
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
      const roleChanged = Boolean(patch.role && patch.role !== user.role);
      const deactivated = patch.active === false && user.active;
      await writeTransaction(deps.db, async (trx) => {
        await repo.update(id, patch, clock.now(), trx);
        const before = { name: user.name, role: user.role, active: user.active };
        // Named for what changed, so the audit list reads as a sentence; before and after either way.
        const action =
          patch.role !== undefined && patch.role !== user.role
            ? 'user.role_changed'
            : patch.active !== undefined && patch.active !== user.active
              ? patch.active
                ? 'user.reactivated'
                : 'user.deactivated'
              : 'user.updated';
        await deps.audit.record(trx, { actorId, action, entity: 'user', entityId: id, before, after: patch }, clock.now());
        // A copied cookie must not outlive the access it was issued for; reactivating later does
        // not move the version back, so old cookies stay dead.
        if (deactivated) await endSessions(trx, id, actorId, 'deactivated');
        else if (roleChanged) await endSessions(trx, id, actorId, 'role_changed');
      });
      return this.get(id);
    },

    async setPreferences(id: number, prefs: { digestOptOut: boolean }) {
      await repo.update(id, { digestOptOut: prefs.digestOptOut }, clock.now());
      return { digestOptOut: (await this.get(id)).digestOptOut };
    },

    /** Audited without the password or its hash: who reset whose, and when. */
    async resetPassword(id: number, password: string, actorId: number): Promise<void> {
      const user = await this.get(id);
      const passwordHash = await hashPassword(password);
      await writeTransaction(deps.db, async (trx) => {
        await repo.update(id, { passwordHash }, clock.now(), trx);
        await deps.audit.record(trx, { actorId, action: 'user.password_reset', entity: 'user', entityId: id, after: { email: user.email } }, clock.now());
        await endSessions(trx, id, actorId, 'password_reset');
      });
    },

    /** Auth.js's sign-out: the cookie signed out was current, so every session of the person ends. */
    async signedOut(id: number): Promise<void> {
      await writeTransaction(deps.db, (trx) => endSessions(trx, id, id, 'signed_out'));
    },
  };
}
export type StaffService = ReturnType<typeof staffService>;
