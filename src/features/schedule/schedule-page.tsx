import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { useLocation, useNavigate, useSearchParams } from 'react-router-dom';
import { useQuery, useQueryClient } from '@tanstack/react-query';
import { toast } from 'sonner';
import { CalendarClock, CalendarPlus, X } from 'lucide-react';
import type { Me } from '../../../shared/schemas/staff';
import { studioQueries } from '../settings/api';
import { staffQueries } from '../staff/api';
import { Button } from '../../components/ui/button';
import { ConfirmDialog } from '../../components/ui/confirm';
import { ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { errorMessage } from '../../lib/api-client';
import { conflictOf, scheduleQueries, useScheduleMutations, type CreatedSessions, type Session } from './api';
import { stateOf } from './session-state';
import { whenShort, zoneAbbrev } from './format';
import { toFloating, wallParts } from './zone';
import { useRooms } from './use-schedule-lists';
import ScheduleCalendar, { type MoveRequest, type SlotRequest, type VisibleRange } from './components/schedule-calendar';
import { ScheduleFilters, type ScheduleFilter } from './components/schedule-filters';
import { ScheduleLegend } from './components/schedule-legend';
import { AgendaList } from './components/agenda-list';
import { AtRiskSummary } from './components/at-risk-summary';
import { BookingDialog, type BookingPrefill } from './components/booking-dialog';
import { SessionDrawer, type SessionExtra } from './components/session-drawer';
import { MoveScopeDialog } from './components/move-scope-dialog';
import { ConflictView, refusalLines, refusedCount } from './components/conflict-view';
import { MAIL_NOTE, type Scope } from './components/scope-choice';
import { UNDO_WINDOW_MS } from '../../../shared/schedule/undo';

const DESK = new Set(['reception', 'owner']);

/** The calendar's views as the address names them (`?view=week`). */
const VIEWS = { month: 'dayGridMonth', week: 'timeGridWeek', day: 'timeGridDay' } as const;
type ViewName = keyof typeof VIEWS;
const viewName = (type: string) => (Object.keys(VIEWS) as ViewName[]).find((k) => VIEWS[k] === type);

/** `?book=2026-12-03T18:00-19:00`: the booking dialog open on that slot (what was typed is not kept). */
function prefillOf(text: string | null): BookingPrefill | null {
  const m = text?.match(/^(\d{4}-\d{2}-\d{2})T(\d{2}:\d{2})(?:-(\d{2}:\d{2}))?$/);
  return m ? { date: m[1], start: m[2], end: m[3] } : null;
}
/** A copy of the search params with some set (a string) or removed (null). */
function edit(prev: URLSearchParams, changes: Record<string, string | null>) {
  const next = new URLSearchParams(prev);
  for (const [k, v] of Object.entries(changes)) if (v === null) next.delete(k); else next.set(k, v);
  return next;
}
const prefillText = (p: BookingPrefill) => `${p.date}T${p.start}${p.end ? `-${p.end}` : ''}`;

export function SchedulePage({ me, sessionExtra }: { me: Me; sessionExtra?: SessionExtra }) {
  const studio = useQuery(studioQueries.detail());
  if (studio.isPending) return <Loading label="Loading the schedule…" />;
  if (studio.isError) return <ErrorState error={studio.error} retry={() => studio.refetch()} />;
  return <ScheduleBoard me={me} timeZone={studio.data.policy.timeZone} sessionExtra={sessionExtra} />;
}

function ScheduleBoard({ me, timeZone, sessionExtra }: { me: Me; timeZone: string; sessionExtra?: SessionExtra }) {
  const canEdit = DESK.has(me.role);
  const qc = useQueryClient();
  const { update } = useScheduleMutations();
  const rooms = useRooms();
  // Every role may read the active instructors (the staff list itself is the desk's only).
  const instructors = useQuery(staffQueries.instructors());
  const [filter, setFilter] = useState<ScheduleFilter>({});
  const [range, setRange] = useState<VisibleRange | null>(null);
  const [calendarBusy, setCalendarBusy] = useState(false);
  const [calendarError, setCalendarError] = useState<unknown>(null);
  // The week, the view, the open class and the open booking dialog live in the address, so a
  // reload keeps them; a drawer or dialog opened here is a history entry, so Back closes it.
  const [params, setParams] = useSearchParams();
  const location = useLocation();
  const navigate = useNavigate();
  const layered = Boolean((location.state as { layer?: boolean } | null)?.layer);
  const openLayer = (key: string, value: string) =>
    setParams((prev) => edit(prev, { [key]: value }), { replace: layered, state: { layer: true } });
  const closeLayer = (key: string) => {
    if (layered) navigate(-1);
    else setParams((prev) => edit(prev, { [key]: null }), { replace: true });
  };
  const openId = Number(params.get('class')) || null;
  // Focus goes back to what opened the class when its drawer closes, by whatever way (Escape, Back).
  const opener = useRef<HTMLElement | null>(null);
  const setOpenId = (id: number | null) => {
    if (id !== null && document.activeElement instanceof HTMLElement) opener.current = document.activeElement;
    return id === null ? closeLayer('class') : openLayer('class', String(id));
  };
  useEffect(() => {
    if (openId !== null || !opener.current) return;
    const el = opener.current;
    opener.current = null;
    requestAnimationFrame(() => { if (el.isConnected) el.focus(); });
  }, [openId]);
  const initial = useRef({ date: /^\d{4}-\d{2}-\d{2}$/.test(params.get('date') ?? '') ? params.get('date')! : undefined, view: VIEWS[params.get('view') as ViewName] as string | undefined });
  const onRange = (r: VisibleRange) => {
    setRange(r);
    const view = viewName(r.view);
    if (params.get('date') !== r.day || params.get('view') !== view)
      setParams((prev) => edit(prev, { date: r.day, view: view ?? null }), { replace: true, state: location.state });
  };

  // The booking form stays mounted while its address entry comes and goes (Back asks first).
  const bookParam = params.get('book');
  const [booking, setBookingState] = useState<BookingPrefill | null>(() => prefillOf(bookParam));
  const bookingDirty = useRef(false);
  const discardOk = useRef(false);
  const [askDiscard, setAskDiscard] = useState(false);
  const onBookingDirty = useCallback((d: boolean) => { bookingDirty.current = d; }, []);
  const setBooking = (p: BookingPrefill | null) => {
    if (p) return openLayer('book', prefillText(p));
    discardOk.current = true;
    closeLayer('book');
  };
  const requestCloseBooking = () => (bookingDirty.current ? setAskDiscard(true) : setBooking(null));
  useEffect(() => {
    if (bookParam) {
      discardOk.current = false;
      setBookingState((cur) => cur ?? prefillOf(bookParam));
      return;
    }
    if (!booking) return;
    if (bookingDirty.current && !discardOk.current) {
      // Back pressed with typed data: put the entry back and ask.
      setParams((prev) => edit(prev, { book: prefillText(booking) }), { state: { layer: true } });
      setAskDiscard(true);
      return;
    }
    setBookingState(null);
  }, [bookParam]); // eslint-disable-line react-hooks/exhaustive-deps
  // A reload or closing the tab with typed data asks too.
  useEffect(() => {
    if (!booking) return;
    const warn = (e: BeforeUnloadEvent) => {
      if (bookingDirty.current) e.preventDefault();
    };
    window.addEventListener('beforeunload', warn);
    return () => window.removeEventListener('beforeunload', warn);
  }, [booking]);
  const [pendingMove, setPendingMove] = useState<MoveRequest | null>(null);
  const [notice, setNotice] = useState<{ title: string; lines: string[] } | null>(null);
  const [bookedNotes, setBookedNotes] = useState<{ title: string; lines: string[] } | null>(null);
  const [focus, setFocus] = useState<string | null>(null);

  const matches = useCallback((s: Session) => !filter.state || stateOf(s) === filter.state, [filter.state]);
  const { roomId, instructorId } = filter;
  // The calendar and the agenda read the same query keys, so one request serves both.
  const fetchSessions = useCallback(
    (r: { from: string; to: string }) =>
      qc.fetchQuery(scheduleQueries.range({ ...r, roomId, instructorId })).then(
        (list) => {
          setCalendarError(null);
          return list.filter(matches);
        },
      ),
    [qc, roomId, instructorId, matches],
  );
  const visible = useQuery({ ...scheduleQueries.range({ from: range?.from ?? '', to: range?.to ?? '', roomId, instructorId }), enabled: range !== null });
  const shown = visible.data?.filter(matches);

  const hours = useMemo(() => {
    let min = 8;
    let max = 21;
    for (const s of visible.data ?? []) {
      const a = toFloating(s.startsAt, timeZone);
      const b = toFloating(s.endsAt, timeZone);
      min = Math.min(min, a.getUTCHours());
      max = Math.max(max, b.getUTCDate() !== a.getUTCDate() ? 24 : b.getUTCHours() + (b.getUTCMinutes() ? 1 : 0));
    }
    return { min, max: Math.min(24, max) };
  }, [visible.data, timeZone]);

  const move = (m: MoveRequest, scope: Scope) => {
    setNotice(null);
    const before = { startsAt: m.session.startsAt, endsAt: m.session.endsAt };
    update.mutate(
      { id: m.session.id, startsAt: m.startsAt, endsAt: m.endsAt, scope },
      {
        onSuccess: (s) =>
          toast.success(`${s.className} now runs ${whenShort(s.startsAt, s.endsAt, timeZone)}${scope === 'following' ? ', and the following classes move with it' : ''}.`, {
            // Undo stays on offer for the whole window the instructor's e-mail waits out.
            description: `${MAIL_NOTE} Undo within ${UNDO_WINDOW_MS / 1000} seconds and nothing is sent.`,
            duration: UNDO_WINDOW_MS,
            action: { label: 'Undo', onClick: () => update.mutate({ id: s.id, ...before, scope }, { onError: (err) => toast.error(errorMessage(err)) }) },
          }),
        onError: (err) => {
          m.revert();
          const c = conflictOf(err);
          if (c) {
            const count = refusedCount(c);
            const title = `${m.session.className} was not moved to ${whenShort(m.startsAt, m.endsAt, timeZone)}${count ? `: ${count} cannot run then. Nothing was moved` : ''}.`;
            const refused = { title, lines: refusalLines(c, (id) => m.session.points.find((p) => p.pointId === id)?.label, timeZone) };
            setNotice(refused);
            // The notice sits above the calendar, maybe out of view: say it where the eye is too.
            toast.error(refused.title, { description: refused.lines.join(' · '), duration: 10_000 });
          } else toast.error(`${m.session.className} was not moved: ${errorMessage(err)}`);
        },
      },
    );
  };

  const onSlot = (slot: SlotRequest) => {
    const from = wallParts(slot.startsAt, timeZone);
    setBooking(slot.allDay ? { date: from.date, start: '18:00' } : { date: from.date, start: from.time, end: wallParts(slot.endsAt, timeZone).time });
  };

  const onBooked = (created: CreatedSessions) => {
    setBooking(null);
    // The drawer is not opened here: "Open" below does, as its own history entry.
    setFocus(created.startsAt);
    const n = created.sessionIds.length;
    const warnings = [...new Set(created.warnings.map((w) => w.message))];
    const skipped = created.skipped.length ? [`${created.skipped.length} ${created.skipped.length === 1 ? 'class was' : 'classes were'} left out as they could not be booked.`] : [];
    // Warnings stay on the page until dismissed: a toast that fades took them with it.
    setBookedNotes(warnings.length || skipped.length ? { title: `Booked ${created.className}${n > 1 ? ` (${n} classes)` : ''}: please note`, lines: [...warnings, ...skipped] } : null);
    toast.success(`Booked ${created.className}, ${whenShort(created.startsAt, created.endsAt, timeZone)}${n > 1 ? `, and ${n - 1} more` : ''}.`, {
      description: [...warnings, ...skipped].join(' ') || undefined,
      duration: warnings.length || skipped.length ? 12_000 : 6_000,
      action: { label: 'Open', onClick: () => openLayer('class', String(created.id)) },
    });
  };

  return (
    <div className="space-y-5">
      <PageHeader
        title="Schedule"
        actions={canEdit ? <Button onClick={() => setBooking({ date: wallParts(new Date(), timeZone).date, start: '18:00' })}><CalendarPlus className="size-4" aria-hidden /> Book a class</Button> : null}
      >
        Classes booked onto rigging points. Times are the studio’s: {timeZone} ({zoneAbbrev(new Date().toISOString(), timeZone)}).
      </PageHeader>
      <ScheduleFilters value={filter} onChange={setFilter} rooms={rooms.data ?? []} instructors={instructors} />
      {visible.data ? <AtRiskSummary sessions={visible.data} timeZone={timeZone} onOpen={setOpenId} /> : null}
      {bookedNotes ? (
        <section aria-label="Notes on the class just booked" className="space-y-2 rounded-xl border border-warn-700/30 bg-warn-50 p-4 text-sm text-warn-700">
          <h2 className="flex items-center gap-2 font-semibold"><CalendarClock className="size-4" aria-hidden />{bookedNotes.title}</h2>
          <ul className="list-disc space-y-1 pl-5">{bookedNotes.lines.map((l) => <li key={l}>{l}</li>)}</ul>
          <Button variant="secondary" onClick={() => setBookedNotes(null)}><X className="size-4" aria-hidden /> Dismiss</Button>
        </section>
      ) : null}
      {notice ? (
        <ConflictView title={notice.title} lines={notice.lines}>
          <Button variant="secondary" onClick={() => setNotice(null)}><X className="size-4" aria-hidden /> Dismiss</Button>
        </ConflictView>
      ) : null}
      {calendarError ? <ErrorState error={calendarError} retry={() => { setCalendarError(null); void visible.refetch(); }} /> : null}
      <div className="relative">
        <a
          href="#agenda-title"
          // Focus the agenda without a #fragment history entry: Back closes drawers by history, and a
          // fragment entry would pull focus to the heading on the way back.
          onClick={(e) => {
            e.preventDefault();
            document.getElementById('agenda-title')?.focus();
          }}
          className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:-top-2 focus:z-10 focus:rounded focus:bg-white focus:p-2">Skip the calendar to the agenda list</a>
        <div className="mb-2 flex flex-wrap items-center justify-between gap-2 text-sm text-muted">
          <p>{canEdit ? 'Drag a class to move it, drag its lower edge to change its length, or select empty time to book. Open a class for its points.' : 'Open a class to see its points and their status.'}</p>
          <p role="status">{calendarBusy ? 'Loading classes…' : ''}</p>
        </div>
        <ScheduleCalendar
          timeZone={timeZone}
          editable={canEdit}
          fetchSessions={fetchSessions}
          refreshKey={visible.dataUpdatedAt}
          hours={hours}
          focus={focus}
          initialDate={initial.current.date}
          initialView={initial.current.view}
          onRange={onRange}
          onLoading={setCalendarBusy}
          onError={setCalendarError}
          onOpen={setOpenId}
          onMove={(m) => (m.session.seriesId ? setPendingMove(m) : move(m, 'this'))}
          onSlot={onSlot}
        />
      </div>
      <ScheduleLegend />
      <AgendaList sessions={shown} isPending={visible.isPending} error={visible.error} retry={() => visible.refetch()} timeZone={timeZone} onOpen={setOpenId} rangeLabel={range?.title ?? ''} />
      <SessionDrawer id={openId} timeZone={timeZone} canEdit={canEdit} onClose={() => setOpenId(null)} extra={sessionExtra} />
      {canEdit ? <BookingDialog prefill={booking} timeZone={timeZone} onClose={requestCloseBooking} onBooked={onBooked} onDirty={onBookingDirty} /> : null}
      <ConfirmDialog
        open={askDiscard}
        title="Discard this booking?"
        confirmLabel="Discard what I typed"
        cancelLabel="Keep editing"
        onCancel={() => setAskDiscard(false)}
        onConfirm={() => { setAskDiscard(false); setBooking(null); }}
      >
        Nothing is booked yet. Closing the form throws away the class, instructor, room and points you picked.
      </ConfirmDialog>
      <MoveScopeDialog
        move={pendingMove}
        timeZone={timeZone}
        onDismiss={() => { pendingMove?.revert(); setPendingMove(null); }}
        onChoose={(scope) => { if (pendingMove) move(pendingMove, scope); setPendingMove(null); }}
      />
    </div>
  );
}
