import { CircleHelp, Repeat2, TriangleAlert } from 'lucide-react';
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

/** The apparatus to mount before the class (PRODUCT.md §4.7), for the desk to see and plan. */
export function SessionChangeovers({ session }: { session: Session }) {
  if (!session.changeovers.length) return null;
  return (
    <section aria-labelledby="session-changeovers" className="rounded-xl border border-warn-700/30 bg-warn-50 p-4">
      <h3 id="session-changeovers" className="flex items-center gap-2 font-semibold text-ink"><Repeat2 className="size-5 shrink-0" aria-hidden />Changeover before class</h3>
      <ul className="mt-2 list-disc space-y-1 pl-9 text-sm">
        {session.changeovers.map((c) => (
          <li key={`${c.pointId}-${c.gearId}`}>{c.message}{c.mountedSerial ? ` (${c.mountedSerial} comes down first)` : ''}</li>
        ))}
      </ul>
      <p className="mt-1 text-sm text-muted">The instructor or a rigger mounts it from Today or the point’s page.</p>
    </section>
  );
}

/** What hangs on the point for this class: the mounted apparatus, or the one to mount. */
function HangingLine({ session, pointId }: { session: Session; pointId: number }) {
  const h = session.hanging.find((x) => x.pointId === pointId);
  if (!h) return null;
  return (
    <p className="text-sm">
      {h.serial ? <>Hangs {h.kind} {h.serial}{h.mounted ? ' (mounted)' : ' (to be mounted before class)'}</> : <span className="text-stop-700">No {session.apparatus} to hang for this class</span>}
    </p>
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
              {session.recordedAtStart ? null : <HangingLine session={session} pointId={p.pointId} />}
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
