import { useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { RefreshCw } from 'lucide-react';
import { Caution } from '../../components/ui/caution';
import { EmptyState, ErrorState, Loading } from '../../components/ui/states';
import { formatInZone } from '../../components/ui/zoned-time';
import { useSignedIn } from '../../app/use-me';
import { todayQueries, type TodayPoint } from './api';
import { AllPoints } from './components/all-points';
import { FaultDialog } from './components/fault-dialog';
import { SessionCard } from './components/session-card';

/** The instructor's home on a phone: today's classes, each booked point's status in large type, the pre-use check and fault reports. */
export function TodayPage() {
  const me = useSignedIn();
  const board = useQuery(todayQueries.board());
  const [faultOn, setFaultOn] = useState<TodayPoint | null>(null);
  const mine = me.role === 'instructor';
  const canCheck = me.role === 'instructor' || me.role === 'rigger';

  if (board.isPending) return <Loading label="Loading today’s classes…" />;
  if (board.isError) return <ErrorState error={board.error} retry={() => board.refetch()} />;
  const { sessions, points, timeZone, studioDay } = board.data;
  const live = sessions.filter((s) => !s.cancelled);
  const now = board.dataUpdatedAt;
  // Classes still to come (or running) first, in large type; finished ones fold away below.
  const ahead = sessions.filter((s) => Date.parse(s.endsAt) > now);
  const done = sessions.filter((s) => Date.parse(s.endsAt) <= now);
  const card = (s: (typeof sessions)[number]) => <SessionCard key={s.id} session={s} timeZone={timeZone} showInstructor={!mine} canCheck={canCheck} canInspect={me.role === 'rigger'} now={now} onReportFault={setFaultOn} />;

  return (
    <div className="mx-auto max-w-2xl space-y-3">
      <header>
        <h1 className="text-2xl font-semibold">
          Today <span className="text-lg font-normal text-pine-800">{formatInZone(studioDay, timeZone, 'weekday')}</span>
        </h1>
        <p className="flex flex-wrap items-center gap-x-2 text-sm text-muted">
          <span>{mine ? 'Your classes' : 'Every class'} today · times in {timeZone.replace(/_/g, ' ')}</span>
          <button type="button" onClick={() => board.refetch()} className="inline-flex min-h-11 items-center gap-1 rounded-lg px-2 font-medium text-pine-700 hover:bg-pine-50">
            <RefreshCw className={`size-4 ${board.isFetching ? 'animate-spin' : ''}`} aria-hidden />
            <span className="sr-only">Refresh now ·</span> Updated {formatInZone(new Date(board.dataUpdatedAt).toISOString(), timeZone, 'time')}
          </button>
        </p>
      </header>
      {sessions.length === 0 ? (
        <EmptyState title={mine ? 'You have no classes today' : 'No classes today'}>
          Every point’s status is below, in case you need it.
        </EmptyState>
      ) : (
        <section aria-label="Today’s classes" className="space-y-3">
          {live.length === 0 ? <p className="rounded-xl bg-white p-4 text-muted">Every class today is cancelled.</p> : ahead.length === 0 ? <p className="rounded-xl bg-white p-4 text-muted">{mine ? 'Your classes are over for today.' : 'Today’s classes are over.'}</p> : null}
          {ahead.map(card)}
          {done.length ? (
            <details className="group space-y-3" open={ahead.length === 0}>
              <summary className="flex min-h-12 cursor-pointer items-center rounded-xl px-2 font-medium text-pine-800">Finished earlier today ({done.length})</summary>
              <div className="mt-3 space-y-3">{done.map(card)}</div>
            </details>
          ) : null}
        </section>
      )}
      {/* Once, after the classes: the statuses above are what it qualifies (PRODUCT.md §8). */}
      <Caution />
      <AllPoints points={points} timeZone={timeZone} open={sessions.length === 0} onReportFault={setFaultOn} />
      <FaultDialog point={faultOn} onClose={() => setFaultOn(null)} />
    </div>
  );
}
