import { useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { CircleX, TriangleAlert, UserCheck } from 'lucide-react';
import type { PlaceStatus } from '../../../../shared/schemas/vocabulary';
import { ErrorState } from '../../../components/ui/states';
import { errorMessage } from '../../../lib/api-client';
import { useSignedIn } from '../../../app/use-me';
import { studentsQueries, usePlaceMutations, type SessionBooking } from '../api';
import { WaiverMissing } from './badges';

const HOLDS: readonly PlaceStatus[] = ['booked', 'attended', 'no_show'];
const CHECKERS = new Set(['instructor', 'reception', 'owner']);
/** Who may read a class's students (GET /api/sessions/:id/bookings). */
const READERS = CHECKERS;

/**
 * The students on one point of a class on the Today board, each with one tap for attended or
 * no-show. A student without a valid waiver is flagged before the class; a refused check-in shows
 * the server's words beside the student.
 */
export function PointCheckIn(props: { sessionId: number; pointId: number }) {
  // Riggers keep the rig, not the register: they neither read a class's students nor check them in.
  return READERS.has(useSignedIn().role) ? <PointStudents {...props} /> : null;
}

function PointStudents({ sessionId, pointId }: { sessionId: number; pointId: number }) {
  const me = useSignedIn();
  const q = useQuery(studentsQueries.sessionBookings(sessionId));
  if (q.isPending) return <p className="mt-3 text-sm text-muted" role="status">Loading students…</p>;
  if (q.isError) return <div className="mt-3"><ErrorState error={q.error} retry={() => q.refetch()} /></div>;
  const on = q.data.filter((b) => b.pointId === pointId && HOLDS.includes(b.status));
  // No line for an empty point: the drawer and the student list say who is where; Today stays one screen a class.
  if (!on.length) return null;
  const lost = on.filter((b) => b.withoutFitPlace);
  const placed = on.filter((b) => !b.withoutFitPlace);
  return (
    <section className="mt-2 border-t border-line pt-1" aria-label={`Students on this point: ${on.length}`} data-testid={`checkin-${sessionId}-${pointId}`}>
      {lost.length ? (
        <p className="mt-1 flex items-start gap-2 text-sm font-medium text-stop-700">
          <TriangleAlert className="mt-0.5 size-4 shrink-0" aria-hidden />
          <span>Without a fit place: {lost.map((b) => `${b.name}${b.waiverOk ? '' : ' (no valid waiver)'}`).join(', ')}. Reception moves them to a free place.</span>
        </p>
      ) : null}
      {placed.length ? <ul className="divide-y divide-line">{placed.map((b) => <Student key={b.id} booking={b} canCheck={CHECKERS.has(me.role)} />)}</ul> : null}
    </section>
  );
}

/** Students of a class left with no point at all (their point was lost and no fit place is left). */
export function UnplacedStudents(props: { sessionId: number }) {
  return READERS.has(useSignedIn().role) ? <Unplaced {...props} /> : null;
}

function Unplaced({ sessionId }: { sessionId: number }) {
  const q = useQuery(studentsQueries.sessionBookings(sessionId));
  const lost = (q.data ?? []).filter((b) => b.withoutFitPlace && b.pointId === null && b.status !== 'cancelled');
  if (!lost.length) return null;
  return (
    <p role="note" className="mt-3 flex items-start gap-2 rounded-lg border border-stop-700/40 bg-stop-50 p-3 text-sm text-stop-700" data-testid={`unplaced-${sessionId}`}>
      <TriangleAlert className="mt-0.5 size-4 shrink-0" aria-hidden />
      <span>Without a fit place: {lost.map((b) => b.name).join(', ')}. Reception moves them to a free place.</span>
    </p>
  );
}

function Student({ booking: b, canCheck }: { booking: SessionBooking; canCheck: boolean }) {
  const { checkIn } = usePlaceMutations();
  const [refusal, setRefusal] = useState<string | null>(null);
  const [pending, setPending] = useState<'attended' | 'no_show' | null>(null);
  const mark = (outcome: 'attended' | 'no_show') => {
    setRefusal(null);
    setPending(outcome);
    checkIn.mutate({ id: b.id, outcome }, { onError: (err) => setRefusal(errorMessage(err)), onSettled: () => setPending(null) });
  };
  const tap = 'flex min-h-12 items-center justify-center gap-1 rounded-lg border-2 px-2 text-sm font-semibold disabled:opacity-60';
  return (
    <li className="flex flex-wrap items-center gap-x-2 gap-y-1 py-1.5" data-testid={`checkin-student-${b.id}`}>
      <p className="flex min-w-0 flex-1 flex-wrap items-center gap-x-2 gap-y-0.5">
        <span className="text-base font-medium">{b.name}</span>
        {b.waiverOk ? null : <WaiverMissing />}
        {b.status === 'attended' ? <span className="inline-flex items-center gap-1 text-sm font-medium text-ok-700"><UserCheck className="size-4" aria-hidden />Attended</span> : null}
        {b.status === 'no_show' ? <span className="inline-flex items-center gap-1 text-sm font-medium text-stop-700"><CircleX className="size-4" aria-hidden />No-show</span> : null}
      </p>
      {canCheck ? (
        <div className="grid w-56 shrink-0 grid-cols-2 gap-1.5 whitespace-nowrap" role="group" aria-label={`Check in ${b.name}`}>
          <button type="button" aria-label={`Attended: ${b.name}`} aria-pressed={b.status === 'attended'} disabled={checkIn.isPending} aria-busy={pending === 'attended' || undefined} onClick={() => mark('attended')}
            className={`${tap} ${b.status === 'attended' ? 'border-ok-700 bg-ok-700 text-white' : 'border-ok-700 bg-white text-ok-700 hover:bg-ok-50'}`}>
            <UserCheck className="size-4" aria-hidden />Attended
          </button>
          <button type="button" aria-label={`No-show: ${b.name}`} aria-pressed={b.status === 'no_show'} disabled={checkIn.isPending} aria-busy={pending === 'no_show' || undefined} onClick={() => mark('no_show')}
            className={`${tap} ${b.status === 'no_show' ? 'border-stop-700 bg-stop-700 text-white' : 'border-stop-700 bg-white text-stop-700 hover:bg-stop-50'}`}>
            <CircleX className="size-4" aria-hidden />No-show
          </button>
        </div>
      ) : null}
      {refusal ? <p role="alert" className="basis-full rounded-lg bg-stop-50 p-2 text-sm font-medium text-stop-700">{refusal}</p> : null}
    </li>
  );
}
