import { lazy, Suspense, useRef, useState } from 'react';
import { Link } from 'react-router-dom';
import { paths } from '../../../lib/paths';
import { CircleCheck, ClipboardCheck, Clock, TriangleAlert } from 'lucide-react';
import { StatusBadge } from '../../../components/ui/status-badge';
import { Loading } from '../../../components/ui/states';
import { formatInZone } from '../../../components/ui/zoned-time';
import { pointInspectionHelps } from '../../../../shared/clearance/gear-standing';
import { gearKindLabels } from '../../../../shared/rigging/strength';
import type { TodayPoint, TodayStudent } from '../api';
import { PointStudentsLine } from '../../students/components/point-check-in';

// The checklist loads when a check is opened, so the board's first paint on a phone stays small.
const PreuseCheck = lazy(() => import('./preuse-check').then((m) => ({ default: m.PreuseCheck })));

const gearWord = (g: { kind: string; serial: string }) => `${(gearKindLabels[g.kind as keyof typeof gearKindLabels] ?? g.kind).toLowerCase()} ${g.serial}`;

// Two actions side by side even on a phone, each a full 48 px high touch target.
const big = 'flex min-h-12 items-center justify-center gap-1.5 rounded-lg px-2 py-2 text-sm font-semibold leading-tight sm:text-base';

/**
 * One booked point on the Today board: its status in large type, why it is blocked (always in words,
 * never behind a tap), its students in one line, the pre-use check and a fault report, one tap each.
 */
export function PointCard({ point, timeZone, sessionId, students = [], canCheck, canInspect = false, showRoom = true, onReportFault }: { point: TodayPoint; timeZone: string; sessionId?: number; students?: TodayStudent[]; canCheck: boolean; canInspect?: boolean; showRoom?: boolean; onReportFault: (p: TodayPoint) => void }) {
  const [checking, setChecking] = useState(false);
  const opener = useRef<HTMLButtonElement>(null);
  const blocked = point.status === 'blocked';
  const close = () => {
    setChecking(false);
    requestAnimationFrame(() => opener.current?.focus());
  };
  const due = point.preuseDue;
  return (
    <li className={`rounded-xl border-2 bg-white p-2.5 ${blocked ? 'border-stop-700/50' : point.status === 'expiring' ? 'border-warn-700/40' : 'border-line'}`} data-testid={`point-card-${point.pointId}`}>
      <div className="flex items-start justify-between gap-2">
        <div className="min-w-0">
          <p className="text-xl font-semibold leading-tight">
            {point.label}
            {showRoom ? <span className="ml-2 text-sm font-normal text-muted">{point.roomName}</span> : null}
          </p>
          {/* A blocked point takes no pre-use check, so its card does not ask for one. */}
          {blocked ? (
            <p className="mt-0.5 text-base font-semibold text-stop-700">Do not use this point.</p>
          ) : (
            <p className="mt-0.5 flex items-center gap-1.5 text-base font-medium" data-testid="preuse-state">
              {due ? <><Clock className="size-5 shrink-0 text-warn-700" aria-hidden /> Pre-use check due</> : <><CircleCheck className="size-5 shrink-0 text-ok-700" aria-hidden /> Checked at {formatInZone(point.lastPreuseAt, timeZone, 'time')}</>}
            </p>
          )}
        </div>
        <StatusBadge status={point.status} large />
      </div>
      {point.reasons.length ? (
        <ul className="mt-1 space-y-0.5 text-sm text-stop-700">
          {point.reasons.map((r, i) => (
            <li key={`${r.code}-${i}`} className="flex gap-1.5">
              <TriangleAlert className="mt-0.5 size-4 shrink-0" aria-hidden />
              <span>{r.message}</span>
            </li>
          ))}
        </ul>
      ) : null}
      {blocked ? <p className="mt-1 text-sm font-medium text-stop-700">{point.gearToInspect.length && !pointInspectionHelps(point) ? `A rigger has to inspect ${point.gearToInspect.map(gearWord).join(' and ')} first.` : 'A rigger has to clear it first.'}</p> : null}
      {/* The clearance's end matters to the class only when it is close (the point is expiring); a cleared point's badge says enough. */}
      {point.status === 'expiring' && point.clearedUntil ? <p className="mt-1 text-sm font-medium text-warn-700">Cleared until {formatInZone(point.clearedUntil, timeZone, 'dateTime')}</p> : null}
      <PointStudentsLine students={students} />
      {checking ? (
        <Suspense fallback={<div className="mt-3"><Loading label="Opening the pre-use check…" /></div>}>
          <PreuseCheck pointId={point.pointId} label={point.label} sessionId={sessionId} onClose={close} onDone={close} />
        </Suspense>
      ) : (
        <div className="mt-2 grid grid-cols-2 gap-2">
          {canCheck && !blocked ? (
            <button
              ref={opener}
              type="button"
              onClick={() => setChecking(true)}
              aria-label={`${point.preuseDue ? 'Do the pre-use check' : 'Check again'} for ${point.label}`}
              className={`${big} bg-pine-700 text-white hover:bg-pine-800`}
            >
              <ClipboardCheck className="size-5 shrink-0" aria-hidden />
              {point.preuseDue ? 'Pre-use check' : 'Check again'}
            </button>
          ) : null}
          {canInspect && blocked
            ? point.gearToInspect.map((g) => (
                // A quarantined item goes back to service through its own after-incident inspection; inspecting the point would not release it.
                <Link key={g.gearId} to={paths.inspectGear(g.gearId)} className={`${big} bg-pine-700 text-white hover:bg-pine-800`}>
                  <ClipboardCheck className="size-5" aria-hidden /> Inspect {gearWord(g)}<span className="sr-only"> ({g.inspection === 'after_incident' ? 'after-incident inspection' : 'its own inspection'})</span>
                </Link>
              ))
            : null}
          {canInspect && blocked && pointInspectionHelps(point) ? (
            <Link to={paths.inspectPoint(point.pointId)} className={`${big} bg-pine-700 text-white hover:bg-pine-800`}>
              <ClipboardCheck className="size-5" aria-hidden /> Inspect and clear<span className="sr-only"> {point.label}</span>
            </Link>
          ) : null}
          <button type="button" onClick={() => onReportFault(point)} className={`${big} border-2 border-stop-700 bg-white text-stop-700 hover:bg-stop-50 ${(canCheck && !blocked) || (canInspect && blocked) ? '' : 'col-span-2'}`}>
            <TriangleAlert className="size-5 shrink-0" aria-hidden />
            Report a fault<span className="sr-only"> on {point.label}</span>
          </button>
        </div>
      )}
    </li>
  );
}
