import type { Clock } from '../../clock';
import type { CreateUser, UpdateUser, User } from '../../../shared/schemas/staff';
import { conflict, notFound } from '../../http/errors';
import type { StaffRepository } from './staff.repository';
import { hashPassword } from './passwords';

export function staffService(repo: StaffRepository, clock: Clock) {
  return {
    list: () => repo.list(),

    async get(id: number): Promise<User> {
      const user = await repo.byId(id);
      if (!user) throw notFound('That staff member');
      return user;
    },

    async create(input: CreateUser): Promise<User> {
      if (await repo.emailTaken(input.email)) throw conflict('email_taken', 'Someone on the staff already uses that e-mail address.', { fields: { email: 'Already in use' } });
      return repo.insert({ email: input.email, name: input.name, role: input.role, passwordHash: await hashPassword(input.password) }, clock.now());
    },

    async update(id: number, patch: UpdateUser, actorId: number): Promise<User> {
      const user = await this.get(id);
      const losesOwner = user.role === 'owner' && user.active && ((patch.role && patch.role !== 'owner') || patch.active === false);
      if (losesOwner && (await repo.countActiveOwners()) <= 1) {
        throw conflict('last_owner', 'The studio needs at least one active owner. Make someone else owner first.');
      }
      if (id === actorId && patch.active === false) throw conflict('self_deactivation', 'You cannot deactivate your own account.');
      await repo.update(id, patch, clock.now());
      return this.get(id);
    },

    async resetPassword(id: number, password: string): Promise<void> {
      await this.get(id);
      await repo.update(id, { passwordHash: await hashPassword(password) }, clock.now());
    },
  };
}
export type StaffService = ReturnType<typeof staffService>;
