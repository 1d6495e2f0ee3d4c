import { useQuery } from '@tanstack/react-query';
import { CalendarClock, ChevronRight, CircleCheck, Clock, OctagonX, TriangleAlert } from 'lucide-react';
import type { Point } from '../../../../shared/schemas/rig';
import { EmptyState, ErrorState, Loading } from '../../../components/ui/states';
import { formatInZone } from '../../../components/ui/zoned-time';
import { inspectionQueries } from '../api';
import { byUrgency, urgencyOf, urgencyText, type Urgency } from '../labels';

const icon: Record<Urgency, typeof Clock> = { lapsed: CalendarClock, awaiting: Clock, faulted: TriangleAlert, blocked: OctagonX, expiring: Clock, cleared: CircleCheck };
const tone: Record<Urgency, string> = { lapsed: 'text-stop-700', awaiting: 'text-stop-700', faulted: 'text-stop-700', blocked: 'text-stop-700', expiring: 'text-warn-700', cleared: 'text-ok-700' };

/** A rigger's round: every point, the most urgent first (lapsed, awaiting clearance, faulted, expiring). */
export function PointsToInspect({ selected, timeZone, onSelect }: { selected?: number; timeZone: string; onSelect: (p: Point) => void }) {
  const points = useQuery(inspectionQueries.points());
  if (points.isPending) return <Loading label="Loading points…" />;
  if (points.isError) return <ErrorState error={points.error} retry={() => points.refetch()} />;
  if (points.data.length === 0) return <EmptyState title="No rigging points yet">Add rooms and points on the Rig page first.</EmptyState>;
  const sorted = [...points.data].sort(byUrgency);
  const due = sorted.filter((p) => urgencyOf(p) !== 'cleared');
  const fine = sorted.filter((p) => urgencyOf(p) === 'cleared');
  const row = (p: Point) => {
    const u = urgencyOf(p);
    const Icon = icon[u];
    const active = p.id === selected;
    return (
      <li key={p.id}>
        <button
          type="button"
          onClick={() => onSelect(p)}
          aria-current={active ? 'true' : undefined}
          className={`flex min-h-12 w-full items-center gap-3 rounded-lg border px-3 py-2 text-left ${active ? 'border-pine-700 bg-pine-50' : 'border-line bg-white hover:bg-pine-50'}`}
        >
          <Icon className={`size-5 shrink-0 ${tone[u]}`} aria-hidden />
          <span className="min-w-0 flex-1">
            <span className="block font-semibold">{p.label} <span className="font-normal text-muted">· {p.roomName}</span></span>
            <span className={`block text-sm ${tone[u]}`}>
              {urgencyText[u]}
              {p.status.clearedUntil && (u === 'expiring' || u === 'cleared') ? ` · until ${formatInZone(p.status.clearedUntil, timeZone, 'day')}` : ''}
            </span>
            {u === 'blocked' || u === 'faulted' ? <span className="block truncate text-xs text-muted" title={p.status.reasons[0]?.message}>{(p.status.reasons.find((r) => r.code === 'fault_open') ?? p.status.reasons[0])?.message}</span> : null}
          </span>
          <ChevronRight className="size-5 shrink-0 text-muted" aria-hidden />
          <span className="sr-only">Inspect {p.label}</span>
        </button>
      </li>
    );
  };
  return (
    <div className="space-y-3">
      {due.length ? <ul className="space-y-2" aria-label="Points that need a rigger">{due.map(row)}</ul> : <p className="flex items-center gap-2 rounded-lg bg-ok-50 p-3 text-ok-700"><CircleCheck className="size-5" aria-hidden /> Every point is cleared and none expires within the warning window.</p>}
      {fine.length ? (
        <details className="rounded-lg border border-line bg-white" open={due.length === 0}>
          <summary className="flex min-h-11 cursor-pointer items-center px-3 font-medium">Cleared ({fine.length})</summary>
          <ul className="space-y-2 p-2">{fine.map(row)}</ul>
        </details>
      ) : null}
    </div>
  );
}
