import type { Db } from '../../db/knex';
import type { RigRepository } from '../rig/rig.repository';
import { loadApparatus, type ApparatusBundle, type SnapshotBundle } from '../rig/point-snapshots';
import { changeoverOf, hangFor, profileFor, sessionRisk, type Changeover, type ClassOnPoint, type HangingPoint } from '../../../shared/clearance';
import type { Policy } from '../../../shared/schemas/policy';
import type { ApparatusKind } from '../../../shared/schemas/vocabulary';

/*
 * A booked class as the rig answers it (PRODUCT.md §4.6, §4.7): each point as it hangs for the
 * class, its changeovers and whether it is at risk. Shared by the calendar, Today and the mail
 * worker, so all three tell the same story.
 */

/** What a booked class needs from its record: its kind and load figures, points and recorded apparatus. */
export interface BookedClass {
  apparatus: string;
  performersPerPoint: number;
  dynamicFactor: number | null;
  bodyMassKg: number | null;
  pointIds: number[];
  recordedApparatus: Array<{ pointId: number; gearId: number }>;
}

/** The class's load profile: its own figures where set, else the policy's (PRODUCT.md §3). */
export function classOnPoint(c: BookedClass, policy: Policy): ClassOnPoint {
  const apparatus = c.apparatus as ApparatusKind;
  const { name: _name, ...profile } = profileFor({ ...c, name: '', apparatus }, policy);
  return { apparatus, performersPerPoint: c.performersPerPoint, profile };
}

/** Every apparatus item recorded for these classes, loaded once. */
export function loadRecorded(rig: RigRepository, classes: BookedClass[], trx: Db): Promise<Map<number, ApparatusBundle>> {
  return loadApparatus(rig, { ids: classes.flatMap((c) => c.recordedApparatus.map((a) => a.gearId)) }, trx);
}

export interface HungPoint {
  bundle: SnapshotBundle;
  hanging: HangingPoint;
}

/** Each booked point (that still exists) as it hangs for the class. */
export function hangingOf(c: BookedClass, bundles: Map<number, SnapshotBundle>, recorded: Map<number, ApparatusBundle>): HungPoint[] {
  const kind = c.apparatus as ApparatusKind;
  return c.pointIds
    .map((id) => bundles.get(id))
    .filter((b): b is SnapshotBundle => b !== undefined)
    .map((bundle) => {
      const gearId = c.recordedApparatus.find((a) => a.pointId === bundle.point.id)?.gearId;
      const item = gearId === undefined ? null : (recorded.get(gearId) ?? null);
      return { bundle, hanging: hangFor(bundle.snapshot, kind, item) };
    });
}

/** §4.4 and §4.6 at-risk for a booked class over its points as they hang for it (`cls`: its `classOnPoint`, when the caller has it). */
export function riskOf(c: BookedClass, hung: HungPoint[], policy: Policy, now: Date, s: { startsAt: Date; endsAt: Date; cancelled: boolean }, cls: ClassOnPoint = classOnPoint(c, policy)) {
  return sessionRisk({
    points: hung.map((h) => h.hanging.snapshot),
    policy,
    now,
    startsAt: s.startsAt,
    endsAt: s.endsAt,
    cancelled: s.cancelled,
    cls,
    withoutApparatus: hung.filter((h) => h.hanging.apparatus === null).map((h) => h.bundle.point.id),
  });
}

/** The changeovers a class needs, in point order: "Mount hoop HP-0102 on LS-3 before 18:30". */
export function changeoversOf(hung: HungPoint[], startsAt: Date, timeZone: string, withDay: boolean): Changeover[] {
  return hung.map((h) => changeoverOf(h.bundle.point, h.hanging, startsAt, timeZone, withDay)).filter((c): c is Changeover => c !== null);
}

/** What hangs on each point for the class, for the wire. */
export function apparatusWire(hung: HungPoint[]) {
  return hung.map(({ bundle, hanging }) => ({
    pointId: bundle.point.id,
    gearId: hanging.apparatus?.id ?? null,
    kind: hanging.apparatus?.kind ?? null,
    serial: hanging.apparatus?.serial ?? null,
    mounted: hanging.apparatus !== null && !hanging.changeover,
  }));
}
