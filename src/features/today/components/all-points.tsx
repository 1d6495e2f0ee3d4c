import { ChevronDown, CircleCheck, Clock, TriangleAlert } from 'lucide-react';
import { StatusBadge } from '../../../components/ui/status-badge';
import { formatInZone } from '../../../components/ui/zoned-time';
import type { TodayPoint } from '../api';

const order = { blocked: 0, expiring: 1, cleared: 2 } as const;

/** Every point's status now, blocked first; collapsible under the day's classes. */
export function AllPoints({ points, timeZone, open, onReportFault }: { points: TodayPoint[]; timeZone: string; open: boolean; onReportFault: (p: TodayPoint) => void }) {
  const sorted = [...points].sort((a, b) => order[a.status] - order[b.status] || a.label.localeCompare(b.label, undefined, { numeric: true }));
  const blocked = points.filter((p) => p.status === 'blocked').length;
  return (
    <details open={open} className="group rounded-2xl border border-line bg-white" data-testid="all-points">
      <summary className="flex min-h-12 cursor-pointer list-none items-center justify-between gap-3 rounded-2xl px-4 py-3 [&::-webkit-details-marker]:hidden">
        <span>
          <span className="block text-lg font-semibold">All points</span>
          <span className="block text-sm text-muted">{points.length} point{points.length === 1 ? '' : 's'}{blocked ? `, ${blocked} blocked now` : ', none blocked now'}</span>
        </span>
        <ChevronDown className="size-6 shrink-0 transition-transform group-open:rotate-180" aria-hidden />
      </summary>
      {sorted.length === 0 ? (
        <p className="px-4 pb-4 text-muted">The studio has no rigging points yet.</p>
      ) : (
        <ul className="divide-y divide-line border-t border-line">
          {sorted.map((p) => (
            <li key={p.pointId} className="flex flex-col gap-2 px-4 py-3 sm:flex-row sm:items-start sm:justify-between sm:gap-3">
              <div className="min-w-0 flex-1 space-y-1">
                <div className="flex flex-wrap items-center gap-2">
                  <span className="text-lg font-semibold">{p.label}</span>
                  <StatusBadge status={p.status} />
                  <span className="text-sm text-muted">{p.roomName}</span>
                </div>
                {p.reasons.length ? (
                  <ul className="space-y-0.5 text-sm text-stop-700">
                    {p.reasons.map((r, i) => <li key={`${r.code}-${i}`} className="flex gap-1.5"><TriangleAlert className="mt-0.5 size-4 shrink-0" aria-hidden />{r.message}</li>)}
                  </ul>
                ) : p.clearedUntil ? (
                  <p className="text-sm text-muted">Cleared until {formatInZone(p.clearedUntil, timeZone)}</p>
                ) : null}
                <p className="flex items-center gap-1.5 text-sm">
                  {p.preuseDue ? <><Clock className="size-4 text-warn-700" aria-hidden /> No pre-use check today</> : <><CircleCheck className="size-4 text-ok-700" aria-hidden /> Checked at {formatInZone(p.lastPreuseAt, timeZone, 'time')}</>}
                </p>
              </div>
              <button type="button" onClick={() => onReportFault(p)} className="flex min-h-12 shrink-0 items-center justify-center gap-2 rounded-lg border border-stop-700/60 px-3 text-sm font-medium text-stop-700 hover:bg-stop-50">
                <TriangleAlert className="size-4" aria-hidden /> Report a fault<span className="sr-only"> on {p.label}</span>
              </button>
            </li>
          ))}
        </ul>
      )}
    </details>
  );
}
