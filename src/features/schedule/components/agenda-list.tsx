import type { Session } from '../api';
import { stateOf } from '../session-state';
import { clockRange, longDay, placesText } from '../format';
import { wallParts } from '../zone';
import { EmptyState, ErrorState, Loading } from '../../../components/ui/states';
import { SessionStateBadge } from './session-state-badge';

/** The visible range as a plain list: every class a button, reachable by keyboard. */
export function AgendaList({
  sessions,
  isPending,
  error,
  retry,
  timeZone,
  onOpen,
  rangeLabel,
}: {
  sessions: Session[] | undefined;
  isPending: boolean;
  error: unknown;
  retry: () => void;
  timeZone: string;
  onOpen: (id: number) => void;
  rangeLabel: string;
}) {
  return (
    <section aria-labelledby="agenda-title" className="space-y-3">
      <h2 id="agenda-title" tabIndex={-1} className="text-lg font-semibold focus:outline-none">
        Agenda <span className="text-sm font-normal text-muted">· {rangeLabel}</span>
      </h2>
      {error ? <ErrorState error={error} retry={retry} /> : isPending || !sessions ? <Loading label="Loading classes…" /> : sessions.length === 0 ? (
        <EmptyState title="No classes in this range">Pick another week or month, or clear the filters.</EmptyState>
      ) : (
        <AgendaDays sessions={sessions} timeZone={timeZone} onOpen={onOpen} />
      )}
    </section>
  );
}

function AgendaDays({ sessions, timeZone, onOpen }: { sessions: Session[]; timeZone: string; onOpen: (id: number) => void }) {
  const days = new Map<string, Session[]>();
  for (const s of [...sessions].sort((a, b) => a.startsAt.localeCompare(b.startsAt))) {
    const day = wallParts(s.startsAt, timeZone).date;
    days.set(day, [...(days.get(day) ?? []), s]);
  }
  return (
    <ol className="space-y-4">
      {[...days.entries()].map(([day, list]) => (
        <li key={day}>
          <h3 className="mb-1 text-sm font-semibold text-muted">{longDay(list[0].startsAt, timeZone)}</h3>
          <ul className="overflow-hidden rounded-xl border border-line bg-white">
            {list.map((s) => <AgendaItem key={s.id} session={s} timeZone={timeZone} onOpen={onOpen} />)}
          </ul>
        </li>
      ))}
    </ol>
  );
}

function AgendaItem({ session: s, timeZone, onOpen }: { session: Session; timeZone: string; onOpen: (id: number) => void }) {
  const state = stateOf(s);
  return (
    <li className="border-b border-line last:border-0">
      <button
        type="button"
        onClick={() => onOpen(s.id)}
        className="grid min-h-11 w-full gap-x-4 gap-y-1 px-4 py-3 text-left hover:bg-pine-50 sm:grid-cols-[7rem_1fr_auto] sm:items-center"
      >
        <span className="font-medium tabular-nums">{clockRange(s.startsAt, s.endsAt, timeZone)}</span>
        <span className="min-w-0">
          <span className={`font-medium ${s.cancelled ? 'line-through' : ''}`}>{s.className}</span>
          <span className="text-muted"> · {s.roomName} · {s.instructorName}</span>
          {s.atRisk && s.riskReasons[0] ? <span className="block text-sm text-stop-700">{s.riskReasons[0].message}{s.riskReasons.length > 1 ? ` (+${s.riskReasons.length - 1} more)` : ''}</span> : null}
          {s.cancelled && s.cancelReason ? <span className="block text-sm text-muted">Cancelled: {s.cancelReason}</span> : null}
        </span>
        <span className="flex flex-wrap items-center gap-2">
          <SessionStateBadge state={state} />
          <span className="text-sm tabular-nums text-muted">{placesText(s.places, s.capacity)}</span>
        </span>
      </button>
    </li>
  );
}
