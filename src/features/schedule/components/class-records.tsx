import { useQuery } from '@tanstack/react-query';
import { CircleHelp } from 'lucide-react';
import { ErrorState, Loading } from '../../../components/ui/states';
import { StatusBadge } from '../../../components/ui/status-badge';
import { Caution } from '../../../components/ui/caution';
import { formatInZone } from '../../../components/ui/zoned-time';
import { gearKindLabels } from '../../../../shared/rigging/strength';
import { scheduleQueries } from '../api';

/**
 * A point's classes, each with the point's status, reasons and hanging apparatus as kept when the
 * class started (PRODUCT.md §10): never today's status. Sits in the point page's history.
 */
export function ClassRecords({ pointId, timeZone }: { pointId: number; timeZone: string }) {
  const q = useQuery(scheduleQueries.pointRecords(pointId));
  return (
    <section aria-labelledby="history-classes" className="mt-6 space-y-2">
      <h3 id="history-classes" className="font-semibold">Classes held</h3>
      <p className="text-xs text-muted">Each class with this point’s status as it started, kept then; later changes to the rig do not alter it.</p>
      {q.isPending ? <Loading label="Loading the classes…" /> : q.isError ? <ErrorState error={q.error} retry={() => q.refetch()} /> : q.data.items.length === 0 ? (
        <p className="text-sm text-muted">No class has started on this point yet.</p>
      ) : (
        <>
          <ol className="space-y-2">
            {q.data.items.map((r) => (
              <li key={`${r.sessionId}-${r.startsAt}`} className="space-y-1 rounded-lg border border-line bg-white p-3 text-sm">
                <div className="flex flex-wrap items-center justify-between gap-2">
                  <span className="font-medium">{r.className}{r.cancelled ? ' (cancelled)' : ''} · {formatInZone(r.startsAt, timeZone)}</span>
                  {r.status === 'not_recorded' ? (
                    <span className="inline-flex items-center gap-1.5 rounded-full border border-line px-2.5 py-0.5 font-medium text-muted"><CircleHelp className="size-4" aria-hidden />Not recorded</span>
                  ) : (
                    <StatusBadge status={r.status} />
                  )}
                </div>
                <p className="text-muted">
                  {r.roomName} · {r.instructorName}
                  {r.status === 'not_recorded' ? null : <> · {r.apparatus ? `${gearKindLabels[r.apparatus.kind as keyof typeof gearKindLabels] ?? r.apparatus.kind} ${r.apparatus.serial} hanging` : 'no apparatus hanging'}{r.clearedUntil ? ` · cleared until ${formatInZone(r.clearedUntil, timeZone)}` : ''}</>}
                </p>
                {r.reasons.length ? <ul className="list-disc space-y-0.5 pl-5 text-stop-700">{r.reasons.map((x) => <li key={x.code + x.message}>{x.message}</li>)}</ul> : null}
              </li>
            ))}
          </ol>
          {q.data.nextCursor ? <p className="text-sm text-muted">Older classes are in the inspection-log export.</p> : null}
          <Caution />
        </>
      )}
    </section>
  );
}
