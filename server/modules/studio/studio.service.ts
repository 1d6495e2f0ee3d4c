import type { Clock } from '../../clock';
import type { Studio, UpdateStudio } from '../../../shared/schemas/studio';
import type { StudioRepository } from './studio.repository';

export function studioService(repo: StudioRepository, clock: Clock) {
  return {
    get: () => repo.get(),
    async update(patch: UpdateStudio): Promise<Studio> {
      const current = await repo.get();
      const next = { name: patch.name ?? current.name, policy: patch.policy ?? current.policy };
      await repo.save(next, clock.now());
      return next;
    },
  };
}
export type StudioService = ReturnType<typeof studioService>;
