import type { Db } from '../server/db/knex';
import { loadSnapshots, type SnapshotBundle } from '../server/modules/rig/point-snapshots';
import { rigRepository } from '../server/modules/rig/rig.repository';
import { studioRepository } from '../server/modules/studio/studio.repository';
import { clearedUntil, hangFor, pointStatusAt } from '../shared/clearance';
import { riskOf, type BookedClass } from '../server/modules/sessions/session-rig';
import type { ApparatusKind } from '../shared/schemas/vocabulary';
import type { Policy } from '../shared/schemas/policy';
import { localTime, userIdByEmail, weekdayCode } from './demo-data';
import { cancelledOccurrence, classTypePlans, slotClock, weeklyClasses } from './demo-week';

/** Sessions run from two weeks back to two weeks ahead of the day the seed runs. */
const WINDOW_DAYS = 14;
/** Reception swaps a troubled point out of a class if it knew at least this long before. */
const SWAP_NOTICE_MS = 60 * 60_000;

/**
 * Class types and a month of weekly classes around now, each session booked on points of its
 * room whose mounted apparatus is the class's kind. Future sessions keep the points they were
 * booked on, trouble or not, and are marked at risk as §4.4 says; past sessions left out a point
 * that was already out of use well before the class. Idempotent: class types by name, and the
 * schedule only while there are no sessions.
 */
export async function seedSchedule(trx: Db, now: Date): Promise<void> {
  const { policy } = await studioRepository(trx).get(trx);
  const tz = policy.timeZone;
  const created = localTime(now, -60, '09:00', tz).toISOString();

  const classTypes = new Map<string, { id: number; durationMinutes: number; cls: BookedClass }>();
  for (const c of classTypePlans) {
    const found = (await trx('class_types').where({ name: c.name }).first('id')) as { id: number } | undefined;
    const id =
      found?.id ??
      (
        (
          await trx('class_types')
            .insert({ name: c.name, apparatus: c.apparatus, duration_minutes: c.durationMinutes, capacity: c.capacity, performers_per_point: c.performersPerPoint, dynamic_factor: c.dynamicFactor, body_mass_kg: null, active: true, created_at: created })
            .returning('id')
        )[0] as { id: number }
      ).id;
    classTypes.set(c.name, { id, durationMinutes: c.durationMinutes, cls: { apparatus: c.apparatus, performersPerPoint: c.performersPerPoint, dynamicFactor: c.dynamicFactor ?? null, bodyMassKg: null, pointIds: [], recordedApparatus: [] } });
  }
  if (await trx('sessions').first('id')) return;

  const bundles = new Map((await loadSnapshots(trx, rigRepository(trx), {}, trx)).map((b) => [b.point.label, b]));
  const rooms = new Map(((await trx('rooms').select('id', 'name')) as Array<{ id: number; name: string }>).map((r) => [r.name, r.id]));
  const changed = (await trx('gear_items').whereNot('status', 'in_service').select('id', 'updated_at')) as Array<{ id: number; updated_at: string }>;
  const statusChangedAt = new Map(changed.map((g) => [g.id, g.updated_at]));
  const since = new Map([...bundles].map(([label, b]) => [label, troubledSince(b, policy, now, statusChangedAt)]));

  for (const cls of weeklyClasses) {
    const type = classTypes.get(cls.classType)!;
    const instructorId = await userIdByEmail(trx, cls.instructor);
    const clock = slotClock(cls.time, now, tz);
    const offsets: number[] = [];
    for (let offset = cls.day - 2 * 7; offset <= WINDOW_DAYS; offset += 7) if (offset >= -WINDOW_DAYS) offsets.push(offset);
    // The rule says exactly which sessions the series holds: this many weeks from the first.
    const rrule = `FREQ=WEEKLY;BYDAY=${weekdayCode(now, cls.day, tz)};COUNT=${offsets.length}`;
    const [series] = await trx('series').insert({ rrule, created_at: created }).returning('id');
    const seriesId = (series as { id: number }).id;

    for (const offset of offsets) {
      const startsAt = localTime(now, offset, clock, tz);
      const endsAt = new Date(startsAt.getTime() + type.durationMinutes * 60_000);
      const future = startsAt.getTime() > now.getTime();
      const points = cls.points
        .map((label) => bundles.get(label)!)
        .filter((b) => {
          const t = since.get(b.point.label);
          return future || !t || t.getTime() > startsAt.getTime() - SWAP_NOTICE_MS;
        });
      const cancelled = cls.day === cancelledOccurrence.day && cls.classType === cancelledOccurrence.classType && offset === cls.day + 7 * cancelledOccurrence.weeksAhead;
      // Each class hangs the apparatus mounted on its points (the plan books each on its own kind).
      const hung = points.map((b) => ({ bundle: b, hanging: hangFor(b.snapshot, type.cls.apparatus as ApparatusKind, null) }));
      const risk = riskOf(type.cls, hung, policy, now, { startsAt, endsAt, cancelled });
      const [session] = await trx('sessions')
        .insert({
          class_type_id: type.id,
          instructor_id: instructorId,
          room_id: rooms.get(cls.room),
          starts_at: startsAt.toISOString(),
          ends_at: endsAt.toISOString(),
          series_id: seriesId,
          occurrence_start: startsAt.toISOString(),
          cancelled,
          cancel_reason: cancelled ? cancelledOccurrence.reason : null,
          at_risk: risk.atRisk,
          created_at: created,
          updated_at: cancelled ? localTime(now, -2, '12:00', tz).toISOString() : created,
        })
        .returning('id');
      const sessionId = (session as { id: number }).id;
      await trx('session_points').insert(
        points.map((b) => ({ session_id: sessionId, point_id: b.point.id, starts_at: startsAt.toISOString(), ends_at: endsAt.toISOString(), cancelled })),
      );
      const apparatus = hung.filter((h) => h.hanging.apparatus).map((h) => ({ session_id: sessionId, point_id: h.bundle.point.id, gear_id: h.hanging.apparatus!.id, starts_at: startsAt.toISOString(), ends_at: endsAt.toISOString(), cancelled }));
      if (apparatus.length) await trx('session_apparatus').insert(apparatus);
    }
  }
}

/** When a point blocked now became unusable, as far as the records tell; null when it is not blocked. */
function troubledSince(b: SnapshotBundle, policy: Policy, now: Date, statusChangedAt: Map<number, string>): Date | null {
  if (pointStatusAt(b.snapshot, policy, now).status !== 'blocked') return null;
  const times: number[] = [];
  if (b.point.clearanceVoidedAt) times.push(Date.parse(b.point.clearanceVoidedAt));
  const until = clearedUntil(b.snapshot, policy);
  if (until && until.getTime() <= now.getTime()) times.push(until.getTime());
  for (const l of b.links) {
    const changed = statusChangedAt.get(l.gear.id);
    if (l.gear.status !== 'in_service' && changed) times.push(Date.parse(changed));
  }
  // Blocked with nothing dated (never cleared, say): it has been out of use all along.
  return new Date(times.length ? Math.min(...times) : 0);
}
