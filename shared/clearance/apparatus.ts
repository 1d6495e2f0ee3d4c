import type { Policy } from '../schemas/policy';
import type { ApparatusKind } from '../schemas/vocabulary';
import { freezeSnapshot, isSealed } from './memo';
import { formatStudioDateTime, formatZonedPattern, gearName, serviceLifeEnd, splitPath } from './status';
import type { GearSnapshot, LinkSnapshot, OpenFault, PointSnapshot, Reason } from './types';
import { reasonCodes } from './types';

/*
 * PRODUCT.md §4.7 apparatus changeovers. A point has at most one mounted apparatus; a class hangs
 * the one of its own kind. For a class, a point hangs: the mounted apparatus when its kind is the
 * class's kind (whichever item that is now, so mounting a weaker fabric is felt at once, §4.6);
 * otherwise the item recorded for the class at booking, which someone has to mount first (a
 * changeover); otherwise nothing of the class's kind at all.
 */

/** An apparatus item recorded for a class on a point, with the open faults on it. */
export interface RecordedApparatus {
  gear: GearSnapshot;
  openFaults: OpenFault[];
}

export interface HangingPoint {
  /** The point as it hangs for the class: its fixed links and the class's apparatus, if any. */
  snapshot: PointSnapshot;
  /** The apparatus that hangs for the class; null when no item of its kind is known. */
  apparatus: GearSnapshot | null;
  /** What is mounted on the point now. */
  mounted: GearSnapshot | null;
  /** True when `apparatus` is not the mounted item: someone mounts it before the class. */
  changeover: boolean;
}

const NONE = {};
const hangCache = new WeakMap<PointSnapshot, Map<string, WeakMap<object, HangingPoint>>>();

/** The point as it hangs for a class of `kind`, given the item recorded for the class (if any). */
export function hangFor(point: PointSnapshot, kind: ApparatusKind, recorded: RecordedApparatus | null): HangingPoint {
  if (!isSealed(point)) return hangUncached(point, kind, recorded);
  let byKind = hangCache.get(point);
  if (!byKind) hangCache.set(point, (byKind = new Map()));
  let byRecord = byKind.get(kind);
  if (!byRecord) byKind.set(kind, (byRecord = new WeakMap()));
  const key = recorded ?? NONE;
  let found = byRecord.get(key);
  if (!found) byRecord.set(key, (found = hangUncached(point, kind, recorded)));
  return found;
}

function hangUncached(point: PointSnapshot, kind: ApparatusKind, recorded: RecordedApparatus | null): HangingPoint {
  const { fixed, apparatus: mountedLink } = splitPath(point.links);
  const mounted = mountedLink?.gear ?? null;
  if (mounted && mounted.kind === kind) return { snapshot: point, apparatus: mounted, mounted, changeover: false };
  // The mounted item (of another kind) comes down for this class: its faults no longer concern it.
  const faults = point.openFaults.filter((f) => mounted === null || f.gearId !== mounted.id);
  const links: LinkSnapshot[] = [...fixed];
  if (recorded) {
    links.push({ gear: recorded.gear, mode: 'major', threeWay: false, basketOverHalf: false, leg: null, includedAngleDeg: null });
    for (const f of recorded.openFaults) if (!faults.some((g) => g.id === f.id)) faults.push(f);
  }
  const derived: PointSnapshot = { ...point, links, openFaults: faults };
  return {
    snapshot: isSealed(point) ? freezeSnapshot(derived) : derived,
    apparatus: recorded?.gear ?? null,
    mounted,
    changeover: recorded !== null,
  };
}

/** `no_apparatus_available` for a point that hangs nothing of the class's kind. */
export function noApparatusReason(point: Pick<PointSnapshot, 'label'>, kind: ApparatusKind, detail?: string): Reason {
  return {
    code: reasonCodes.noApparatusAvailable,
    message: `No fit ${kind} is free to hang on point ${point.label} for this class${detail ? `: ${detail}` : ''}`,
  };
}

/**
 * Why a gear item is not a fit apparatus for use from `from` until `until` (both instants; pass
 * the same instant for "now"): not in service, never inspected or its inspection running out
 * before `until`, past its service life by then, or an open fault on it. Empty when fit.
 */
export function apparatusUnfitReasons(gear: GearSnapshot, openFaults: OpenFault[], policy: Policy, from: Date, until: Date): Reason[] {
  const zone = policy.timeZone;
  const name = gearName(gear);
  const reasons: Reason[] = [];
  if (gear.status !== 'in_service') reasons.push({ code: reasonCodes.gearUnfit, message: `The ${name} is ${gear.status}` });
  if (!gear.inspectedUntil) reasons.push({ code: reasonCodes.gearUnfit, message: `The ${name} has never passed an inspection` });
  else if (gear.inspectedUntil.getTime() <= until.getTime()) {
    reasons.push({
      code: reasonCodes.gearUnfit,
      message:
        gear.inspectedUntil.getTime() <= from.getTime()
          ? `The ${name} is past its own inspection, which ran out on ${formatStudioDateTime(gear.inspectedUntil, zone)}`
          : `The ${name} is inspected only until ${formatStudioDateTime(gear.inspectedUntil, zone)}`,
    });
  }
  const lifeEnd = serviceLifeEnd(gear, zone);
  if (lifeEnd && lifeEnd.getTime() <= until.getTime()) reasons.push({ code: reasonCodes.gearUnfit, message: `The ${name} reaches the end of its service life on ${formatStudioDateTime(lifeEnd, zone)}` });
  for (const f of openFaults) if (f.gearId === gear.id) reasons.push({ code: reasonCodes.faultOpen, message: `Open fault on the ${name}: ${f.description}` });
  return reasons;
}

/** Strongest first (major-axis rating), then by serial, so the server's choice is predictable. */
export function byStrength(a: Pick<GearSnapshot, 'majorKn' | 'serial'>, b: Pick<GearSnapshot, 'majorKn' | 'serial'>): number {
  return b.majorKn - a.majorKn || a.serial.localeCompare(b.serial, undefined, { numeric: true });
}

export interface Changeover {
  pointId: number;
  pointLabel: string;
  gearId: number;
  kind: string;
  serial: string;
  /** What hangs there now, to come down first; null when nothing is mounted. */
  mountedGearId: number | null;
  mountedSerial: string | null;
  message: string;
}

/**
 * "Mount hoop HP-0102 on LS-3 before 18:30"; with `withDay`, "… before 18:30 on Thu 3 Dec" for a
 * list that spans days.
 */
export function changeoverOf(point: Pick<PointSnapshot, 'id' | 'label'>, hanging: HangingPoint, startsAt: Date, timeZone: string, withDay: boolean): Changeover | null {
  if (!hanging.changeover || !hanging.apparatus) return null;
  const when = withDay ? `${formatZonedPattern(startsAt, timeZone, 'HH:mm')} on ${formatZonedPattern(startsAt, timeZone, 'EEE d MMM')}` : formatZonedPattern(startsAt, timeZone, 'HH:mm');
  return {
    pointId: point.id,
    pointLabel: point.label,
    gearId: hanging.apparatus.id,
    kind: hanging.apparatus.kind,
    serial: hanging.apparatus.serial,
    mountedGearId: hanging.mounted?.id ?? null,
    mountedSerial: hanging.mounted?.serial ?? null,
    message: `Mount ${gearName(hanging.apparatus)} on ${point.label} before ${when}`,
  };
}
