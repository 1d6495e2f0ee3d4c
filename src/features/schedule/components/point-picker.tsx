import { useEffect, useId } from 'react';
import { keepPreviousData, useQuery } from '@tanstack/react-query';
import { CalendarClock, CircleCheck, OctagonX, Repeat2, UserX } from 'lucide-react';
import type { AvailabilityQuery, PointVerdict } from '../../../../shared/schemas/sessions';
import { scheduleQueries, type Availability } from '../api';
import { Loading } from '../../../components/ui/states';
import { Button } from '../../../components/ui/button';
import { errorMessage } from '../../../lib/api-client';

/**
 * Every point of the room for the class's exact time, each with a checkbox: a point that cannot
 * take the class is greyed with its reasons in words, never left out. A ticked point that turns
 * unbookable can still be unticked.
 */
export function PointPicker({
  query,
  value,
  onChange,
  error,
  note,
  onLoaded,
}: {
  query: AvailabilityQuery | null;
  value: number[];
  onChange: (ids: number[]) => void;
  error?: string;
  note?: string;
  onLoaded?: (a: Availability) => void;
}) {
  const legendId = useId();
  const q = useQuery({ ...scheduleQueries.availability(query ?? ({} as AvailabilityQuery)), enabled: query !== null, placeholderData: keepPreviousData });
  useEffect(() => {
    if (q.data && !q.isPlaceholderData) onLoaded?.(q.data);
  }, [q.data, q.isPlaceholderData, onLoaded]);
  const toggle = (id: number, on: boolean) => onChange(on ? [...value, id] : value.filter((v) => v !== id));
  return (
    <fieldset aria-labelledby={legendId} aria-describedby={error ? `${legendId}-error` : undefined} className="space-y-2">
      <legend id={legendId} className="text-sm font-medium text-ink">Points</legend>
      {note ? <p className="text-xs text-muted">{note}</p> : null}
      {query === null ? (
        <p className="rounded-lg border border-dashed border-line bg-white p-3 text-sm text-muted">Pick the class type, room and time to see the room’s points.</p>
      ) : q.isError ? (
        <div role="alert" className="space-y-2 rounded-lg border border-stop-700/30 bg-stop-50 p-3 text-sm text-stop-700">
          <p>{errorMessage(q.error)}</p>
          {/* type="button": the picker sits inside forms. */}
          <Button type="button" variant="secondary" onClick={() => void q.refetch()}>Try again</Button>
        </div>
      ) : !q.data ? (
        <Loading label="Checking each point for that time…" />
      ) : (
        <>
          {q.data.reasons.length ? (
            <div role="alert" className="rounded-lg border border-stop-700/30 bg-stop-50 p-3 text-sm text-stop-700">
              <ul className="space-y-1">
                {q.data.reasons.map((r) => (
                  <li key={r.code} className="flex items-center gap-2"><UserX className="size-4 shrink-0" aria-hidden />{r.message}</li>
                ))}
              </ul>
            </div>
          ) : null}
          {q.data.points.length === 0 ? (
            <p className="rounded-lg border border-dashed border-line bg-white p-3 text-sm text-muted">This room has no rigging points yet. A rigger adds them on the Rig page.</p>
          ) : (
            <ul className={`divide-y divide-line overflow-hidden rounded-xl border border-line bg-white ${q.isFetching ? 'opacity-70' : ''}`} aria-busy={q.isFetching || undefined}>
              {q.data.points.map((p) => <PointRow key={p.pointId} verdict={p} checked={value.includes(p.pointId)} onToggle={toggle} />)}
            </ul>
          )}
          <p className="text-xs text-muted">{value.length} ticked · {q.data.points.filter((p) => p.bookable).length} of {q.data.points.length} can take this class at this time.</p>
        </>
      )}
      {error ? <p id={`${legendId}-error`} role="alert" className="text-sm text-stop-700">{error}</p> : null}
    </fieldset>
  );
}

function PointRow({ verdict: p, checked, onToggle }: { verdict: PointVerdict; checked: boolean; onToggle: (id: number, on: boolean) => void }) {
  const id = useId();
  const disabled = !p.bookable && !checked;
  return (
    <li className={p.bookable ? '' : 'bg-canvas'}>
      <label htmlFor={id} className={`flex min-h-11 items-start gap-3 px-3 pt-2.5 ${p.reasons.length || p.warnings.length ? 'pb-1' : 'pb-2.5'} ${disabled ? 'cursor-not-allowed' : 'cursor-pointer hover:bg-pine-50'}`}>
        <input
          id={id}
          type="checkbox"
          className="mt-0.5 size-5 shrink-0 accent-pine-700"
          checked={checked}
          disabled={disabled}
          aria-describedby={`${id}-why`}
          onChange={(e) => onToggle(p.pointId, e.target.checked)}
        />
        <span className={`flex min-w-0 flex-1 flex-wrap items-center gap-x-3 gap-y-1 ${p.bookable ? 'font-medium' : 'text-muted'}`}>
          <span className="font-medium">{p.label}</span>
          {p.bookable ? (
            <span className="inline-flex items-center gap-1 text-sm text-ok-700"><CircleCheck className="size-4" aria-hidden />Can take this class</span>
          ) : (
            <span className="inline-flex items-center gap-1 text-sm text-stop-700"><OctagonX className="size-4" aria-hidden />Cannot take this class</span>
          )}
        </span>
      </label>
      {/* Outside the label: opening "more reasons" must not tick or untick the point. */}
      <div id={`${id}-why`} className="pb-2.5 pl-11 pr-3">
        <Reasons reasons={p.reasons} />
        {p.bookable && p.apparatus?.changeover ? (
          <span className="flex items-center gap-1 text-sm text-warn-700"><Repeat2 className="size-4 shrink-0" aria-hidden />Changeover needed: {p.apparatus.kind} {p.apparatus.serial} is mounted on {p.label} before the class</span>
        ) : null}
        {p.warnings.map((w) => (
          <span key={w.code + w.message} className="flex items-center gap-1 text-sm text-warn-700"><CalendarClock className="size-4 shrink-0" aria-hidden />{w.message}</span>
        ))}
      </div>
    </li>
  );
}

/**
 * Why a point cannot take the class: the first reason in words, the rest on demand. The load
 * check's arithmetic comes last, so a point that does not allow the apparatus says that first.
 */
function Reasons({ reasons }: { reasons: PointVerdict['reasons'] }) {
  if (!reasons.length) return null;
  const ordered = [...reasons].sort((a, b) => Number(a.code === 'load_check_failed') - Number(b.code === 'load_check_failed'));
  const [first, ...rest] = ordered;
  return (
    <>
      <span className="block text-sm text-stop-700">{first.message}</span>
      {rest.length ? (
        <details className="text-sm text-stop-700">
          <summary className="cursor-pointer text-muted underline decoration-dotted">{rest.length} more {rest.length === 1 ? 'reason' : 'reasons'}</summary>
          {rest.map((r) => <span key={r.code + r.message} className="block">{r.message}</span>)}
        </details>
      ) : null}
    </>
  );
}
