import { useId, useState } from 'react';
import { ChevronDown, CircleX, TriangleAlert, UserCheck, Users } from 'lucide-react';
import type { PlaceStatus } from '../../../../shared/schemas/vocabulary';
import type { TodaySession, TodayStudent } from '../../../../shared/schemas/today';
import { errorMessage } from '../../../lib/api-client';
import { useSignedIn } from '../../../app/use-me';
import { usePlaceMutations } from '../api';
import { PlaceBadge, WaiverMissing } from './badges';

/*
 * A class's students on the Today board, from the board itself (GET /api/today carries them point by
 * point): no request per class. Each point shows its students in one line (a missing waiver flagged
 * there, before class); the check-in itself, one tap per student for attended or no-show, folds
 * behind one "Check in" per class, so a class still fits one phone screen.
 */

const HOLDS: readonly PlaceStatus[] = ['booked', 'attended', 'no_show'];
/** Who reads a class's students and checks them in. Riggers keep the rig, not the register. */
const CHECKERS = new Set(['instructor', 'reception', 'owner']);

const holding = (s: TodayStudent) => HOLDS.includes(s.status);

/** The students on one point, in one line: names, a missing waiver, whether they were checked in. */
export function PointStudentsLine({ students }: { students: TodayStudent[] }) {
  const { role } = useSignedIn();
  const on = students.filter(holding);
  if (!CHECKERS.has(role) || !on.length) return null;
  const lost = on.filter((s) => s.withoutFitPlace);
  const placed = on.filter((s) => !s.withoutFitPlace);
  return (
    <>
      {placed.length ? (
        <p className="mt-1 flex items-start gap-1.5 text-sm" data-testid="point-students">
          <Users className="mt-0.5 size-4 shrink-0 text-muted" aria-hidden />
          <span className="min-w-0">
            <span className="sr-only">Students: </span>
            {placed.map((s, i) => (
              <span key={s.bookingId}>
                {i ? ', ' : ''}
                <span className="font-medium">{s.name}</span>
                {s.waiverOk ? null : <> <WaiverMissing /></>}
                {s.status === 'booked' ? null : <> <PlaceBadge status={s.status} /></>}
              </span>
            ))}
          </span>
        </p>
      ) : null}
      {lost.length ? (
        <p className="mt-1 flex items-start gap-1.5 text-sm font-medium text-stop-700">
          <TriangleAlert className="mt-0.5 size-4 shrink-0" aria-hidden />
          {/* The class's note above says reception moves them; the point names who. */}
          <span>Without a fit place: {lost.map((s) => `${s.name}${s.waiverOk ? '' : ' (no valid waiver)'}`).join(', ')}.</span>
        </p>
      ) : null}
    </>
  );
}

/** Students of a class left with no point at all (their point was lost and no fit place is left). */
export function UnplacedStudents({ session }: { session: TodaySession }) {
  const { role } = useSignedIn();
  const lost = session.students.filter((s) => s.withoutFitPlace && s.pointId === null && holding(s));
  if (!CHECKERS.has(role) || !lost.length) return null;
  return (
    <p role="note" className="mt-2 flex items-start gap-2 rounded-lg border border-stop-700/40 bg-stop-50 px-3 py-2 text-sm text-stop-700" data-testid={`unplaced-${session.id}`}>
      <TriangleAlert className="mt-0.5 size-4 shrink-0" aria-hidden />
      <span>Without a fit place: {lost.map((s) => s.name).join(', ')}. Reception moves them to a free place.</span>
    </p>
  );
}

/**
 * One "Check in" per class: opens the class's students, point by point, each with Attended and
 * No-show. A student without a fit place is reception's to move first, so is not listed here.
 */
export function ClassCheckIn({ session }: { session: TodaySession }) {
  const { role } = useSignedIn();
  const [open, setOpen] = useState(false);
  const listId = useId();
  const placed = session.students.filter((s) => holding(s) && !s.withoutFitPlace && s.pointId !== null);
  if (!CHECKERS.has(role) || !placed.length) return null;
  const marked = placed.filter((s) => s.status !== 'booked').length;
  const labels = new Map(session.points.map((p) => [p.pointId, p.label]));
  const groups = [...new Set(placed.map((s) => s.pointId!))]
    .map((pointId) => ({ pointId, label: labels.get(pointId) ?? 'Point', students: placed.filter((s) => s.pointId === pointId) }))
    .sort((a, b) => a.label.localeCompare(b.label));
  return (
    <section className="mt-2" aria-label={`Check-in for ${session.className}`}>
      <button
        type="button"
        aria-expanded={open}
        aria-controls={open ? listId : undefined}
        onClick={() => setOpen((o) => !o)}
        className="flex min-h-12 w-full items-center justify-between gap-2 rounded-lg border-2 border-pine-700 bg-white px-3 text-left font-semibold text-pine-800 hover:bg-pine-50"
      >
        <span className="flex items-center gap-2">
          <UserCheck className="size-5 shrink-0" aria-hidden />
          Check in
          <span className="font-normal text-muted">
            {placed.length} {placed.length === 1 ? 'student' : 'students'}{marked ? ` · ${marked} marked` : ''}
          </span>
        </span>
        <ChevronDown className={`size-5 shrink-0 transition-transform ${open ? 'rotate-180' : ''}`} aria-hidden />
      </button>
      {open ? (
        <div id={listId} className="mt-1 space-y-1">
          {groups.map((g) => (
            <section key={g.pointId} aria-label={`Students on ${g.label}`} data-testid={`checkin-${session.id}-${g.pointId}`}>
              <h3 className="pt-1 text-sm font-semibold text-muted">{g.label}</h3>
              <ul className="divide-y divide-line">
                {g.students.map((s) => <Student key={s.bookingId} student={s} />)}
              </ul>
            </section>
          ))}
        </div>
      ) : null}
    </section>
  );
}

function Student({ student: s }: { student: TodayStudent }) {
  const { checkIn } = usePlaceMutations();
  const [refusal, setRefusal] = useState<string | null>(null);
  const [pending, setPending] = useState<'attended' | 'no_show' | null>(null);
  const mark = (outcome: 'attended' | 'no_show') => {
    setRefusal(null);
    setPending(outcome);
    checkIn.mutate({ id: s.bookingId, outcome }, { onError: (err) => setRefusal(errorMessage(err)), onSettled: () => setPending(null) });
  };
  const tap = 'flex min-h-12 items-center justify-center gap-1 rounded-lg border-2 px-2 text-sm font-semibold disabled:opacity-60';
  return (
    <li className="flex flex-wrap items-center gap-x-2 gap-y-1 py-1.5" data-testid={`checkin-student-${s.bookingId}`}>
      <p className="flex min-w-0 flex-1 flex-wrap items-center gap-x-2 gap-y-0.5">
        <span className="text-base font-medium">{s.name}</span>
        {s.waiverOk ? null : <WaiverMissing />}
      </p>
      <div className="grid w-56 shrink-0 grid-cols-2 gap-1.5 whitespace-nowrap" role="group" aria-label={`Check in ${s.name}`}>
        <button type="button" aria-label={`Attended: ${s.name}`} aria-pressed={s.status === 'attended'} disabled={checkIn.isPending} aria-busy={pending === 'attended' || undefined} onClick={() => mark('attended')}
          className={`${tap} ${s.status === 'attended' ? 'border-ok-700 bg-ok-700 text-white' : 'border-ok-700 bg-white text-ok-700 hover:bg-ok-50'}`}>
          <UserCheck className="size-4" aria-hidden />Attended
        </button>
        <button type="button" aria-label={`No-show: ${s.name}`} aria-pressed={s.status === 'no_show'} disabled={checkIn.isPending} aria-busy={pending === 'no_show' || undefined} onClick={() => mark('no_show')}
          className={`${tap} ${s.status === 'no_show' ? 'border-stop-700 bg-stop-700 text-white' : 'border-stop-700 bg-white text-stop-700 hover:bg-stop-50'}`}>
          <CircleX className="size-4" aria-hidden />No-show
        </button>
      </div>
      {refusal ? <p role="alert" className="basis-full rounded-lg bg-stop-50 p-2 text-sm font-medium text-stop-700">{refusal}</p> : null}
    </li>
  );
}
