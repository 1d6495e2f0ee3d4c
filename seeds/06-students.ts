import type { Db } from '../server/db/knex';
import { loadSnapshots } from '../server/modules/rig/point-snapshots';
import { rigRepository } from '../server/modules/rig/rig.repository';
import { studioRepository } from '../server/modules/studio/studio.repository';
import { sessionsRepository } from '../server/modules/sessions/sessions.repository';
import { hangingOf, loadRecorded } from '../server/modules/sessions/session-rig';
import { summarise, unfitReasons } from '../server/modules/places/session-places';
import type { PlaceRecord } from '../server/modules/places/places.repository';
import { choosePoint, waiverValidUntil } from '../shared/places';
import { studentEmailKey } from '../shared/schemas/students';
import { userIdByEmail } from './demo-data';

/** The demo studio's waiver, invented. */
export const demoWaiverText = [
  'Aerial arts involve climbing, inverting and hanging from apparatus above the floor. I understand that they carry a risk of injury, including from falls.',
  'I will tell my instructor before class about any injury, illness or medication that may affect me, warm up as shown, and follow the instructor’s directions.',
  'I will not climb or use any apparatus without an instructor present, and I will stop if I feel unwell or unsure.',
].join('\n\n');

/** Invented students (`.test` addresses). The one without a waiver is marked. */
export const demoStudents: Array<{ name: string; email: string; phone: string | null; emergencyName: string | null; emergencyPhone: string | null; waiver: 'valid' | 'none' | 'expired' }> = [
  { name: 'Maya Okafor', email: 'maya.okafor@students.test', phone: '07700 900101', emergencyName: 'Sam Okafor', emergencyPhone: '07700 900201', waiver: 'valid' },
  { name: 'Priya Raman', email: 'priya.raman@students.test', phone: '07700 900102', emergencyName: 'Dev Raman', emergencyPhone: '07700 900202', waiver: 'valid' },
  { name: 'Tomasz Wójcik', email: 'tomasz.wojcik@students.test', phone: '07700 900103', emergencyName: 'Ola Wójcik', emergencyPhone: '07700 900203', waiver: 'valid' },
  { name: 'Elin Hughes', email: 'elin.hughes@students.test', phone: '07700 900104', emergencyName: null, emergencyPhone: null, waiver: 'valid' },
  { name: 'Jonah Adeyemi', email: 'jonah.adeyemi@students.test', phone: '07700 900105', emergencyName: 'Ruth Adeyemi', emergencyPhone: '07700 900205', waiver: 'valid' },
  { name: 'Sofia Marchetti', email: 'sofia.marchetti@students.test', phone: null, emergencyName: 'Luca Marchetti', emergencyPhone: '07700 900206', waiver: 'valid' },
  { name: 'Harriet Chen', email: 'harriet.chen@students.test', phone: '07700 900107', emergencyName: 'Wei Chen', emergencyPhone: '07700 900207', waiver: 'valid' },
  { name: 'Rowan Vale', email: 'rowan.vale@students.test', phone: '07700 900108', emergencyName: 'Ash Vale', emergencyPhone: '07700 900208', waiver: 'none' },
  { name: 'Noor Haddad', email: 'noor.haddad@students.test', phone: '07700 900109', emergencyName: 'Rami Haddad', emergencyPhone: '07700 900209', waiver: 'valid' },
  { name: 'Kit Morales', email: 'kit.morales@students.test', phone: '07700 900110', emergencyName: null, emergencyPhone: null, waiver: 'expired' },
  { name: 'Bea Lindqvist', email: 'bea.lindqvist@students.test', phone: '07700 900111', emergencyName: 'Nils Lindqvist', emergencyPhone: '07700 900211', waiver: 'valid' },
  { name: 'Ife Balogun', email: 'ife.balogun@students.test', phone: '07700 900112', emergencyName: 'Tola Balogun', emergencyPhone: '07700 900212', waiver: 'valid' },
];

const DAY = 86_400_000;

/**
 * A current waiver, the students, and their places in the classes from a week back to a week
 * ahead: each class filled in turn onto points that can take it (past ones attended or no-show),
 * the busiest class of the week overbooked onto its waitlist, and — where a class is at risk — its
 * students left on the troubled point, so "without a fit place" shows. Idempotent: nothing is
 * added while any student exists.
 */
export async function seedStudents(trx: Db, now: Date): Promise<void> {
  if (await trx('students').first('id')) return;
  const { policy } = await studioRepository(trx).get(trx);
  const ownerId = await userIdByEmail(trx, 'owner@loftwise.test');
  const deskId = await userIdByEmail(trx, 'reception@loftwise.test');
  const created = new Date(now.getTime() - 90 * DAY).toISOString();
  const [wv] = await trx('waiver_versions').insert({ version: 1, text: demoWaiverText, created_by: ownerId, created_at: created }).returning('id');
  const waiverVersionId = (wv as { id: number }).id;

  const ids: number[] = [];
  for (const [i, s] of demoStudents.entries()) {
    const [row] = await trx('students')
      .insert({ name: s.name, email: s.email, email_key: studentEmailKey(s.email), phone: s.phone, emergency_name: s.emergencyName, emergency_phone: s.emergencyPhone, created_at: created, updated_at: created })
      .returning('id');
    const id = (row as { id: number }).id;
    ids.push(id);
    if (s.waiver === 'none') continue;
    // An expired one was signed longer ago than the policy holds a waiver.
    const acceptedAt = new Date(now.getTime() - (s.waiver === 'expired' ? policy.waiverValidMonths * 31 + 20 : 30 + i * 7) * DAY);
    await trx('waiver_acceptances').insert({
      student_id: id,
      waiver_version_id: waiverVersionId,
      full_name: s.name,
      method: i % 2 ? 'online' : 'paper',
      recorded_by: i % 2 ? null : deskId,
      accepted_at: acceptedAt.toISOString(),
      valid_until: waiverValidUntil(acceptedAt, policy.waiverValidMonths).toISOString(),
    });
  }

  const rig = rigRepository(trx);
  const sessions = (await sessionsRepository(trx).list({ from: new Date(now.getTime() - 7 * DAY), to: new Date(now.getTime() + 7 * DAY) }, trx)).filter((s) => !s.cancelled);
  const bundles = new Map((await loadSnapshots(trx, rig, {}, trx)).map((b) => [b.point.id, b]));
  const recorded = await loadRecorded(rig, sessions, trx);
  let next = 0;
  let waitlistedOne = false;
  for (const [n, s] of sessions.entries()) {
    const startsAt = new Date(s.startsAt);
    const past = new Date(s.endsAt) <= now;
    const hung = hangingOf(s, bundles, recorded);
    const unfit = unfitReasons(s, hung, policy, now, new Date(s.endsAt));
    const labels = new Map(hung.map((h) => [h.bundle.point.id, h.bundle.point.label]));
    const places: PlaceRecord[] = [];
    const at = new Date(Math.min(now.getTime(), startsAt.getTime()) - 3 * DAY).toISOString();
    const add = async (studentId: number, pointId: number | null, status: PlaceRecord['status'], waitlistedAt: string | null = null) => {
      const [row] = await trx('places')
        .insert({ session_id: s.id, student_id: studentId, point_id: pointId, status, waitlisted_at: waitlistedAt, booked_by: deskId, checked_in_at: status === 'attended' || status === 'no_show' ? s.startsAt : null, created_at: at, updated_at: at })
        .returning('id');
      places.push({ id: (row as { id: number }).id, sessionId: s.id, studentId, studentName: '', studentEmail: '', pointId, pointLabel: null, status, waitlistedAt, bookedBy: deskId, cancelledAt: null, checkedInAt: null, createdAt: at, updatedAt: at });
    };
    // A class at risk keeps the students booked before its point turned: one stays on the troubled point.
    const troubled = !past ? s.pointIds.find((id) => (unfit.get(id) ?? []).length > 0) : undefined;
    if (troubled !== undefined) await add(ids[next++ % ids.length], troubled, 'booked');
    // Fill about two thirds of each class (the first few full), so some places are left to book.
    const summary = summarise({ cls: s, capacity: s.capacity, cancelled: false, labels, unfit, places });
    const want = n % 3 === 0 ? summary.capacity : Math.ceil((summary.capacity * 2) / 3);
    for (let k = 0; k < want; k++) {
      const pointId = choosePoint(summarise({ cls: s, capacity: s.capacity, cancelled: false, labels, unfit, places }).points, s.performersPerPoint, summary.capacity);
      if (pointId === null) break;
      const studentId = ids[next++ % ids.length];
      if (places.some((p) => p.studentId === studentId)) continue;
      // Past classes: attended, except now and then a no-show; Rowan (no waiver) is never checked in as attended.
      const noWaiver = studentId === ids[demoStudents.findIndex((d) => d.waiver === 'none')];
      await add(studentId, pointId, past ? (noWaiver || k % 5 === 4 ? 'no_show' : 'attended') : 'booked');
    }
    // The first full class ahead gets a waitlist of two.
    if (!past && !waitlistedOne && want === summary.capacity && summary.capacity > 0) {
      waitlistedOne = true;
      for (let w = 0; w < 2; w++) {
        const studentId = ids.find((id) => !places.some((p) => p.studentId === id));
        if (studentId === undefined) break;
        await add(studentId, null, 'waitlisted', new Date(Date.parse(at) + (w + 1) * 60_000).toISOString());
      }
    }
  }
}
