import type { Clock } from '../../clock';
import type { CurrentUser } from '../../http/auth';
import { HttpError } from '../../http/errors';
import type { StudioRepository } from '../studio/studio.repository';
import type { StaffRepository } from '../staff/staff.repository';
import type { StudentsRepository } from '../students/students.repository';
import type { PlacesRepository } from '../places/places.repository';
import type { MyRepository } from './my.repository';
import type { BookingResult } from '../../../shared/schemas/places';
import type { OnlineWaiver, Student, StudentDetail, WaiverAcceptance, WaiverVersion } from '../../../shared/schemas/students';
import type { MyBooking, MyProfile, MyWaiver } from '../../../shared/schemas/my';
import { studentMayCancel } from '../../../shared/places';

/** Who acts on a place (i17a's places service): a student acting on their own place. */
interface StudentActor {
  userId: number | null;
  asStudentId?: number;
}

/** What the student's side asks of the places and students services (server/modules/places, students). */
export interface MyDeps {
  clock: Clock;
  studio: StudioRepository;
  repo: MyRepository;
  /** The student record the caller's account is linked to. */
  accounts: Pick<StaffRepository, 'studentIdOfAccount'>;
  studentRecords: Pick<StudentsRepository, 'byId'>;
  placeRecords: Pick<PlacesRepository, 'byId'>;
  places: {
    book(sessionId: number, body: { studentId: number }, actor: StudentActor): Promise<BookingResult>;
    cancel(placeId: number, actor: StudentActor): Promise<unknown>;
  };
  students: {
    get(id: number): Promise<Student>;
    detail(id: number): Promise<StudentDetail>;
    currentWaiver(): Promise<WaiverVersion | null>;
    acceptOnline(studentId: number, body: OnlineWaiver, userId: number | null): Promise<WaiverAcceptance>;
  };
}

/**
 * The signed-in student's own data (PRODUCT.md §11): every call starts from the student linked to
 * the caller's account, so no id the caller sends can reach another student. The rules (capacity,
 * waitlist, cut-off, waiver validity) are the places and students services' own.
 */
export function myService(deps: MyDeps) {
  const { clock } = deps;

  /** The caller's student (following a merge to the student kept). */
  async function studentIdOf(user: CurrentUser): Promise<number> {
    let id = await deps.accounts.studentIdOfAccount(user.id);
    for (let hops = 0; id !== null && hops < 10; hops++) {
      const s = await deps.studentRecords.byId(id);
      if (!s) break;
      if (s.mergedIntoId === null) return s.id;
      id = s.mergedIntoId;
    }
    throw new HttpError(404, 'not_found', 'Your account is not linked to a student record. Please contact the studio.');
  }

  return {
    async profile(user: CurrentUser): Promise<MyProfile> {
      const s = await deps.students.get(await studentIdOf(user));
      const { policy } = await deps.studio.get();
      return { studentId: s.id, name: s.name, email: s.email, phone: s.phone, emergencyName: s.emergencyName, emergencyPhone: s.emergencyPhone, waiverValid: s.waiver.ok, cancelCutoffHours: policy.studentCancelCutoffHours };
    },

    async bookings(user: CurrentUser): Promise<MyBooking[]> {
      const detail = await deps.students.detail(await studentIdOf(user));
      const { policy } = await deps.studio.get();
      const now = clock.now();
      const all = [...detail.upcoming, ...detail.past];
      const rooms = await deps.repo.roomNamesOfSessions(all.map((b) => b.sessionId));
      const cutoffMs = policy.studentCancelCutoffHours * 3_600_000;
      return all.map((b) => {
        const startsAt = new Date(b.startsAt);
        return {
          id: b.id,
          sessionId: b.sessionId,
          className: b.className,
          apparatus: b.apparatus as MyBooking['apparatus'],
          roomName: rooms.get(b.sessionId) ?? '',
          startsAt: b.startsAt,
          endsAt: b.endsAt,
          status: b.status,
          pointLabel: b.pointLabel,
          position: b.position,
          sessionCancelled: b.sessionCancelled,
          cancelBefore: new Date(startsAt.getTime() - cutoffMs).toISOString(),
          canCancel: !b.sessionCancelled && (b.status === 'booked' || b.status === 'waitlisted') && studentMayCancel(startsAt, now, policy.studentCancelCutoffHours),
        };
      });
    },

    async book(user: CurrentUser, sessionId: number): Promise<BookingResult> {
      const studentId = await studentIdOf(user);
      return deps.places.book(sessionId, { studentId }, { userId: user.id, asStudentId: studentId });
    },

    /** Only the caller's own place: another student's answers 404, as one that does not exist. */
    async cancel(user: CurrentUser, placeId: number) {
      const studentId = await studentIdOf(user);
      const owner = await deps.placeRecords.byId(placeId);
      if (!owner || owner.studentId !== studentId) throw new HttpError(404, 'not_found', 'There is no such booking of yours.');
      await deps.places.cancel(placeId, { userId: user.id, asStudentId: studentId });
      return (await this.bookings(user)).find((b) => b.id === placeId)!;
    },

    async waiver(user: CurrentUser): Promise<MyWaiver> {
      const s = await deps.students.get(await studentIdOf(user));
      const current = await deps.students.currentWaiver();
      const accepted = s.waiver.version !== null && s.waiver.acceptedAt && s.waiver.validUntil
        ? { version: s.waiver.version, fullName: '', acceptedAt: s.waiver.acceptedAt, validUntil: s.waiver.validUntil, method: s.waiver.method ?? 'online' }
        : null;
      return { current: current ? { version: current.version, text: current.text } : null, accepted, valid: s.waiver.ok };
    },

    async signWaiver(user: CurrentUser, body: OnlineWaiver): Promise<WaiverAcceptance> {
      return deps.students.acceptOnline(await studentIdOf(user), body, user.id);
    },
  };
}
export type MyService = ReturnType<typeof myService>;
