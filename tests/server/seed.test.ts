import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { createDb, migrate, type Db } from '../../server/db/knex';
import { auditRepository } from '../../server/modules/audit/audit.repository';
import { loadSnapshots, type SnapshotBundle } from '../../server/modules/rig/point-snapshots';
import { rigRepository } from '../../server/modules/rig/rig.repository';
import { seedDemoIfEmpty } from '../../seeds';
import { DEMO_PASSWORD } from '../../seeds/01-studio-and-staff';
import { localDay } from '../../seeds/demo-data';
import { createTestApp, signIn, TEST_AUDIT_KEY, withOrigin } from '../helpers/app';
import { freshDatabase } from '../helpers/database';
import { seedStudioAndStaff } from '../../seeds/01-studio-and-staff';
import { seedRig } from '../../seeds/02-rig';
import { seedSafety } from '../../seeds/03-safety';
import { seedSchedule } from '../../seeds/04-schedule';
import { seedStudents } from '../../seeds/06-students';
import { pointStatusAt, studioDay } from '../../shared/clearance';
import { expandSeries } from '../../shared/schedule/recurrence';
import { checkLoadPath, parseBridle, type LoadProfile } from '../../shared/rigging';
import { defaultPolicy as policy } from '../../shared/schemas/policy';
import type { ApparatusKind } from '../../shared/schemas/vocabulary';

const tables = ['users', 'studios', 'rooms', 'points', 'gear_items', 'gear_events', 'load_path_links', 'inspections', 'inspection_items', 'faults', 'audit_entries', 'class_types', 'series', 'sessions', 'session_points', 'students', 'waiver_versions', 'waiver_acceptances', 'places'];

let cleanup: Array<() => Promise<void>> = [];
afterEach(async () => {
  for (const fn of cleanup) await fn();
  cleanup = [];
});

async function freshDb(): Promise<Db> {
  const dir = mkdtempSync(join(tmpdir(), 'loftwise-seed-'));
  const database = await freshDatabase(dir, 'seed.sqlite');
  const db = createDb(database.target, { poolMax: 2 });
  await migrate(db);
  cleanup.push(async () => {
    await db.destroy();
    await database.drop();
    rmSync(dir, { recursive: true, force: true });
  });
  return db;
}

async function counts(db: Db): Promise<Record<string, number>> {
  const out: Record<string, number> = {};
  for (const t of tables) out[t] = Number(((await db(t).count('* as n')) as Array<{ n: number }>)[0].n);
  return out;
}

interface SessionRow { id: number; class_type_id: number; instructor_id: number; room_id: number; starts_at: string; ends_at: string; series_id: number; occurrence_start: string; cancelled: number; cancel_reason: string | null; at_risk: number }
interface SessionPointRow { session_id: number; point_id: number; starts_at: string; cancelled: number }
interface ClassRow { id: number; name: string; apparatus: ApparatusKind; performers_per_point: number; dynamic_factor: number | null; body_mass_kg: number | null }
const profileOf = (c: ClassRow): LoadProfile => ({
  performers: c.performers_per_point,
  bodyMassKg: c.body_mass_kg ?? policy.bodyMassKg,
  dynamicFactor: c.dynamic_factor ?? policy.dynamicFactors[c.apparatus],
});
const check = (b: SnapshotBundle, profile: LoadProfile) =>
  checkLoadPath({ links: b.snapshot.links, structuralRatingKn: b.snapshot.structuralRatingKn, profile, requiredFactor: policy.requiredFactor });

// Tuesday 09:00 in London (GMT); Sunday 28 March 2027, the clocks go forward; 31 October 2027 at
// 01:30 BST, half an hour before they go back.
describe.each(['2026-12-01T09:00:00Z', '2027-03-28T09:00:00Z', '2027-10-31T00:30:00Z'])('the demo studio seeded at %s', (iso) => {
  const now = new Date(iso);

  it('shows every point state right after the first start [studio choice: default policy]', async () => {
    const db = await freshDb();
    expect(await seedDemoIfEmpty(db, now, TEST_AUDIT_KEY)).toBe(true);
    const bundles = await loadSnapshots(db, rigRepository(db));
    const statuses = bundles.map((b) => ({ label: b.point.label, ...pointStatusAt(b.snapshot, policy, now) }));
    const byLabel = Object.fromEntries(statuses.map((s) => [s.label, s]));
    const codes = (label: string) => byLabel[label].reasons.map((r) => r.code);

    expect(statuses.filter((s) => s.status === 'cleared').length).toBeGreaterThanOrEqual(3);
    expect(byLabel['MH-6'].status).toBe('expiring');
    for (const code of ['inspection_lapsed', 'fault_open', 'awaiting_clearance', 'gear_unfit', 'rule_violation']) {
      expect(statuses.some((s) => s.status === 'blocked' && s.reasons.some((r) => r.code === code)), code).toBe(true);
    }
    expect(codes('MH-8')).toEqual(['inspection_lapsed']);
    expect(codes('MH-2')).toEqual(expect.arrayContaining(['fault_open', 'awaiting_clearance']));
    expect(byLabel['MH-2'].reasons[0].message).toMatch(/swivel .*grinds when turned/i);
    expect(codes('LS-7')).toEqual(['awaiting_clearance']);
    expect(codes('LS-4')).toEqual(['gear_unfit']);
    expect(byLabel['LS-4'].reasons[0].message).toMatch(/retired/);
    expect(codes('LS-3')).toEqual(['gear_unfit']);
    expect(byLabel['LS-3'].reasons[0].message).toMatch(/quarantined/);
    expect(codes('LS-5')).toContain('rule_violation');
    // Nothing in the rig reaches the end of its service life within the seeded month.
    expect(statuses.flatMap((s) => s.reasons).some((r) => /service life/.test(r.message))).toBe(false);

    const dropped = await db('gear_events').where({ kind: 'drop' }).first();
    expect(dropped).toBeTruthy();
    expect((await db('gear_items').where({ id: dropped.gear_id }).first()).status).toBe('quarantined');
    const resolved = await db('faults').where({ status: 'resolved' });
    expect(resolved.length).toBeGreaterThanOrEqual(2);
    expect(resolved.every((f: { resolution: string | null; resolution_note: string | null }) => f.resolution && f.resolution_note)).toBe(true);
    const clearances = await db('inspections').where({ kind: 'periodic', cleared: true });
    expect(clearances.length).toBeGreaterThanOrEqual(15);
    expect(await db('inspection_items').where({ result: 'attention' }).whereNot({ note: '' }).first()).toBeTruthy();
    const preuse = await db('inspections').where({ kind: 'pre_use' });
    expect(preuse.length).toBeGreaterThan(0);
    expect(preuse.every((p: { studio_day: string }) => p.studio_day === localDay(now, -1, policy.timeZone))).toBe(true);
    // No gear is inspected, or hung in a path, before the day it went into service.
    const early = await db('inspection_items')
      .join('inspections', 'inspections.id', 'inspection_items.inspection_id')
      .join('gear_items', 'gear_items.id', 'inspection_items.gear_id')
      .whereRaw('gear_items.in_service_on > inspections.studio_day')
      .select('gear_items.serial');
    expect(early).toEqual([]);

    expect(await auditRepository(db, TEST_AUDIT_KEY).verify()).toMatchObject({ ok: true });
    expect((await auditRepository(db, TEST_AUDIT_KEY).verify()).entries).toBeGreaterThan(30);
  });

  it('has a bridle and a point that passes a solo fabric class but fails the duo trapeze class', async () => {
    const db = await freshDb();
    await seedDemoIfEmpty(db, now, TEST_AUDIT_KEY);
    const bundles = await loadSnapshots(db, rigRepository(db));
    const bridles = bundles.filter((b) => parseBridle(b.snapshot.links).kind === 'bridle');
    expect(bridles.map((b) => b.point.label)).toEqual(['MH-3']);
    expect(parseBridle(bridles[0].snapshot.links).includedAngleDeg).toBe(60);
    expect(check(bridles[0], { performers: 1, bodyMassKg: 90, dynamicFactor: 5.6 }).pass).toBe(true);

    const duo = (await db('class_types').where({ name: 'Duo Trapeze' }).first()) as ClassRow;
    const mh4 = bundles.find((b) => b.point.label === 'MH-4')!;
    // W = 1 × 90 kg × 9.80665 × 5.6 = 4.94 kN; the 25 kN aluminium carabiner gives 5.06 ≥ 5.
    const solo = check(mh4, { performers: 1, bodyMassKg: policy.bodyMassKg, dynamicFactor: policy.dynamicFactors.fabric });
    expect(solo.pass).toBe(true);
    expect(solo.achievedFactor).toBeCloseTo(25 / 4.9426, 2);
    // W = 2 × 90 × 9.80665 × 3 = 5.30 kN; 25 kN gives 4.72 < 5.
    const duoCheck = check(mh4, profileOf(duo));
    expect(duoCheck.pass).toBe(false);
    expect(duoCheck.violations.map((v) => v.code)).toEqual(['factor_below_required']);
    expect(mh4.snapshot.apparatus).toContain('trapeze');
    expect(mh4.snapshot.maxPerformers).toBe(2);
  });

  it('books a month of classes that fit their points, with today for instructor@loftwise.test', async () => {
    const db = await freshDb();
    await seedDemoIfEmpty(db, now, TEST_AUDIT_KEY);
    const bundles = new Map((await loadSnapshots(db, rigRepository(db))).map((b) => [b.point.id, b]));
    const classes = new Map(((await db('class_types')) as ClassRow[]).map((c) => [c.id, c]));
    const sessions = (await db('sessions').orderBy('starts_at')) as SessionRow[];
    const links = (await db('session_points')) as SessionPointRow[];

    expect(sessions.length).toBeGreaterThanOrEqual(48);
    const ines = (await db('users').where({ email: 'instructor@loftwise.test' }).first()).id;
    const today = studioDay(now, policy.timeZone);
    const hers = sessions.filter((s) => s.instructor_id === ines && studioDay(new Date(s.starts_at), policy.timeZone) === today);
    expect(hers.length).toBeGreaterThanOrEqual(2);
    expect(hers.some((s) => new Date(s.starts_at) > now)).toBe(true);

    for (const s of sessions) {
      const mine = links.filter((l) => l.session_id === s.id);
      expect(mine.length).toBeGreaterThanOrEqual(1);
      expect(s.series_id).not.toBeNull();
      const c = classes.get(s.class_type_id)!;
      for (const l of mine) {
        const b = bundles.get(l.point_id)!;
        expect(l.starts_at).toBe(s.starts_at);
        expect(Boolean(l.cancelled)).toBe(Boolean(s.cancelled));
        expect(b.point.roomId).toBe(s.room_id);
        expect(b.snapshot.apparatus).toContain(c.apparatus);
        expect(check(b, profileOf(c)).pass, `${c.name} on ${b.point.label}`).toBe(true);
        // No point and no instructor in two overlapping sessions.
        const clash = sessions.find((o) => o.id !== s.id && o.starts_at < s.ends_at && s.starts_at < o.ends_at && (o.instructor_id === s.instructor_id || links.some((x) => x.session_id === o.id && x.point_id === l.point_id)));
        expect(clash, `session ${s.id} overlaps`).toBeUndefined();
      }
    }
    const future = sessions.filter((s) => new Date(s.starts_at) > now && !s.cancelled);
    expect(future.some((s) => s.at_risk)).toBe(true);
    expect(future.some((s) => !s.at_risk)).toBe(true);
    const cancelled = sessions.filter((s) => s.cancelled);
    expect(cancelled).toHaveLength(1);
    expect(cancelled[0].cancel_reason).toBeTruthy();
    expect(sessions.some((s) => s.at_risk && new Date(s.starts_at) <= now)).toBe(false);
    // Each series' rule, expanded from its first session, gives exactly its sessions.
    for (const series of (await db('series')) as Array<{ id: number; rrule: string }>) {
      expect(series.rrule).toMatch(/^FREQ=WEEKLY;BYDAY=(MO|TU|WE|TH|FR|SA|SU);COUNT=\d+$/);
      const starts = sessions.filter((s) => s.series_id === series.id).map((s) => s.starts_at);
      expect(expandSeries(series.rrule, new Date(starts[0]), policy.timeZone).map((d) => d.toISOString())).toEqual(starts);
      expect(sessions.filter((s) => s.series_id === series.id && s.occurrence_start !== s.starts_at)).toEqual([]);
    }
  });

  it('seeds only an empty database, and each step again adds nothing', async () => {
    const db = await freshDb();
    await seedDemoIfEmpty(db, now, TEST_AUDIT_KEY);
    const before = await counts(db);
    expect(await seedDemoIfEmpty(db, now, TEST_AUDIT_KEY)).toBe(false);
    expect(await counts(db)).toEqual(before);
    await db.transaction(async (trx) => {
      await seedStudioAndStaff(trx, now);
      await seedRig(trx, now);
      await seedSafety(trx, now, TEST_AUDIT_KEY);
      await seedSchedule(trx, now);
      await seedStudents(trx, now);
    });
    expect(await counts(db)).toEqual(before);
    expect(await auditRepository(db, TEST_AUDIT_KEY).verify()).toMatchObject({ ok: true });
  });
});

describe('the demo studio through the API', () => {
  it('has students (.test addresses) booked into the week, some waitlisted, one without a waiver, and a current waiver', async () => {
    const ctx = await createTestApp({ now: '2026-12-01T09:00:00Z' });
    cleanup.push(() => ctx.close());
    await seedDemoIfEmpty(ctx.db, ctx.clock.now(), TEST_AUDIT_KEY);
    const { agent } = await signIn(ctx.app, 'reception@loftwise.test', DEMO_PASSWORD);
    const desk = withOrigin(agent);
    const students = (await desk.get('/api/students')).body.items as Array<{ email: string; waiver: { state: string } }>;
    expect(students.length).toBeGreaterThanOrEqual(10);
    expect(students.every((s) => s.email.endsWith('.test'))).toBe(true);
    expect(students.filter((s) => s.waiver.state === 'missing')).toHaveLength(1);
    expect((await desk.get('/api/waivers')).body.current).toMatchObject({ version: 1 });
    const places = (await ctx.db('places').select('status', 'session_id')) as Array<{ status: string; session_id: number }>;
    expect(places.filter((p) => p.status === 'waitlisted').length).toBeGreaterThanOrEqual(1);
    expect(places.filter((p) => p.status === 'booked').length).toBeGreaterThan(5);
    // A class with a waitlist is full.
    const full = await desk.get(`/api/sessions/${places.find((p) => p.status === 'waitlisted')!.session_id}`);
    expect(full.body.placesLeft).toBe(0);
    expect(full.body.waitlisted).toBeGreaterThanOrEqual(1);
  });

  it('gives instructor@loftwise.test today\'s classes and the rigger checklists the clearances used', async () => {
    const ctx = await createTestApp({ now: '2026-12-01T09:00:00Z' });
    cleanup.push(() => ctx.close());
    await seedDemoIfEmpty(ctx.db, ctx.clock.now(), TEST_AUDIT_KEY);

    const instructor = await signIn(ctx.app, 'instructor@loftwise.test', DEMO_PASSWORD);
    expect(instructor.ok).toBe(true);
    const today = await withOrigin(instructor.agent).get('/api/today');
    expect(today.status).toBe(200);
    expect(today.body.sessions.length).toBeGreaterThanOrEqual(2);
    expect(today.body.sessions.some((s: { atRisk: boolean }) => s.atRisk)).toBe(true);

    const rigger = await signIn(ctx.app, 'rigger@loftwise.test', DEMO_PASSWORD);
    const points = await withOrigin(rigger.agent).get('/api/points');
    expect(points.status).toBe(200);
    const words = new Set(points.body.map((p: { status: { status: string } }) => p.status.status));
    expect([...words].sort()).toEqual(['blocked', 'cleared', 'expiring']);
    for (const label of ['MH-1', 'MH-3', 'LS-6']) {
      const p = points.body.find((x: { label: string }) => x.label === label);
      const checklist = await withOrigin(rigger.agent).get(`/api/points/${p.id}/checklist`);
      const last = await ctx.db('inspections').where({ point_id: p.id, kind: 'periodic' }).orderBy('inspected_at', 'desc').first('id');
      const keys = await ctx.db('inspection_items').where({ inspection_id: last.id }).orderBy('id').pluck('key');
      expect(keys).toEqual(checklist.body.items.map((i: { key: string }) => i.key));
    }
  });
});

describe('the demo studio seeded late in the evening', () => {
  it.each(['2026-12-01T21:10:00Z', '2026-12-01T22:40:00Z'])('still gives the demo instructor a class ahead today when seeded at %s', async (iso) => {
    const now = new Date(iso);
    const db = await freshDb();
    await seedDemoIfEmpty(db, now, TEST_AUDIT_KEY);
    const ahead = (await db('sessions')
      .join('users', 'users.id', 'sessions.instructor_id')
      .where('users.email', 'instructor@loftwise.test')
      .where('sessions.starts_at', '>', now.toISOString())
      .select('sessions.starts_at')) as Array<{ starts_at: string }>;
    expect(ahead.some((s) => studioDay(new Date(s.starts_at), policy.timeZone) === studioDay(now, policy.timeZone))).toBe(true);
  });
});
