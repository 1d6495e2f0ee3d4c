import type { Db } from '../server/db/knex';
import { defaultPolicy } from '../shared/schemas/policy';
import { hashPassword } from '../server/modules/staff/passwords';

/** The invented demo studio and its staff. Password for every demo account: loftwise-demo. */
export const DEMO_PASSWORD = 'loftwise-demo';

export const demoStaff = [
  { email: 'owner@loftwise.test', name: 'Odile Marchetti', role: 'owner' },
  { email: 'reception@loftwise.test', name: 'Rafi Okonjo', role: 'reception' },
  { email: 'instructor@loftwise.test', name: 'Ines Albrecht', role: 'instructor' },
  { email: 'rigger@loftwise.test', name: 'Ruairi Tamsett', role: 'rigger' },
  { email: 'juno.vale@loftwise.test', name: 'Juno Vale', role: 'instructor' },
  { email: 'piet.arlo@loftwise.test', name: 'Piet Arlo', role: 'instructor' },
  { email: 'sol.hennig@loftwise.test', name: 'Sol Hennig', role: 'reception' },
] as const;

export async function seedStudioAndStaff(trx: Db, now: Date): Promise<void> {
  const at = now.toISOString();
  const existing = await trx('studios').where({ id: 1 }).first();
  if (!existing) {
    await trx('studios').insert({ id: 1, name: 'Hollow Pine Aerial Studio', policy_json: JSON.stringify(defaultPolicy), updated_at: at });
  }
  const hash = await hashPassword(DEMO_PASSWORD);
  for (const s of demoStaff) {
    const found = await trx('users').where({ email: s.email }).first('id');
    if (!found) {
      await trx('users').insert({ email: s.email, name: s.name, role: s.role, password_hash: hash, active: true, digest_opt_out: false, created_at: at, updated_at: at });
    }
  }
}
