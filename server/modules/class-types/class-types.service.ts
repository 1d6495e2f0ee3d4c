import { takenMessage } from '../../../shared/text/labels';
import { writeTransaction, type Db } from '../../db/knex';
import type { Clock } from '../../clock';
import { conflict, notFound } from '../../http/errors';
import type { AuditRepository } from '../audit/audit.repository';
import type { CreateClassType, ClassType, UpdateClassType } from '../../../shared/schemas/class-types';
import type { Policy } from '../../../shared/schemas/policy';
import { profileFor } from '../../../shared/clearance';
import type { ClassTypesRepository } from './class-types.repository';

// The profile rule is shared with the policy preview; kept under its old name here.
export { profileFor } from '../../../shared/clearance';

export function classTypesService(deps: { db: Db; repo: ClassTypesRepository; audit: AuditRepository; clock: Clock }) {
  const { db, repo, audit, clock } = deps;
  return {
    list: () => repo.list(),
    async get(id: number) {
      const c = await repo.byId(id);
      if (!c) throw notFound('That class type');
      return c;
    },
    async create(input: CreateClassType, actorId: number) {
      const takenBy = await repo.nameTaken(input.name);
      if (takenBy) throw conflict('name_taken', takenMessage('Class type', input.name, takenBy), { fields: { name: takenBy === input.name ? 'Already used' : `Looks the same as “${takenBy}”` }, existing: takenBy });
      const id = await writeTransaction(db, async (trx) => {
        const newId = await repo.insert(input, clock.now(), trx);
        await audit.record(trx, { actorId, action: 'class_type.created', entity: 'class_type', entityId: newId, after: input }, clock.now());
        return newId;
      });
      return this.get(id);
    },
    /** Rename, retire or bring back; a name looking like another type's is refused as on create. */
    async update(id: number, patch: UpdateClassType, actorId: number) {
      const before = await this.get(id);
      if (patch.name !== undefined) {
        const takenBy = await repo.nameTaken(patch.name, id);
        if (takenBy) throw conflict('name_taken', takenMessage('Class type', patch.name, takenBy), { fields: { name: takenBy === patch.name ? 'Already used' : `Looks the same as “${takenBy}”` }, existing: takenBy });
      }
      const changed = (patch.name !== undefined && patch.name !== before.name) || (patch.active !== undefined && patch.active !== before.active);
      if (!changed) return before;
      await writeTransaction(db, async (trx) => {
        const now = clock.now();
        await repo.update(id, patch, trx);
        const action = patch.active === false && before.active ? 'class_type.retired' : patch.active === true && !before.active ? 'class_type.restored' : 'class_type.updated';
        await audit.record(trx, { actorId, action, entity: 'class_type', entityId: id, before: { name: before.name, active: before.active }, after: patch }, now);
      });
      return this.get(id);
    },
    async profileOf(id: number, policy: Policy) {
      return profileFor(await this.get(id), policy);
    },
  };
}
export type ClassTypesService = ReturnType<typeof classTypesService>;
