import { Ban, CircleCheck, TriangleAlert } from 'lucide-react';
import { StatusBadge } from '../../../components/ui/status-badge';
import { formatInZone } from '../../../components/ui/zoned-time';
import type { TodayPoint, TodaySession } from '../api';
import { PointCard } from './point-card';
import { Changeovers } from './changeovers';
import { ClassCheckIn, UnplacedStudents } from '../../students/components/point-check-in';

/** One class today: when and where, whether it is at risk and why, and each booked point as a large card. */
export function SessionCard({ session, timeZone, showInstructor, canCheck, canInspect, now, onReportFault }: { session: TodaySession; timeZone: string; showInstructor: boolean; canCheck: boolean; canInspect: boolean; now: number; onReportFault: (p: TodayPoint) => void }) {
  const time = `${formatInZone(session.startsAt, timeZone, 'time')}–${formatInZone(session.endsAt, timeZone, 'time')}`;
  const over = new Date(session.endsAt).getTime() <= now;
  const headingId = `session-${session.id}`;
  // At risk is worked out for sessions yet to start; once one has begun, a blocked point still has to show.
  const blocked = session.points.filter((p) => p.status === 'blocked');
  const warn = session.atRisk || blocked.length > 0;
  // A blocked point's reasons are on its own card just below (never behind a tap): name the point
  // here, once, and spell out only the reasons no card shows (a point fine now but not at the class's time).
  const blockedIds = new Set(blocked.map((p) => p.pointId));
  const reasons = [
    ...(blocked.length ? [`${blocked.map((p) => p.label).join(', ')} ${blocked.length === 1 ? 'is' : 'are'} blocked.`] : []),
    ...(session.atRisk ? session.riskReasons.filter((r) => !blockedIds.has(r.pointId)).map((r) => r.message) : []),
  ];
  return (
    <article aria-labelledby={headingId} className={`rounded-2xl border bg-white p-3 ${session.cancelled || over ? 'border-line opacity-90' : 'border-line'}`} data-testid={`session-${session.id}`}>
      <header>
        <h2 id={headingId} className="text-xl font-semibold leading-snug">
          <time dateTime={session.startsAt} className="mr-2 text-pine-800">{time}</time>
          <span className={session.cancelled ? 'line-through decoration-2' : ''}>{session.className}</span>
        </h2>
        <p className="text-muted">{session.roomName}{showInstructor ? ` · ${session.instructorName}` : ''}{over && !session.cancelled ? ' · finished' : ''}</p>
      </header>
      {session.cancelled ? (
        <p className="mt-3 flex items-start gap-2 rounded-lg bg-canvas p-3 font-medium">
          <Ban className="mt-0.5 size-5 shrink-0" aria-hidden />
          <span>Cancelled{session.cancelReason ? `: ${session.cancelReason}` : ''}. No pre-use check needed.</span>
        </p>
      ) : warn && !over ? (
        <div className="mt-2 rounded-lg border border-stop-700/40 bg-stop-50 px-3 py-2 text-sm text-stop-700" role="note">
          {reasons.length === 1 ? (
            <p><TriangleAlert className="mr-1 inline size-4 align-text-bottom" aria-hidden /><strong>{session.atRisk ? 'At risk:' : 'A point is blocked:'}</strong> {reasons[0]} Reception can swap the point or move the class.</p>
          ) : (
            <>
              <p className="flex items-center gap-2 text-base font-semibold"><TriangleAlert className="size-5" aria-hidden /> {session.atRisk ? 'At risk' : 'A point is blocked'}</p>
              <ul className="list-disc space-y-0.5 pl-5">
                {reasons.map((r, i) => <li key={i}>{r}</li>)}
              </ul>
              <p>Reception can swap the point or move the class.</p>
            </>
          )}
        </div>
      ) : session.points.length && !over ? (
        <p className="mt-2 flex items-center gap-2 text-sm text-ok-700"><CircleCheck className="size-4" aria-hidden /> Not at risk: every point is fit for this class.</p>
      ) : null}
      {session.cancelled ? null : <UnplacedStudents session={session} />}
      {session.cancelled || over ? null : <Changeovers changeovers={session.changeovers} canMount={canCheck} className={session.className} />}
      {session.cancelled ? null : over ? (
        <ul className="mt-3 flex flex-wrap gap-x-4 gap-y-2" aria-label={`Points for ${session.className}`}>
          {session.points.map((p) => <li key={p.pointId} className="flex items-center gap-2"><span className="font-semibold">{p.label}</span><StatusBadge status={p.status} /></li>)}
        </ul>
      ) : session.points.length === 0 ? (
        <p className="mt-3 text-muted">No points are booked for this class. Ask reception.</p>
      ) : (
        <ul className="mt-2 space-y-2" aria-label={`Points for ${session.className}`}>
          {session.points.map((p) => <PointCard key={p.pointId} point={p} timeZone={timeZone} sessionId={session.id} students={session.students.filter((s) => s.pointId === p.pointId)} canCheck={canCheck} canInspect={canInspect} showRoom={p.roomName !== session.roomName} onReportFault={onReportFault} />)}
        </ul>
      )}
      {/* Attendance can be taken during the class or after it, so a finished class keeps its check-in. */}
      {session.cancelled ? null : <ClassCheckIn session={session} />}
    </article>
  );
}
