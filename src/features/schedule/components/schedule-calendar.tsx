// The only module that imports FullCalendar; it is reached only through the lazily loaded /schedule route.
// First, before FullCalendar's own modules run: see the file.
import './fullcalendar-without-icon-font';
import { useCallback, useEffect, useRef } from 'react';
import FullCalendar from '@fullcalendar/react';
import dayGridPlugin from '@fullcalendar/daygrid';
import timeGridPlugin from '@fullcalendar/timegrid';
import interactionPlugin from '@fullcalendar/interaction';
import enGb from '@fullcalendar/core/locales/en-gb';
import type { DateSelectArg, DatesSetArg, EventClickArg, EventContentArg, EventDropArg, EventInput, EventSourceFuncArg } from '@fullcalendar/core';
import type { EventResizeDoneArg } from '@fullcalendar/interaction';
import type { Session } from '../api';
import { stateLook, stateOf } from '../session-state';
import { clockRange, placesText } from '../format';
import { floatingIso, floatingNow, fromFloating, toFloating } from '../zone';
import './schedule-calendar.css';

export interface VisibleRange {
  from: string;
  to: string;
  title: string;
  view: string;
  /** The studio day the view is on (its first day: the week's Monday, the month's 1st). */
  day: string;
}
export interface MoveRequest {
  session: Session;
  startsAt: string;
  endsAt: string;
  revert: () => void;
}
export interface SlotRequest {
  /** Real instants; `allDay` when a whole day was picked in the month view. */
  startsAt: string;
  endsAt: string;
  allDay: boolean;
}

const narrowScreen = () => typeof window !== 'undefined' && window.matchMedia('(max-width: 639px)').matches;

const hhmm = (h: number) => `${String(h).padStart(2, '0')}:00:00`;

export default function ScheduleCalendar({
  timeZone,
  editable,
  fetchSessions,
  refreshKey,
  hours,
  focus,
  initialDate,
  initialView,
  onRange,
  onLoading,
  onError,
  onOpen,
  onMove,
  onSlot,
}: {
  timeZone: string;
  editable: boolean;
  /** Sessions overlapping [from, to), already narrowed by the filters. */
  fetchSessions: (range: { from: string; to: string }) => Promise<Session[]>;
  /** Changing it re-reads the visible range (after a write). */
  refreshKey: number;
  hours: { min: number; max: number };
  /** An instant to bring into view (after booking a class elsewhere in time). */
  focus: string | null;
  /** From the address: the day and view to open on (a reload keeps the week). */
  initialDate?: string;
  initialView?: string;
  onRange: (r: VisibleRange) => void;
  onLoading: (loading: boolean) => void;
  onError: (err: unknown) => void;
  onOpen: (id: number) => void;
  onMove: (m: MoveRequest) => void;
  onSlot: (s: SlotRequest) => void;
}) {
  const ref = useRef<FullCalendar>(null);
  const first = useRef(true);
  useEffect(() => {
    if (first.current) {
      first.current = false;
      return;
    }
    ref.current?.getApi().refetchEvents();
  }, [refreshKey]);

  useEffect(() => {
    if (focus) ref.current?.getApi().gotoDate(toFloating(focus, timeZone));
  }, [focus, timeZone]);

  const instant = useCallback((d: Date) => fromFloating(d, timeZone).toISOString(), [timeZone]);

  const events = useCallback(
    (info: EventSourceFuncArg) =>
      fetchSessions({ from: instant(info.start), to: instant(info.end) }).then((list) => list.map((s) => toEvent(s, timeZone, editable))),
    [fetchSessions, instant, timeZone, editable],
  );

  const moved = (arg: EventDropArg | EventResizeDoneArg) => {
    const session = arg.event.extendedProps.session as Session;
    const start = arg.event.start;
    if (!start) return arg.revert();
    const length = new Date(session.endsAt).getTime() - new Date(session.startsAt).getTime();
    const end = arg.event.end ?? new Date(start.getTime() + length);
    onMove({ session, startsAt: instant(start), endsAt: instant(end), revert: arg.revert });
  };

  return (
    <div className="loftwise-calendar rounded-xl border border-line bg-white p-3">
      <FullCalendar
        ref={ref}
        plugins={[dayGridPlugin, timeGridPlugin, interactionPlugin]}
        locale={enGb}
        timeZone="UTC"
        now={() => floatingNow(timeZone)}
        // Seven columns do not fit a phone: it opens on the day, and the agenda lists it in full.
        initialView={initialView ?? (narrowScreen() ? 'timeGridDay' : 'timeGridWeek')}
        initialDate={initialDate}
        headerToolbar={{ left: 'prev,next today', center: 'title', right: 'dayGridMonth,timeGridWeek,timeGridDay' }}
        // Text, not FullCalendar's icon font: the app's content security policy serves fonts from 'self' only.
        buttonIcons={false}
        buttonText={{ prev: '‹ Previous', next: 'Next ›', today: 'Today', month: 'Month', week: 'Week', day: 'Day' }}
        height="auto"
        allDaySlot={false}
        nowIndicator
        slotMinTime={hhmm(hours.min)}
        slotMaxTime={hhmm(hours.max)}
        slotDuration="00:30:00"
        slotLabelFormat={{ hour: '2-digit', minute: '2-digit', hour12: false }}
        eventTimeFormat={{ hour: '2-digit', minute: '2-digit', hour12: false }}
        views={{
          // A month's column headers name only the weekday; week and day columns carry their date.
          dayGridMonth: { dayHeaderFormat: { weekday: 'short' } },
          timeGrid: { dayHeaderFormat: { weekday: 'short', day: 'numeric', month: 'short' } },
        }}
        slotEventOverlap={false}
        // Beyond three classes at once a "+ more" link opens the rest, rather than slivers.
        eventMaxStack={3}
        eventDisplay="block"
        dayMaxEvents={4}
        events={events}
        eventContent={renderEvent}
        eventClick={(arg: EventClickArg) => {
          arg.jsEvent.preventDefault();
          onOpen(Number(arg.event.id));
        }}
        loading={onLoading}
        eventSourceFailure={onError}
        datesSet={(arg: DatesSetArg) => onRange({ from: instant(arg.start), to: instant(arg.end), title: arg.view.title, view: arg.view.type, day: arg.view.currentStart.toISOString().slice(0, 10) })}
        editable={editable}
        eventAllow={(span) => span.start.getTime() > floatingNow(timeZone).getTime()}
        eventDrop={moved}
        eventResize={moved}
        selectable={editable}
        selectMirror
        selectAllow={(span) => span.end.getTime() > floatingNow(timeZone).getTime()}
        select={(arg: DateSelectArg) => {
          onSlot({ startsAt: instant(arg.start), endsAt: instant(arg.end), allDay: arg.allDay });
          arg.view.calendar.unselect();
        }}
      />
    </div>
  );
}

function toEvent(s: Session, timeZone: string, editable: boolean): EventInput {
  const look = stateLook[stateOf(s)].event;
  const live = !s.cancelled && new Date(s.startsAt).getTime() > Date.now();
  return {
    id: String(s.id),
    title: s.className,
    start: floatingIso(s.startsAt, timeZone),
    end: floatingIso(s.endsAt, timeZone),
    backgroundColor: look.bg,
    borderColor: look.border,
    textColor: look.text,
    startEditable: editable && live,
    durationEditable: editable && live,
    extendedProps: { session: s, timeZone },
  };
}

function renderEvent(arg: EventContentArg) {
  const s = arg.event.extendedProps.session as Session | undefined;
  // The mirror drawn while selecting empty time has no session behind it.
  if (!s) return <span className="px-1 text-xs font-medium">New class · {arg.timeText}</span>;
  const timeZone = arg.event.extendedProps.timeZone as string;
  const state = stateOf(s);
  const { Icon, label } = stateLook[state];
  const risk = s.atRisk ? s.riskReasons[0]?.message : undefined;
  if (arg.view.type === 'dayGridMonth') {
    return (
      <div className="flex min-w-0 items-center gap-1 overflow-hidden px-1 text-xs" title={`${s.className} · ${label} · ${placesText(s.places, s.capacity)}${risk ? ` · ${risk}` : ''}`}>
        <Icon className="size-3.5 shrink-0" aria-hidden />
        <span className="shrink-0 tabular-nums">{arg.timeText}</span>
        <span className={`truncate font-medium ${s.cancelled ? 'line-through' : ''}`}>{s.className}</span>
        <span className="sr-only">, {label}, {placesText(s.places, s.capacity)}</span>
      </div>
    );
  }
  // Each line truncates rather than wraps: a 60-minute class keeps room and instructor in view,
  // and classes side by side stay readable line by line; the full text is in the tooltip.
  const full = [label, s.className, clockRange(s.startsAt, s.endsAt, timeZone), `${s.roomName} · ${s.instructorName}`, placesText(s.places, s.capacity), risk].filter(Boolean).join('\n');
  const line = 'block truncate';
  return (
    <div className="flex h-full flex-col overflow-hidden px-1 py-0.5 text-xs leading-tight" title={full}>
      <span className="flex min-w-0 items-center gap-1 font-semibold">
        <Icon className="size-3.5 shrink-0" aria-hidden />
        <span className="truncate">{label} · <span className="tabular-nums">{clockRange(s.startsAt, s.endsAt, timeZone)}</span></span>
      </span>
      <span className={`${line} font-medium ${s.cancelled ? 'line-through' : ''}`}>{s.className}</span>
      <span className={line}>{s.roomName} · {s.instructorName}</span>
      <span className={`${line} tabular-nums`}>{placesText(s.places, s.capacity)}</span>
      {risk ? <span className={`${line} font-medium`}>{risk}</span> : null}
    </div>
  );
}
