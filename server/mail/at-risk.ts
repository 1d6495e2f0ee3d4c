import { riskOf } from '../modules/sessions/session-rig';
import type { MailCycleContext } from './context';
import type { MailSession } from './mail-data.repository';
import { atRiskMessage } from './templates/at-risk';
import { writeTransaction } from '../db/knex';
import { placesRepository } from '../modules/places/places.repository';
import { unfitReasons } from '../modules/places/session-places';
import { shortDay, clockTime } from './templates/layout';
import { setImmediate as nextTurn } from 'node:timers/promises';

/** Sessions checked between two turns of the event loop: the worker shares the loop with requests. */
const SESSIONS_PER_PIECE = 50;

export const atRiskKeyPrefix = (sessionId: number, startsAt: string) => `at_risk:${sessionId}:${startsAt}:`;

type Trouble = Array<{ pointId: number; label: string; reasons: string[]; codes: string[] }>;

/**
 * What puts a session at risk, as one value for every class it touches: the points in trouble. A
 * fault on a point of a weekly class is the same cause on each date (whatever else a later date
 * adds about the same point, such as its clearance running out first).
 */
function causeOf(trouble: Trouble): string {
  return [...new Set(trouble.map((p) => p.pointId))].sort((a, b) => a - b).join('+');
}

/** The points an alert's key names (`…:{n}:cause:{id}+{id}`); null for a key written before grouping. */
export function causeInKey(uniqueKey: string): number[] | null {
  const at = uniqueKey.lastIndexOf(':cause:');
  if (at < 0) return null;
  const ids = uniqueKey.slice(at + ':cause:'.length).split('+').map(Number).filter((n) => Number.isInteger(n) && n > 0);
  return ids.length ? ids : null;
}

/**
 * PRODUCT.md §4.4 and §5: a booked, future, not cancelled session that turns at risk alerts
 * reception and riggers once. `sessions.at_risk` holds the last state seen, so only the change from
 * false to true alerts; back to false clears it, and a later relapse alerts again (its key counts
 * the earlier alerts for the same session and start).
 *
 * Sessions that turn at risk in the same cycle for the same cause (one fault under every date of
 * a weekly class, or under several classes) share one alert listing them all: one message per
 * recipient per cause, not one per date. The alert is keyed by its earliest class.
 */
export async function detectAtRisk(ctx: MailCycleContext): Promise<{ alerts: number; cleared: number }> {
  const sessions = await ctx.data.sessionsToWatch(ctx.now);
  if (!sessions.length) return { alerts: 0, cleared: 0 };
  const pointIds = await ctx.data.pointIdsOf(sessions.map((s) => s.id));
  await ctx.preloadHanging(sessions.map((s) => s.id));
  let alerts = 0;
  let cleared = 0;

  const turned = new Map<string, Array<{ s: MailSession; trouble: Trouble }>>();
  for (const [i, s] of sessions.entries()) {
    if (i % SESSIONS_PER_PIECE === SESSIONS_PER_PIECE - 1) await nextTurn();
    const trouble = await troubleOf(ctx, s, pointIds.get(s.id) ?? []);
    if (!trouble) {
      if (s.atRisk && (await ctx.data.setAtRiskIf(s.id, true, false))) cleared += 1;
      continue;
    }
    if (s.atRisk) continue;
    const cause = causeOf(trouble);
    turned.set(cause, [...(turned.get(cause) ?? []), { s, trouble }]);
  }

  // Every alert of the cycle in one write transaction: one commit (one fsync, on the event loop
  // with SQLite) however many causes turned, rather than one per cause.
  if (!turned.size) return { alerts, cleared };
  // Read before the write transaction (which holds the one writer's connection).
  const studentsOf = new Map<string, Awaited<ReturnType<typeof studentsWithoutFitPlace>>>();
  for (const [cause, group] of turned) studentsOf.set(cause, await studentsWithoutFitPlace(ctx, group.map((g) => g.s)));
  await writeTransaction(ctx.db, async (trx) => {
    for (const [cause, group] of turned) {
      const students = studentsOf.get(cause)!;
      // A flag flips only if nobody flipped it since we read it, so two workers cannot both alert.
      const flipped: typeof group = [];
      for (const g of group) if (await ctx.data.setAtRiskIf(g.s.id, false, true, trx)) flipped.push(g);
      if (!flipped.length) continue;
      const [first] = flipped; // sessionsToWatch lists by start
      const mail = alertMessage(ctx, flipped.map((g) => g.s), first.trouble, students.filter((st) => flipped.some((g) => g.s.id === st.sessionId)));
      const prefix = atRiskKeyPrefix(first.s.id, first.s.startsAt);
      const n = (await ctx.outbox.countWithPrefix(prefix, trx)) + 1;
      const to = (await ctx.data.activeStaff(['reception', 'rigger'], trx)).map((u) => u.email);
      const added = await ctx.outbox.insert(
        trx,
        {
          kind: 'at_risk',
          uniqueKey: `${prefix}${n}:cause:${cause}`,
          to,
          ...mail,
          sessionId: first.s.id,
          sessionStartsAt: first.s.startsAt,
          // Recorded even with nobody to tell, so the count of alerts stays right.
          ...(to.length ? {} : { state: 'skipped' as const, note: 'Nobody to tell: there is no active reception or rigger account.' }),
        },
        ctx.now,
      );
      if (added && to.length) alerts += 1;
    }
  });
  return { alerts, cleared };
}

/** The points in trouble for a session at `ctx.now`, each with its reasons; null when it is not at risk. */
async function troubleOf(ctx: MailCycleContext, s: MailSession, pointIds: number[]): Promise<Trouble | null> {
  // Each point as it hangs for the class now: §4.6 re-checks the class on it (load, kind, performers).
  const hung = await ctx.hanging(s, pointIds);
  const risk = riskOf({ ...s, pointIds, recordedApparatus: [] }, hung, ctx.policy, ctx.now, { startsAt: new Date(s.startsAt), endsAt: new Date(s.endsAt), cancelled: s.cancelled });
  if (!risk.atRisk) return null;
  return hung
    .map(({ bundle }) => {
      const mine = risk.reasons.filter((r) => r.pointId === bundle.point.id);
      return { pointId: bundle.point.id, label: bundle.point.label, reasons: mine.map((r) => r.message), codes: mine.map((r) => r.code) };
    })
    .filter((p) => p.reasons.length > 0);
}

/**
 * The booked students of these classes whose point cannot take the class now (or who have no
 * point): PRODUCT.md §11, nobody is dropped silently, so the alert names them.
 */
async function studentsWithoutFitPlace(ctx: MailCycleContext, sessions: MailSession[]): Promise<Array<{ sessionId: number; name: string; pointLabel: string | null; when: string }>> {
  if (!sessions.length) return [];
  const places = await placesRepository(ctx.db).liveForSessions(sessions.map((s) => s.id));
  const pointIds = await ctx.data.pointIdsOf(sessions.map((s) => s.id));
  const out: Array<{ sessionId: number; name: string; pointLabel: string | null; when: string }> = [];
  for (const s of sessions) {
    const booked = (places.get(s.id) ?? []).filter((p) => p.status === 'booked');
    if (!booked.length) continue;
    const ids = pointIds.get(s.id) ?? [];
    const unfit = unfitReasons({ ...s, pointIds: ids, recordedApparatus: [] }, await ctx.hanging(s, ids), ctx.policy, ctx.now, new Date(s.endsAt));
    const when = `${s.className}, ${shortDay(s.startsAt, ctx.policy.timeZone)} ${clockTime(s.startsAt, ctx.policy.timeZone)}`;
    for (const p of booked) if (p.pointId === null || (unfit.get(p.pointId) ?? []).length > 0) out.push({ sessionId: s.id, name: p.studentName, pointLabel: p.pointLabel, when });
  }
  return out;
}

function alertMessage(ctx: MailCycleContext, sessions: MailSession[], trouble: Trouble, students: Array<{ name: string; pointLabel: string | null; when: string }> = []) {
  return atRiskMessage({
    studioName: ctx.studioName,
    timeZone: ctx.policy.timeZone,
    appUrl: ctx.appUrl,
    classes: sessions.map((s) => ({ className: s.className, roomName: s.roomName, instructorName: s.instructor.name, startsAt: new Date(s.startsAt), endsAt: new Date(s.endsAt) })),
    points: trouble.map(({ label, reasons }) => ({ label, reasons })),
    students,
  });
}

/**
 * The alert for a session as it stands at `ctx.now`, or null when it is not at risk. Written when
 * the alert is raised, and again when it is sent.
 */
export async function atRiskFor(ctx: MailCycleContext, s: MailSession, pointIds: number[]) {
  const trouble = await troubleOf(ctx, s, pointIds);
  return trouble && alertMessage(ctx, [s], trouble, await studentsWithoutFitPlace(ctx, [s]));
}

/**
 * A grouped alert as it stands at `ctx.now`: every future class flagged at risk with one of these
 * points still in trouble (a class cancelled, moved off them or fixed meanwhile drops out), and
 * every point in trouble for those classes now; null when no class is left.
 */
export async function atRiskGroupFor(ctx: MailCycleContext, causePoints: number[]) {
  const watched = (await ctx.data.sessionsToWatch(ctx.now)).filter((s) => s.atRisk && !s.cancelled && new Date(s.startsAt) > ctx.now);
  const pointIds = await ctx.data.pointIdsOf(watched.map((s) => s.id));
  await ctx.preloadHanging(watched.map((s) => s.id));
  const group: MailSession[] = [];
  const points = new Map<number, Trouble[number]>();
  for (const [i, s] of watched.entries()) {
    if (i % SESSIONS_PER_PIECE === SESSIONS_PER_PIECE - 1) await nextTurn();
    const trouble = await troubleOf(ctx, s, pointIds.get(s.id) ?? []);
    if (!trouble?.some((p) => causePoints.includes(p.pointId))) continue;
    group.push(s);
    for (const p of trouble) if (!points.has(p.pointId)) points.set(p.pointId, p);
  }
  return group.length ? alertMessage(ctx, group, [...points.values()], await studentsWithoutFitPlace(ctx, group)) : null;
}
