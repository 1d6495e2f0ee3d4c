import { useState, type ReactNode } from 'react';
import { useQuery } from '@tanstack/react-query';
import { ArrowLeftRight, Ban, CalendarClock, CircleCheck, Repeat, UserRound } from 'lucide-react';
import { Sheet } from '../../../components/ui/sheet';
import { Button } from '../../../components/ui/button';
import { ErrorState, Loading } from '../../../components/ui/states';
import { scheduleQueries, type Session } from '../api';
import { stateOf } from '../session-state';
import { apparatusLabel, clockRange, longDay, placesText, zoneAbbrev } from '../format';
import { SessionStateBadge } from './session-state-badge';
import { RiskReasons, SessionChangeovers, SessionPoints } from './session-points';
import { SuggestedReplacements } from './suggested-replacements';
import { ChangePointsForm } from './change-points-form';
import { MoveSessionForm } from './move-session-form';
import { ChangeInstructorForm } from './change-instructor-form';
import { CancelSessionForm } from './cancel-session-form';

type Action = 'points' | 'move' | 'instructor' | 'cancel';

/** One class, opened from the calendar or the agenda: what it is, its points' status, and the desk's actions. */
/** `extra` adds a section beneath the points for the open class (its students, from the students feature). */
export type SessionExtra = (session: Session, canEdit: boolean) => ReactNode;

export function SessionDrawer({ id, timeZone, canEdit, onClose, extra }: { id: number | null; timeZone: string; canEdit: boolean; onClose: () => void; extra?: SessionExtra }) {
  const q = useQuery({ ...scheduleQueries.detail(id ?? 0), enabled: id !== null });
  const title = q.data ? q.data.className : 'Class';
  return (
    <Sheet open={id !== null} side="right" onClose={onClose} title={title} description={q.data ? `${longDay(q.data.startsAt, timeZone)}, ${clockRange(q.data.startsAt, q.data.endsAt, timeZone)} (${zoneAbbrev(q.data.startsAt, timeZone)})` : undefined}>
      {id === null ? null : q.isPending ? <Loading label="Loading the class…" /> : q.isError ? <ErrorState error={q.error} retry={() => q.refetch()} /> : (
        <SessionBody key={q.data.id} session={q.data} timeZone={timeZone} canEdit={canEdit} extra={extra} />
      )}
    </Sheet>
  );
}

function SessionBody({ session: s, timeZone, canEdit, extra }: { session: Session; timeZone: string; canEdit: boolean; extra?: SessionExtra }) {
  const [action, setAction] = useState<Action | null>(null);
  // Toasts sit behind the modal drawer, so what just changed is also said here.
  const [flash, setFlash] = useState<string | null>(null);
  const started = new Date(s.startsAt).getTime() <= Date.now();
  const ended = new Date(s.endsAt).getTime() <= Date.now();
  // Once a class has begun it is neither moved nor cancelled (the server answers 409 session_in_past);
  // points can still be swapped and a cover instructor named until it is over.
  const actions: { key: Action; label: string; Icon: typeof Ban }[] = [
    { key: 'points' as const, label: 'Change points', Icon: ArrowLeftRight },
    ...(started ? [] : [{ key: 'move' as const, label: 'Move', Icon: CalendarClock }]),
    { key: 'instructor' as const, label: 'Change instructor', Icon: UserRound },
    ...(started ? [] : [{ key: 'cancel' as const, label: 'Cancel class', Icon: Ban }]),
  ];
  const done = (message?: string) => {
    setAction(null);
    if (message) setFlash(message);
  };
  return (
    <div className="space-y-5">
      <div className="flex flex-wrap items-center gap-3">
        <SessionStateBadge state={stateOf(s)} />
        <span className="text-sm font-medium tabular-nums">{placesText(s.places, s.capacity)}</span>
      </div>
      <dl className="grid grid-cols-[8rem_1fr] gap-x-4 gap-y-2 text-sm">
        <dt className="text-muted">Class</dt>
        <dd>{s.className} · {apparatusLabel(s.apparatus)}</dd>
        <dt className="text-muted">Room</dt>
        <dd>{s.roomName}</dd>
        <dt className="text-muted">Instructor</dt>
        <dd>{s.instructorName}</dd>
        <dt className="text-muted">Places</dt>
        <dd>{s.places} of {s.capacity}: one per booked point that is not blocked, up to the capacity</dd>
        {s.seriesId ? (
          <>
            <dt className="text-muted">Series</dt>
            <dd className="flex items-center gap-1"><Repeat className="size-4" aria-hidden />Part of a repeating series</dd>
          </>
        ) : null}
        {s.cancelled ? (
          <>
            <dt className="text-muted">Cancelled</dt>
            <dd>{s.cancelReason ?? 'No reason given'}</dd>
          </>
        ) : null}
      </dl>
      <div role="status">
        {flash ? (
          <p className="flex items-start gap-2 rounded-xl border border-ok-700/30 bg-ok-50 p-3 text-sm text-ok-700">
            <CircleCheck className="mt-0.5 size-4 shrink-0" aria-hidden /> {flash}
          </p>
        ) : null}
      </div>
      <RiskReasons session={s} />
      <SessionChangeovers session={s} />
      {canEdit && !s.cancelled && !started && s.atRisk ? <SuggestedReplacements session={s} onSwapped={setFlash} onMove={() => { setFlash(null); setAction('move'); }} /> : null}
      <SessionPoints session={s} timeZone={timeZone} />
      {extra?.(s, canEdit)}
      {canEdit ? (
        s.cancelled ? (
          <p className="text-sm text-muted">A cancelled class cannot be changed. Book a new one if it runs after all.</p>
        ) : ended ? (
          <p className="text-sm text-muted">This class is over; it stays as a record.</p>
        ) : (
          <section aria-labelledby="desk-actions" className="space-y-3 border-t border-line pt-4">
            <h3 id="desk-actions" className="font-semibold">Change this class</h3>
            <div className="flex flex-wrap gap-2">
              {actions.map(({ key, label, Icon }) => (
                <Button key={key} type="button" variant="secondary" aria-expanded={action === key} onClick={() => { setFlash(null); setAction(action === key ? null : key); }}
                  className={action === key ? 'border-pine-700 bg-pine-50' : key === 'cancel' ? 'text-stop-700' : ''}>
                  <Icon className="size-4" aria-hidden /> {label}
                </Button>
              ))}
            </div>
            {started ? <p className="text-sm text-muted">The class has started: it can no longer be moved or cancelled. Points and the instructor can still change, checked against the time now.</p> : null}
            <div className="rounded-xl border border-line bg-white p-4" hidden={action === null}>
              {action === 'points' ? <ChangePointsForm session={s} timeZone={timeZone} onDone={done} /> : null}
              {action === 'move' ? <MoveSessionForm session={s} timeZone={timeZone} onDone={done} /> : null}
              {action === 'instructor' ? <ChangeInstructorForm session={s} timeZone={timeZone} onDone={done} /> : null}
              {action === 'cancel' ? <CancelSessionForm session={s} timeZone={timeZone} onDone={done} /> : null}
            </div>
          </section>
        )
      ) : null}
    </div>
  );
}
