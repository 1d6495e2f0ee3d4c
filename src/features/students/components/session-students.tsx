import { useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { Link } from 'react-router-dom';
import { ArrowRightLeft, CircleCheck, FileWarning, TriangleAlert, UserPlus, X } from 'lucide-react';
import type { Session } from '../../../../shared/schemas/sessions';
import type { PlaceStatus } from '../../../../shared/schemas/vocabulary';
import { Button } from '../../../components/ui/button';
import { ConfirmDialog } from '../../../components/ui/confirm';
import { ErrorState, Loading } from '../../../components/ui/states';
import { errorMessage } from '../../../lib/api-client';
import { paths } from '../../../lib/paths';
import { studentsQueries, usePlaceMutations, type ClassPlaces, type SessionBooking } from '../api';
import { PlaceBadge, WaiverMissing } from './badges';
import { BookStudentForm } from './book-student-form';

/** Statuses that hold a place on a point. */
const HOLDS: readonly PlaceStatus[] = ['booked', 'attended', 'no_show'];

export interface FreePoint {
  pointId: number;
  label: string;
  free: number;
}

/** Points of the class that can take it now and have a free place, with how many (a move needs no more). */
export function freePoints(session: Pick<Session, 'points'>, places: ClassPlaces, bookings: SessionBooking[]): FreePoint[] {
  return session.points
    .map((p) => {
      const per = places.pointStudents.find((x) => x.pointId === p.pointId);
      const taken = bookings.filter((b) => b.pointId === p.pointId && HOLDS.includes(b.status)).length;
      return { pointId: p.pointId, label: p.label, free: per?.usable ? Math.max(0, per.places - taken) : 0 };
    })
    .filter((p) => p.free > 0);
}

/**
 * The students of one class in the session drawer: each point with the students on it, the
 * places left, the waitlist in order and those without a fit place (moved in one action). The
 * desk books and cancels here.
 */
export function SessionStudents({ session, canEdit }: { session: Session; canEdit: boolean }) {
  const bookings = useQuery(studentsQueries.sessionBookings(session.id));
  const places = useQuery(studentsQueries.sessionPlaces(session.id));
  const [booking, setBooking] = useState(false);
  const [flash, setFlash] = useState<{ tone: 'ok' | 'warn' | 'error'; text: string; lines?: string[] } | null>(null);
  const [cancelling, setCancelling] = useState<SessionBooking | null>(null);
  const { cancel, move } = usePlaceMutations();
  const started = new Date(session.startsAt).getTime() <= Date.now();
  const open = canEdit && !session.cancelled && !started;

  let body;
  if (bookings.isPending || places.isPending) body = <Loading label="Loading the students…" />;
  else if (bookings.isError) body = <ErrorState error={bookings.error} retry={() => bookings.refetch()} />;
  else if (places.isError) body = <ErrorState error={places.error} retry={() => places.refetch()} />;
  else {
    const list = bookings.data;
    const p = places.data;
    const free = freePoints(session, p, list);
    const waitlist = list.filter((b) => b.status === 'waitlisted').sort((a, b) => (a.position ?? 0) - (b.position ?? 0));
    const lost = list.filter((b) => b.withoutFitPlace && b.status !== 'cancelled');
    const noWaiver = list.filter((b) => !b.waiverOk && (b.status === 'booked' || b.status === 'waitlisted'));
    const pointOf = (id: number | null) => session.points.find((x) => x.pointId === id)?.label;
    const row = (b: SessionBooking, extra?: React.ReactNode) => (
      <li key={b.id} className="flex flex-wrap items-center justify-between gap-2 py-1.5" data-testid={`booking-${b.id}`}>
        <span className="flex flex-wrap items-center gap-2">
          {extra}
          <Link to={paths.student(b.studentId)} className="inline-flex min-h-11 items-center font-medium text-pine-700 underline-offset-2 hover:underline">{b.name}</Link>
          {b.status !== 'booked' && b.status !== 'waitlisted' ? <PlaceBadge status={b.status} /> : null}
          {b.waiverOk ? null : <WaiverMissing />}
        </span>
        {open && (b.status === 'booked' || b.status === 'waitlisted') ? (
          <Button variant="ghost" className="text-stop-700" onClick={() => { setFlash(null); setCancelling(b); }}>
            <X className="size-4" aria-hidden /> Cancel<span className="sr-only"> {b.name}’s {b.status === 'waitlisted' ? 'waitlist place' : 'place'}</span>
          </Button>
        ) : null}
      </li>
    );
    body = (
      <div className="space-y-4">
        <p className="flex flex-wrap gap-x-4 gap-y-1 text-sm font-medium tabular-nums" data-testid="places-summary">
          <span>{p.booked} booked</span>
          <span>{p.placesLeft === 0 ? 'Full' : `${p.placesLeft} ${p.placesLeft === 1 ? 'place' : 'places'} left`}</span>
          <span>{p.waitlisted} on the waitlist</span>
        </p>
        {noWaiver.length ? (
          <p role="note" className="flex items-start gap-2 rounded-xl border border-warn-700/30 bg-warn-50 p-3 text-sm text-warn-700">
            <FileWarning className="mt-0.5 size-4 shrink-0" aria-hidden />
            <span>Without a valid waiver: {noWaiver.map((b) => b.name).join(', ')}. They cannot be checked in until one is recorded on their page.</span>
          </p>
        ) : null}
        {lost.length ? (
          <section aria-labelledby={`lost-${session.id}`} className="rounded-xl border border-stop-700/30 bg-stop-50 p-3 text-stop-700">
            <h4 id={`lost-${session.id}`} className="flex items-center gap-2 font-semibold"><TriangleAlert className="size-4" aria-hidden />Without a fit place ({lost.length})</h4>
            <p className="mt-1 text-sm">Their point cannot take this class now. Move each to a free place, or swap the point.</p>
            <ul className="mt-2 space-y-2">
              {lost.map((b) => <LostStudent key={b.id} booking={b} was={pointOf(b.pointId)} free={free} canMove={open} onMoved={(text) => setFlash({ tone: 'ok', text })} onError={(text) => setFlash({ tone: 'error', text })} busy={move.isPending} move={move.mutate} />)}
            </ul>
          </section>
        ) : null}
        <ul className="space-y-2" aria-label="Students on each point">
          {session.points.map((pt) => {
            const on = list.filter((b) => b.pointId === pt.pointId && HOLDS.includes(b.status) && !b.withoutFitPlace);
            const per = p.pointStudents.find((x) => x.pointId === pt.pointId);
            const placesOn = per?.usable ? per.places : 0;
            return (
              <li key={pt.pointId} className="rounded-xl border border-line bg-white px-4 py-2" data-testid={`point-students-${pt.pointId}`}>
                <h4 className="flex flex-wrap items-baseline justify-between gap-2 pt-1">
                  <span className="font-medium">Point {pt.label}</span>
                  <span className="text-sm text-muted">{placesOn === 0 ? 'Takes no one now' : `${on.length} of ${placesOn} ${placesOn === 1 ? 'place' : 'places'} taken`}</span>
                </h4>
                {on.length ? <ul className="divide-y divide-line">{on.map((b) => row(b))}</ul> : <p className="py-2 text-sm text-muted">No one on this point.</p>}
              </li>
            );
          })}
        </ul>
        <section aria-labelledby={`waitlist-${session.id}`}>
          <h4 id={`waitlist-${session.id}`} className="font-medium">Waitlist</h4>
          {waitlist.length === 0 ? <p className="text-sm text-muted">No one is waiting.</p> : (
            <ol className="divide-y divide-line rounded-xl border border-line bg-white px-4" aria-label="Waitlist in order">
              {waitlist.map((b, i) => row(b, <span className="w-6 text-sm tabular-nums text-muted">{b.position ?? i + 1}.</span>))}
            </ol>
          )}
          <p className="mt-1 text-xs text-muted">When a place frees up, the first on the waitlist gets it and an e-mail.</p>
        </section>
        {open ? (
          booking ? (
            <BookStudentForm
              session={session}
              free={p.placesLeft > 0 ? free : []}
              onClose={() => setBooking(false)}
              onBooked={(text, lines, tone) => { setBooking(false); setFlash({ tone, text, lines }); }}
            />
          ) : (
            <Button variant="secondary" onClick={() => { setFlash(null); setBooking(true); }}><UserPlus className="size-4" aria-hidden /> Book a student</Button>
          )
        ) : canEdit && started && !session.cancelled ? <p className="text-sm text-muted">The class has started: students are checked in from Today.</p> : null}
      </div>
    );
  }

  return (
    <section aria-labelledby={`students-${session.id}`} className="space-y-3 border-t border-line pt-4">
      <h3 id={`students-${session.id}`} className="font-semibold">Students</h3>
      <div role="status">
        {flash ? (
          <div className={`flex items-start gap-2 rounded-xl border p-3 text-sm ${flash.tone === 'ok' ? 'border-ok-700/30 bg-ok-50 text-ok-700' : flash.tone === 'warn' ? 'border-warn-700/30 bg-warn-50 text-warn-700' : 'border-stop-700/30 bg-stop-50 text-stop-700'}`}>
            {flash.tone === 'ok' ? <CircleCheck className="mt-0.5 size-4 shrink-0" aria-hidden /> : <TriangleAlert className="mt-0.5 size-4 shrink-0" aria-hidden />}
            <div>
              <p>{flash.text}</p>
              {flash.lines?.length ? <ul className="mt-1 list-disc pl-5">{flash.lines.map((l) => <li key={l}>{l}</li>)}</ul> : null}
            </div>
          </div>
        ) : null}
      </div>
      {body}
      <ConfirmDialog
        open={cancelling !== null}
        title={cancelling ? `Cancel ${cancelling.name}’s ${cancelling.status === 'waitlisted' ? 'waitlist place' : 'place'}?` : 'Cancel?'}
        confirmLabel="Cancel the place"
        cancelLabel="Keep it"
        busy={cancel.isPending}
        onCancel={() => setCancelling(null)}
        onConfirm={() => {
          const b = cancelling;
          if (!b) return;
          cancel.mutate(b.id, {
            onSuccess: () => { setCancelling(null); setFlash({ tone: 'ok', text: `Cancelled ${b.name}’s ${b.status === 'waitlisted' ? 'waitlist place' : 'place'}.${b.status === 'booked' ? ' If anyone was waiting, the first on the waitlist now has it and is e-mailed.' : ''}` }); },
            onError: (err) => { setCancelling(null); setFlash({ tone: 'error', text: `Not cancelled: ${errorMessage(err)}` }); },
          });
        }}
      >
        {cancelling?.status === 'booked' ? 'The place goes to the first student on the waitlist, if any, who is e-mailed.' : 'They leave the waitlist.'}
      </ConfirmDialog>
    </section>
  );
}

function LostStudent({ booking: b, was, free, canMove, busy, move, onMoved, onError }: {
  booking: SessionBooking;
  was: string | undefined;
  free: FreePoint[];
  canMove: boolean;
  busy: boolean;
  move: ReturnType<typeof usePlaceMutations>['move']['mutate'];
  onMoved: (text: string) => void;
  onError: (text: string) => void;
}) {
  const [to, setTo] = useState<number | null>(free[0]?.pointId ?? null);
  const target = free.find((f) => f.pointId === to) ?? free[0];
  return (
    <li className="flex flex-wrap items-center gap-2 rounded-lg bg-white p-2 text-ink" data-testid={`without-fit-${b.id}`}>
      <span className="mr-auto">
        <Link to={paths.student(b.studentId)} className="font-medium text-pine-700 underline">{b.name}</Link>
        <span className="text-sm text-muted">{was ? ` · was on ${was}` : ''}</span>
      </span>
      {!canMove ? null : free.length === 0 ? (
        <span className="text-sm text-stop-700">No free place: swap the point or cancel their place.</span>
      ) : (
        <>
          {free.length > 1 ? (
            <>
              <label className="sr-only" htmlFor={`move-to-${b.id}`}>Free place for {b.name}</label>
              <select id={`move-to-${b.id}`} value={target.pointId} onChange={(e) => setTo(Number(e.target.value))} className="min-h-11 rounded-lg border border-line bg-white px-2 text-sm">
                {free.map((f) => <option key={f.pointId} value={f.pointId}>Point {f.label} ({f.free} free)</option>)}
              </select>
            </>
          ) : null}
          <Button
            busy={busy}
            onClick={() => move({ id: b.id, pointId: target.pointId }, { onSuccess: () => onMoved(`${b.name} moved to point ${target.label}.`), onError: (err) => onError(`${b.name} was not moved: ${errorMessage(err)}`) })}
          >
            <ArrowRightLeft className="size-4" aria-hidden /> Move to {target.label}
          </Button>
        </>
      )}
    </li>
  );
}
