import { CircleHelp, TriangleAlert } from 'lucide-react';
import { gearKindLabels } from '../../../../shared/rigging/strength';
import { Link } from 'react-router-dom';
import type { Session } from '../api';
import { StatusBadge } from '../../../components/ui/status-badge';
import { Caution } from '../../../components/ui/caution';
import { formatInZone } from '../../../components/ui/zoned-time';
import { paths } from '../../../lib/paths';

/** Why the class is at risk, point by point, in words. */
export function RiskReasons({ session }: { session: Session }) {
  if (!session.atRisk || session.riskReasons.length === 0) return null;
  return (
    <div role="alert" className="rounded-xl border border-stop-700/30 bg-stop-50 p-4 text-stop-700">
      <p className="flex items-center gap-2 font-medium"><TriangleAlert className="size-5 shrink-0" aria-hidden />At risk</p>
      <ul className="mt-2 list-disc space-y-1 pl-9 text-sm">
        {session.riskReasons.map((r) => <li key={`${r.pointId}-${r.code}-${r.message}`}>{r.message}</li>)}
      </ul>
    </div>
  );
}

/** Each booked point with its status at the class's start: once it has started, as kept then. */
export function SessionPoints({ session, timeZone }: { session: Session; timeZone: string }) {
  const risky = new Set(session.riskReasons.map((r) => r.pointId));
  const kept = session.points.find((p) => p.recordedAt)?.recordedAt;
  return (
    <section aria-labelledby="session-points" className="space-y-2">
      <h3 id="session-points" className="font-semibold">Booked points</h3>
      <p className="text-xs text-muted">
        {session.recordedAtStart
          ? <>Status at the class’s start, as recorded{kept ? <> on {formatInZone(kept, timeZone)}</> : null}; later changes to the rig do not alter it.</>
          : 'Status at the class’s start time.'}
      </p>
      {session.points.length === 0 ? (
        <p className="text-sm text-muted">No points are booked.</p>
      ) : (
        <ul className="divide-y divide-line overflow-hidden rounded-xl border border-line bg-white">
          {session.points.map((p) => (
            <li key={p.pointId} className="space-y-1 px-4 py-3">
              <div className="flex flex-wrap items-center justify-between gap-2">
                <Link to={paths.point(p.pointId)} className="inline-flex min-h-11 items-center font-medium text-pine-700 underline-offset-2 hover:underline">
                  Point {p.label}
                </Link>
                <span className="flex items-center gap-2">
                  {risky.has(p.pointId) ? <span className="text-sm font-medium text-stop-700">At risk</span> : null}
                  {p.status === 'not_recorded' ? (
                    <span className="inline-flex items-center gap-1.5 rounded-full border border-line bg-white px-2.5 py-0.5 text-sm font-medium text-muted">
                      <CircleHelp className="size-4" aria-hidden />Not recorded
                    </span>
                  ) : (
                    <StatusBadge status={p.status} />
                  )}
                </span>
              </div>
              {p.status === 'not_recorded' ? null : (
                <p className="text-sm text-muted">
                  {p.clearedUntil ? <>Cleared until {formatInZone(p.clearedUntil, timeZone)}</> : session.recordedAtStart ? 'No clearance at the start' : 'No current clearance'}
                  {session.recordedAtStart ? <> · {p.apparatus ? <>{gearKindLabels[p.apparatus.kind as keyof typeof gearKindLabels] ?? p.apparatus.kind} {p.apparatus.serial} hanging</> : 'no apparatus hanging'}</> : null}
                </p>
              )}
              {p.reasons.length ? (
                <ul className="list-disc space-y-0.5 pl-5 text-sm text-stop-700">
                  {p.reasons.map((r) => <li key={r.code + r.message}>{r.message}</li>)}
                </ul>
              ) : null}
            </li>
          ))}
        </ul>
      )}
      <Caution />
    </section>
  );
}
