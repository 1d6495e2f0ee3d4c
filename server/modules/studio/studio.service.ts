import type { Clock } from '../../clock';
import type { Studio, UpdateStudio } from '../../../shared/schemas/studio';
import { requiredFactorReasonOf } from '../../../shared/schemas/policy';
import type { StudioRepository } from './studio.repository';

export function studioService(repo: StudioRepository, clock: Clock) {
  return {
    get: () => repo.get(),
    async update(patch: UpdateStudio): Promise<Studio> {
      const current = await repo.get();
      // The reason is kept only with a factor that needs one, so a stale reason never sits beside a factor of 5 or more.
      const policy = patch.policy ? { ...patch.policy, requiredFactorReason: requiredFactorReasonOf(patch.policy) } : current.policy;
      const next = { name: patch.name ?? current.name, policy };
      await repo.save(next, clock.now());
      return next;
    },
  };
}
export type StudioService = ReturnType<typeof studioService>;
