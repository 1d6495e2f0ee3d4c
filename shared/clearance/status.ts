import { TZDate } from '@date-fns/tz';
import { isSealed, memoize, snapshotMemo } from './memo';
import { addDays, format } from 'date-fns';
import { checkRules, gearKindLabels } from '../rigging';
import type { Policy } from '../schemas/policy';
import { intervalClassOfKind, isApparatusKind } from '../schemas/vocabulary';
import type { GearSnapshot, LinkSnapshot, PointSnapshot, PointStatus, PointStatusOver, Reason } from './types';
import { reasonCodes } from './types';

// The rigging rules depend only on the path (and the unit its messages quote); kept for sealed
// paths (see memo.ts).
const rulesCache = new WeakMap<LinkSnapshot[], Map<string, ReturnType<typeof checkRules>>>();
function rulesOf(links: LinkSnapshot[], unit: Policy['units']) {
  if (!isSealed(links)) return checkRules(links, { displayUnit: unit });
  let byUnit = rulesCache.get(links);
  if (!byUnit) rulesCache.set(links, (byUnit = new Map()));
  let found = byUnit.get(unit);
  if (!found) byUnit.set(unit, (found = checkRules(links, { displayUnit: unit })));
  return found;
}

// Studio-zone dates. Intervals are counted in the studio's calendar days, so a point cleared at
// 10:00 stays cleared until 10:00 local time, whichever side of a clock change that falls.

/** `instant` plus `days` calendar days in `timeZone`, keeping the local wall-clock time. */
export function addStudioDays(instant: Date, days: number, timeZone: string): Date {
  return new Date(addStudioDaysMs(instant.getTime(), days, timeZone));
}
const addStudioDaysMs = memoize((ms: number, days: number, timeZone: string) => addDays(new TZDate(ms, timeZone), days).getTime());

/** A date and time as the studio reads it, e.g. "3 Nov 2025, 10:00". */
export function formatStudioDateTime(instant: Date, timeZone: string): string {
  return formatZoned(instant.getTime(), timeZone, 'd MMM yyyy, HH:mm');
}
const formatZoned = memoize((ms: number, timeZone: string, pattern: string) => format(new TZDate(ms, timeZone), pattern));

/** An instant in the studio's zone with a date-fns pattern, e.g. 'HH:mm' → "18:30". */
export function formatZonedPattern(instant: Date, timeZone: string, pattern: string): string {
  return formatZoned(instant.getTime(), timeZone, pattern);
}

/** A calendar day as the studio reads it, e.g. "3 Nov 2025". */
export function formatStudioDay(instant: Date, timeZone: string): string {
  return formatZoned(instant.getTime(), timeZone, 'd MMM yyyy');
}

interface CalendarDay {
  year: number;
  /** 0-11, as Date counts months. */
  month: number;
  date: number;
}

const zonedMidnight = memoize((year: number, month: number, date: number, timeZone: string) => new TZDate(year, month, date, timeZone).getTime());

/** A 'YYYY-MM-DD' text as a calendar day; null when it is not a real day (31 Feb, say). */
function parseCalendarDay(day: string): CalendarDay | null {
  const match = /^(\d{4})-(\d{2})-(\d{2})$/.exec(day);
  if (!match) return null;
  const [year, month, date] = [Number(match[1]), Number(match[2]) - 1, Number(match[3])];
  const check = new Date(Date.UTC(year, month, date));
  if (check.getUTCFullYear() !== year || check.getUTCMonth() !== month || check.getUTCDate() !== date) return null;
  return { year, month, date };
}

// ---------------------------------------------------------------------------------------------
// Naming things in messages.

/** "swivel SW-0031": the kind in words and the serial, as it is marked on the item. */
export function gearName(gear: Pick<GearSnapshot, 'kind' | 'serial'>): string {
  const kind = (gearKindLabels[gear.kind] ?? gear.kind.replace(/_/g, ' ')).toLowerCase();
  return gear.serial.trim() ? `${kind} ${gear.serial.trim()}` : kind;
}

function capitalise(text: string): string {
  return text.charAt(0).toUpperCase() + text.slice(1);
}

// ---------------------------------------------------------------------------------------------
// The load path split into what the point's clearance covers and what carries its own inspection.

export interface SplitPath {
  fixed: LinkSnapshot[];
  apparatus: LinkSnapshot | null;
}

/** The mounted apparatus is the last link when its kind is an apparatus kind; the rest is fixed. */
export function splitPath(links: LinkSnapshot[]): SplitPath {
  const last = links[links.length - 1];
  if (last && isApparatusKind(last.gear.kind)) {
    return { fixed: links.slice(0, -1), apparatus: last };
  }
  return { fixed: links.slice(), apparatus: null };
}

// A frozen gear item cannot change under the cache; its service-life end is asked for at every
// status check of every point it hangs in.
const lifeEnds = new WeakMap<object, Map<string, Date | null>>();

/** When a gear item reaches the end of its service life; null when no limit is known. */
export function serviceLifeEnd(
  gear: Pick<GearSnapshot, 'manufacturedOn' | 'inServiceOn' | 'serviceLifeYears'>,
  timeZone = 'UTC',
): Date | null {
  if (!Object.isFrozen(gear)) return serviceLifeEndUncached(gear, timeZone);
  let byZone = lifeEnds.get(gear);
  if (!byZone) lifeEnds.set(gear, (byZone = new Map()));
  let found = byZone.get(timeZone);
  if (found === undefined) byZone.set(timeZone, (found = serviceLifeEndUncached(gear, timeZone)));
  // A fresh Date each time: callers own what they are given.
  return found && new Date(found.getTime());
}

function serviceLifeEndUncached(
  gear: Pick<GearSnapshot, 'manufacturedOn' | 'inServiceOn' | 'serviceLifeYears'>,
  timeZone: string,
): Date | null {
  const from = gear.manufacturedOn ?? gear.inServiceOn;
  if (from == null || gear.serviceLifeYears == null || !Number.isFinite(gear.serviceLifeYears)) return null;
  const start = parseCalendarDay(from);
  if (!start) return null;
  // Calendar arithmetic first, then one zone conversion: whole months, so that 2.5 years is
  // 30 months, and a day the end month lacks (29 Feb) clamps to its last day.
  const months = start.year * 12 + start.month + Math.round(gear.serviceLifeYears * 12);
  const year = Math.floor(months / 12);
  const month = months - year * 12;
  const lastDate = new Date(Date.UTC(year, month + 1, 0)).getUTCDate();
  return new Date(zonedMidnight(year, month, Math.min(start.date, lastDate), timeZone));
}

/**
 * What the policy gives a clearance signed at `at` on this path: the shortest inspection interval
 * among the structure and the fixed links' kinds, in studio days. Worked out when the rigger signs
 * and kept with the clearance (PRODUCT.md §4.9).
 */
export function policyClearanceEnd(at: Date, links: LinkSnapshot[], policy: Policy): Date {
  const { fixed } = splitPath(links);
  let days = policy.intervalDays.structure;
  for (const link of fixed) {
    days = Math.min(days, policy.intervalDays[intervalClassOfKind[link.gear.kind]]);
  }
  return addStudioDays(at, days, policy.timeZone);
}

/**
 * The point's own clearance end, before the apparatus cap; null while voided or never cleared.
 * PRODUCT.md §4.9: the end kept when the clearance was signed, or what the current policy gives if
 * that is sooner: a shorter interval applies at once, a longer one only to later clearances.
 */
export function pointClearanceEnd(snapshot: PointSnapshot, policy: Policy): Date | null {
  const clearance = snapshot.lastClearance;
  if (!clearance || clearance.voidedAt) return null;
  const byPolicy = policyClearanceEnd(clearance.at, snapshot.links, policy);
  const signed = clearance.until ?? null;
  return signed && signed.getTime() < byPolicy.getTime() ? new Date(signed.getTime()) : byPolicy;
}

const timesMemo = snapshotMemo<{ own: Date | null; until: Date | null }>();

/** The point's own clearance end and the capped `clearedUntil`, computed once per sealed snapshot. */
function clearanceTimes(snapshot: PointSnapshot, policy: Policy): { own: Date | null; until: Date | null } {
  return timesMemo(snapshot, policy, () => clearanceTimesUncached(snapshot, policy));
}

function clearanceTimesUncached(snapshot: PointSnapshot, policy: Policy): { own: Date | null; until: Date | null } {
  const own = pointClearanceEnd(snapshot, policy);
  if (!own) return { own, until: null };
  const { apparatus } = splitPath(snapshot.links);
  if (!apparatus) return { own, until: own };
  const inspected = apparatus.gear.inspectedUntil;
  // A mounted apparatus that never passed an inspection leaves nothing to be cleared until.
  if (!inspected) return { own, until: null };
  return { own, until: inspected.getTime() < own.getTime() ? new Date(inspected.getTime()) : own };
}

const instantsMemo = snapshotMemo<{ until: Date | null; instants: number[] }>();

/**
 * The instants at which the status rules' answer for this point can change with the records as
 * they are: its clearance end (own and capped), the apparatus's inspection end, each item's
 * service-life end. Also `until`, for the warning-window question (see validity.ts).
 */
export function statusInstants(snapshot: PointSnapshot, policy: Policy): { until: Date | null; instants: number[] } {
  return instantsMemo(snapshot, policy, () => {
    const { own, until } = clearanceTimes(snapshot, policy);
    const instants: number[] = [];
    if (until) instants.push(until.getTime());
    if (own) instants.push(own.getTime());
    const inspected = splitPath(snapshot.links).apparatus?.gear.inspectedUntil;
    if (inspected) instants.push(inspected.getTime());
    for (const link of snapshot.links) {
      const end = serviceLifeEnd(link.gear, policy.timeZone);
      if (end) instants.push(end.getTime());
    }
    return { until, instants };
  });
}

/** PRODUCT.md §4.1 `clearedUntil`: the point's clearance, never later than the apparatus's own inspection. */
export function clearedUntil(snapshot: PointSnapshot, policy: Policy): Date | null {
  return clearanceTimes(snapshot, policy).until;
}

// ---------------------------------------------------------------------------------------------
// Reasons at an instant, each tagged with what causes it, so that booking and the at-risk check
// can tell an inspection running out (planned work) from something wrong with the rig.

export type ReasonCause =
  /** Holds whatever the time: a fault, a voided clearance, a retirement, a rule, ... */
  | 'standing'
  /** The point has never been cleared. */
  | 'never_cleared'
  /** The point's clearance interval has run out. */
  | 'clearance_ran_out'
  /** The mounted apparatus's own inspection has run out. */
  | 'apparatus_inspection_ran_out'
  /** A gear item has reached the end of its service life. */
  | 'service_life';

export interface TaggedReason extends Reason {
  cause: ReasonCause;
}

function plain(reason: TaggedReason): Reason {
  return { code: reason.code, message: reason.message };
}

/** Every §4.1 reason that holds at `t`, tagged with its cause. */
export function blockingReasonsAt(snapshot: PointSnapshot, policy: Policy, t: Date): TaggedReason[] {
  return evaluateAt(snapshot, policy, t, clearanceTimes(snapshot, policy));
}

// The reasons at an instant depend on the instant only through which of the point's status
// instants (clearance ends, the apparatus's inspection end, service-life ends: `statusInstants`)
// it has reached, so they are kept per stretch between two of them: a calendar that asks about
// the same point at every class's start works each stretch out once.
const reasonsMemo = snapshotMemo<{ edges: number[]; byStretch: Map<number, TaggedReason[]> }>();

/** How many of the sorted `edges` are at or before `at`: which stretch `at` falls in. */
function stretchOf(edges: number[], at: number): number {
  let lo = 0;
  let hi = edges.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (edges[mid] <= at) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

function evaluateAt(snapshot: PointSnapshot, policy: Policy, t: Date, times: { own: Date | null; until: Date | null }): TaggedReason[] {
  if (!isSealed(snapshot)) return evaluateAtUncached(snapshot, policy, t, times);
  const memo = reasonsMemo(snapshot, policy, () => ({ edges: [...new Set(statusInstants(snapshot, policy).instants)].sort((a, b) => a - b), byStretch: new Map() }));
  const stretch = stretchOf(memo.edges, t.getTime());
  let found = memo.byStretch.get(stretch);
  if (!found) memo.byStretch.set(stretch, (found = evaluateAtUncached(snapshot, policy, t, times)));
  return found;
}

function evaluateAtUncached(
  snapshot: PointSnapshot,
  policy: Policy,
  t: Date,
  { own, until }: { own: Date | null; until: Date | null },
): TaggedReason[] {
  const zone = policy.timeZone;
  const reasons: TaggedReason[] = [];
  const { fixed, apparatus } = splitPath(snapshot.links);
  const at = t.getTime();

  if (!snapshot.inService) {
    reasons.push({
      code: reasonCodes.outOfService,
      message: `Point ${snapshot.label} is marked out of service`,
      cause: 'standing',
    });
  }

  if (fixed.length === 0) {
    reasons.push({
      code: reasonCodes.noLoadPath,
      message: `Point ${snapshot.label} has no fixed rigging in its load path`,
      cause: 'standing',
    });
  }

  for (const fault of snapshot.openFaults) {
    const onGear = fault.gearId == null ? undefined : snapshot.links.find((l) => l.gear.id === fault.gearId);
    const subject = onGear
      ? gearName(onGear.gear)
      : fault.gearId != null
        ? `gear item #${fault.gearId}`
        : `point ${snapshot.label}`;
    reasons.push({
      code: reasonCodes.faultOpen,
      message: `Open fault on ${subject}: ${fault.description}`,
      cause: 'standing',
    });
  }

  const clearance = snapshot.lastClearance;
  if (!clearance) {
    reasons.push({
      code: reasonCodes.inspectionLapsed,
      message: `Point ${snapshot.label} has never been cleared by a rigger`,
      cause: 'never_cleared',
    });
  } else if (clearance.voidedAt) {
    // A voided clearance is not "lapsed": the rig changed, and a rigger has to look at it again.
    reasons.push({
      code: reasonCodes.awaitingClearance,
      message: `Point ${snapshot.label} awaits a rigger's clearance: its clearance was voided on ${formatStudioDateTime(clearance.voidedAt, zone)}`,
      cause: 'standing',
    });
  } else {
    if (own && until && at >= until.getTime()) {
      const byApparatus = apparatus !== null && until.getTime() < own.getTime();
      reasons.push({
        code: reasonCodes.inspectionLapsed,
        message: byApparatus
          ? `Clearance of point ${snapshot.label} ran out on ${formatStudioDateTime(until, zone)} with the inspection of ${gearName(apparatus.gear)}`
          : `Clearance of point ${snapshot.label} lapsed on ${formatStudioDateTime(until, zone)}`,
        cause: byApparatus ? 'apparatus_inspection_ran_out' : 'clearance_ran_out',
      });
    }
  }

  for (const link of snapshot.links) {
    const gear = link.gear;
    const name = capitalise(gearName(gear));
    if (gear.status === 'quarantined') {
      reasons.push({ code: reasonCodes.gearUnfit, message: `${name} is quarantined`, cause: 'standing' });
    } else if (gear.status === 'retired') {
      reasons.push({ code: reasonCodes.gearUnfit, message: `${name} is retired`, cause: 'standing' });
    }
    const lifeEnd = serviceLifeEnd(gear, zone);
    if (lifeEnd && at >= lifeEnd.getTime()) {
      reasons.push({
        code: reasonCodes.gearUnfit,
        message: `${name} is past its service life (it ended on ${formatStudioDay(lifeEnd, zone)})`,
        cause: 'service_life',
      });
    }
  }

  if (apparatus) {
    const gear = apparatus.gear;
    const name = capitalise(gearName(gear));
    if (!gear.inspectedUntil) {
      // Not an inspection running out: the item was never passed as fit, so it counts as standing.
      reasons.push({ code: reasonCodes.gearUnfit, message: `${name} has never passed an inspection`, cause: 'standing' });
    } else if (at >= gear.inspectedUntil.getTime()) {
      reasons.push({
        code: reasonCodes.gearUnfit,
        message: `${name} is past its own inspection, which ran out on ${formatStudioDateTime(gear.inspectedUntil, zone)}`,
        cause: 'apparatus_inspection_ran_out',
      });
    }
  }

  if (snapshot.links.length > 0) {
    for (const violation of rulesOf(snapshot.links, policy.units).violations) {
      reasons.push({ code: reasonCodes.ruleViolation, message: violation.message, cause: 'standing' });
    }
  }

  return reasons;
}

/** PRODUCT.md §4.1: the point's status at the instant `t`. */
export function pointStatusAt(snapshot: PointSnapshot, policy: Policy, t: Date): PointStatus {
  const times = clearanceTimes(snapshot, policy);
  const until = times.until;
  const reasons = evaluateAt(snapshot, policy, t, times).map(plain);
  if (reasons.length > 0 || !until) {
    // `until` is null only with a reason above; the guard keeps "never cleared" from ever reading as cleared.
    return { status: 'blocked', clearedUntil: until, reasons };
  }
  const windowEnd = addStudioDays(t, policy.warningDays, policy.timeZone);
  return {
    status: until.getTime() <= windowEnd.getTime() ? 'expiring' : 'cleared',
    clearedUntil: until,
    reasons: [],
  };
}

/** Reasons arising in (start, end) from what is known now: gear reaching its service life. */
function arisingReasons(snapshot: PointSnapshot, policy: Policy, start: Date, end: Date): Reason[] {
  const reasons: Reason[] = [];
  for (const link of snapshot.links) {
    const lifeEnd = serviceLifeEnd(link.gear, policy.timeZone);
    if (lifeEnd && lifeEnd.getTime() > start.getTime() && lifeEnd.getTime() < end.getTime()) {
      reasons.push({
        code: reasonCodes.gearUnfit,
        message: `${capitalise(gearName(link.gear))} reaches the end of its service life on ${formatStudioDay(lifeEnd, policy.timeZone)}`,
      });
    }
  }
  return reasons;
}

/** Inspections that run out before `end`: the point's clearance and the apparatus's own inspection. */
function dueReasons(snapshot: PointSnapshot, policy: Policy, end: Date, own: Date | null): Reason[] {
  const zone = policy.timeZone;
  const due: Reason[] = [];
  if (own && own.getTime() < end.getTime()) {
    due.push({
      code: reasonCodes.inspectionDue,
      message: `Point ${snapshot.label}: needs inspection, cleared only until ${formatStudioDateTime(own, zone)}`,
    });
  }
  const { apparatus } = splitPath(snapshot.links);
  const inspected = apparatus?.gear.inspectedUntil;
  if (apparatus && inspected && inspected.getTime() < end.getTime()) {
    due.push({
      code: reasonCodes.inspectionDue,
      message: `${capitalise(gearName(apparatus.gear))}: needs inspection, inspected only until ${formatStudioDateTime(inspected, zone)}`,
    });
  }
  return due;
}

/**
 * The worst the point gets over [start, end), from what is known now. Reasons that hold at the start
 * or arise before the end go to `blockedReasons`, except an inspection running out, which goes to
 * `dueBeforeEnd`: booking lets a point be booked past its clearance with a warning, since the rigger
 * can renew it in time.
 */
export function pointStatusOver(snapshot: PointSnapshot, policy: Policy, start: Date, end: Date): PointStatusOver {
  if (!isSealed(snapshot)) return pointStatusOverUncached(snapshot, policy, start, end);
  // `start` matters only through its stretch (see evaluateAt; "arising" compares the same instants
  // strictly). `end` matters only through which status instants lie strictly before it (a
  // clearance or an inspection running out before the end, gear reaching its service life before
  // it) and, when nothing blocks, through the warning window from the end, which is asked afresh
  // at every call: every class of a calendar has its own end, and this is asked of each of its
  // points two or three times.
  const memo = overMemo(snapshot, policy, () => new Map());
  const reasons = reasonsMemo(snapshot, policy, () => ({ edges: [...new Set(statusInstants(snapshot, policy).instants)].sort((a, b) => a - b), byStretch: new Map() }));
  const key = `${stretchOf(reasons.edges, start.getTime())}|${edgesBefore(reasons.edges, end.getTime())}`;
  let found = memo.get(key);
  if (!found) {
    if (memo.size >= INSTANTS_PER_SNAPSHOT) memo.clear();
    memo.set(key, (found = pointStatusOverUncached(snapshot, policy, start, end)));
  }
  if (found.status === 'blocked') return found;
  // Nothing blocks, so `until` is set: expiring or cleared by the window from this end.
  const status = expiringBy(found.clearedUntil!, end, policy);
  if (status === found.status) return found;
  const otherKey = `${key}|${status}`;
  let other = memo.get(otherKey);
  if (!other) memo.set(otherKey, (other = { ...found, status }));
  return other;
}

/** How many of the sorted `edges` are strictly before `at`. */
function edgesBefore(edges: number[], at: number): number {
  let lo = 0;
  let hi = edges.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (edges[mid] < at) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** At an instant s the point is expiring once until ≤ s + window; the latest s in [start, end) decides. */
function expiringBy(until: Date, end: Date, policy: Policy): 'expiring' | 'cleared' {
  const windowEnd = addStudioDays(end, policy.warningDays, policy.timeZone);
  return until.getTime() < windowEnd.getTime() ? 'expiring' : 'cleared';
}

const overMemo = snapshotMemo<Map<string, PointStatusOver>>();
const INSTANTS_PER_SNAPSHOT = 512;

function pointStatusOverUncached(snapshot: PointSnapshot, policy: Policy, start: Date, end: Date): PointStatusOver {
  const times = clearanceTimes(snapshot, policy);
  const atStart = evaluateAt(snapshot, policy, start, times);
  const blockedReasons = atStart
    .filter((r) => r.cause !== 'clearance_ran_out' && r.cause !== 'apparatus_inspection_ran_out')
    .map(plain);
  blockedReasons.push(...arisingReasons(snapshot, policy, start, end));
  const dueBeforeEnd = dueReasons(snapshot, policy, end, times.own);
  const until = times.until;

  let status: PointStatusOver['status'];
  if (blockedReasons.length > 0 || dueBeforeEnd.length > 0 || !until) {
    status = 'blocked';
  } else {
    status = expiringBy(until, end, policy);
  }
  return { status, clearedUntil: until, blockedReasons, dueBeforeEnd };
}
