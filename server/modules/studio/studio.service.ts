import type { Clock } from '../../clock';
import { writeTransaction, type Db } from '../../db/knex';
import type { AuditRepository } from '../audit/audit.repository';
import type { Studio, UpdateStudio } from '../../../shared/schemas/studio';
import { requiredFactorReasonOf } from '../../../shared/schemas/policy';
import type { StudioRepository } from './studio.repository';

/** Each policy field that differs, by its path ("intervalDays.textile"), with its value before and after. */
export function policyChanges(before: unknown, after: unknown, path = ''): Array<{ field: string; before: unknown; after: unknown }> {
  const isObject = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);
  if (isObject(before) && isObject(after)) {
    return [...new Set([...Object.keys(before), ...Object.keys(after)])].flatMap((k) => policyChanges(before[k], after[k], path ? `${path}.${k}` : k));
  }
  // A field absent and a field null say the same (an older stored policy lacks newer fields).
  return JSON.stringify(before ?? null) === JSON.stringify(after ?? null) ? [] : [{ field: path, before: before ?? null, after: after ?? null }];
}

export function studioService(repo: StudioRepository, clock: Clock, deps: { db: Db; audit: AuditRepository }) {
  return {
    get: () => repo.get(),
    /**
     * Saves the studio; every policy change is audited with the whole policy before and after and
     * the fields that changed (PRODUCT.md §4.9, §10), in the same transaction as the save.
     */
    async update(patch: UpdateStudio, actorId: number): Promise<Studio> {
      return writeTransaction(deps.db, async (trx) => {
        const now = clock.now();
        const current = await repo.get(trx);
        // The reason is kept only with a factor that needs one, so a stale reason never sits beside a factor of 5 or more.
        const policy = patch.policy ? { ...patch.policy, requiredFactorReason: requiredFactorReasonOf(patch.policy) } : current.policy;
        const next = { name: patch.name ?? current.name, policy };
        await repo.save(next, now, trx);
        const changes = policyChanges(current.policy, next.policy);
        if (changes.length) {
          await deps.audit.record(trx, { actorId, action: 'studio.policy_changed', entity: 'studio', entityId: 1, before: { policy: current.policy }, after: { policy: next.policy, changes } }, now);
        }
        if (next.name !== current.name) {
          await deps.audit.record(trx, { actorId, action: 'studio.renamed', entity: 'studio', entityId: 1, before: { name: current.name }, after: { name: next.name } }, now);
        }
        return next;
      });
    },
  };
}
export type StudioService = ReturnType<typeof studioService>;
