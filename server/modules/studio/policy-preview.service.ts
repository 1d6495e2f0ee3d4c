import type { Db } from '../../db/knex';
import type { Clock } from '../../clock';
import type { StudioRepository } from './studio.repository';
import type { RigRepository } from '../rig/rig.repository';
import type { SessionsRepository } from '../sessions/sessions.repository';
import type { ClassTypesRepository } from '../class-types/class-types.repository';
import { loadSnapshots } from '../rig/point-snapshots';
import { hangingOf, loadRecorded } from '../sessions/session-rig';
import { policyChangeEffects } from '../../../shared/clearance';
import type { Policy } from '../../../shared/schemas/policy';
import type { PolicyPreview } from '../../../shared/schemas/studio';

/** Far enough ahead to hold every booked class. */
const HORIZON_MS = 20 * 365 * 86_400_000;

/** What a proposed policy would do now, for the owner to confirm before saving (PRODUCT.md §4.9). */
export function policyPreviewService(deps: { db: Db; studio: StudioRepository; rig: RigRepository; sessions: SessionsRepository; classTypes: ClassTypesRepository; clock: Clock }) {
  const { db, studio, rig, sessions, classTypes, clock } = deps;
  return {
    async preview(proposed: Policy): Promise<PolicyPreview> {
      const now = clock.now();
      const { policy: current } = await studio.get();
      const bundles = await loadSnapshots(db, rig, {});
      const byId = new Map(bundles.map((b) => [b.point.id, b]));
      const types = new Map((await classTypes.list()).map((c) => [c.id, c]));
      const list = await sessions.list({ from: now, to: new Date(now.getTime() + HORIZON_MS) });
      const recorded = await loadRecorded(rig, list, db);
      // Each booked point as it hangs for its class: its fixed links and the class's apparatus (§4.7).
      const booked = list.flatMap((s) => {
        const classType = types.get(s.classTypeId);
        const points = hangingOf(s, byId, recorded).map((h) => h.hanging.snapshot);
        return classType ? [{ id: s.id, startsAt: new Date(s.startsAt), cancelled: s.cancelled, classType, points }] : [];
      });
      const effects = policyChangeEffects({
        points: bundles.map((b) => ({ snapshot: b.snapshot, roomName: b.point.roomName })),
        sessions: booked,
        before: current,
        after: proposed,
        now,
      });
      const iso = (d: Date | null) => d?.toISOString() ?? null;
      return {
        points: effects.points.map((p) => ({
          pointId: p.pointId,
          label: p.label,
          roomName: p.roomName,
          before: { status: p.before.status, clearedUntil: iso(p.before.clearedUntil) },
          after: { status: p.after.status, clearedUntil: iso(p.after.clearedUntil), reasons: p.after.reasons.map((r) => ({ code: r.code, message: r.message })) },
        })),
        sessions: effects.sessions.map((s) => ({ ...s, startsAt: s.startsAt.toISOString() })),
        checked: effects.checked,
      };
    },
  };
}
export type PolicyPreviewService = ReturnType<typeof policyPreviewService>;
