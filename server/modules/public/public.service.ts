import type { Db } from '../../db/knex';
import type { Clock } from '../../clock';
import type { SessionsService } from '../sessions/sessions.service';
import type { PublicClass, PublicStudio, PublicTimetableQuery } from '../../../shared/schemas/my';
import type { StudioRepository } from '../studio/studio.repository';

/**
 * The public timetable (PRODUCT.md §11): upcoming classes with the places left, answered without
 * sign-in. Each entry is built field by field from the session, so no name, e-mail, room or point
 * of anyone can reach it.
 */
export function publicService(deps: { db: Db; clock: Clock; studio: StudioRepository; sessions: Pick<SessionsService, 'list'> }) {
  return {
    async studio(): Promise<PublicStudio> {
      const { name, policy } = await deps.studio.get();
      return { name, timeZone: policy.timeZone };
    },
    async timetable(q: PublicTimetableQuery): Promise<PublicClass[]> {
      const now = deps.clock.now().getTime();
      // Places left as the desk sees them (PRODUCT.md §11: capacity less the places taken), from the sessions' own view.
      const sessions = await deps.sessions.list({ from: q.from, to: q.to });
      return sessions
        .filter((s) => !s.cancelled && new Date(s.startsAt).getTime() > now)
        .map((s) => ({
          sessionId: s.id,
          className: s.className,
          apparatus: s.apparatus as PublicClass['apparatus'],
          startsAt: s.startsAt,
          endsAt: s.endsAt,
          placesLeft: Math.max(0, 'placesLeft' in s ? (s.placesLeft as number) : s.places),
        }));
    },
  };
}
export type PublicService = ReturnType<typeof publicService>;
