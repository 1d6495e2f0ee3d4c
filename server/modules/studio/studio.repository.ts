import type { Db } from '../../db/knex';
import { defaultPolicy, policySchema, type Policy } from '../../../shared/schemas/policy';
import type { Studio } from '../../../shared/schemas/studio';

const STUDIO_ID = 1;

export function studioRepository(db: Db) {
  return {
    async get(trx: Db = db): Promise<Studio> {
      const row = await trx('studios').where({ id: STUDIO_ID }).first();
      if (!row) return { name: 'My studio', policy: defaultPolicy };
      // Fields added to the policy after a studio saved it take their defaults.
      const policy = policySchema.parse({ ...defaultPolicy, ...JSON.parse(row.policy_json) });
      return { name: row.name, policy };
    },
    async save(studio: { name: string; policy: Policy }, at: Date, trx: Db = db): Promise<void> {
      await trx('studios')
        .insert({ id: STUDIO_ID, name: studio.name, policy_json: JSON.stringify(studio.policy), updated_at: at.toISOString() })
        .onConflict('id')
        .merge();
    },
  };
}
export type StudioRepository = ReturnType<typeof studioRepository>;
