import { useInfiniteQuery } from '@tanstack/react-query';
import { Link } from 'react-router-dom';
import { ErrorState, Loading } from '../../../components/ui/states';
import { formatInZone } from '../../../components/ui/zoned-time';
import { paths } from '../../../lib/paths';
import { useStudioTimeZone } from '../../today/api';
import { faultQueries } from '../../faults/api';
import { FaultState } from '../../faults/components/fault-card';
import { SeverityBadge } from '../../faults/components/severity-badge';
import { faultSubject } from '../../faults/labels';
import { inspectionQueries } from '../api';
import { InspectionEntry } from './inspection-entry';

/**
 * A point's (or a gear item's) record: its inspections and its faults, newest first. Made to sit on
 * the point and gear pages: `<PointHistory pointId={id} />` or `<PointHistory gearId={id} />`.
 */
export function PointHistory({ pointId, gearId, limit = 10 }: { pointId?: number; gearId?: number; limit?: number }) {
  const zone = useStudioTimeZone();
  const about = gearId !== undefined ? { gearId } : { pointId };
  // The first page of each (at least 100 rows) is more than the history shows; the rest are in the full lists.
  const inspections = useInfiniteQuery({ ...inspectionQueries.log(about, zone.data ?? 'UTC'), enabled: !!zone.data });
  const faults = useInfiniteQuery(faultQueries.list(about));
  const inspectionRows = inspections.data?.pages[0]?.items ?? [];
  const faultRows = faults.data?.pages[0]?.items ?? [];
  const moreInspections = inspectionRows.length > limit || !!inspections.data?.pages[0]?.nextCursor;
  if (zone.isPending) return <Loading label="Loading the history…" />;
  if (zone.isError) return <ErrorState error={zone.error} retry={() => zone.refetch()} />;
  const tz = zone.data;
  return (
    <div className="grid gap-6 lg:grid-cols-2" data-testid="point-history">
      <section aria-labelledby="history-inspections" className="space-y-2">
        <h3 id="history-inspections" className="font-semibold">Inspections</h3>
        {inspections.isPending ? <Loading /> : inspections.isError ? <ErrorState error={inspections.error} retry={() => inspections.refetch()} /> : inspectionRows.length === 0 ? (
          <p className="text-sm text-muted">No inspections recorded yet.</p>
        ) : (
          <>
            <ol className="space-y-2">
              {inspectionRows.slice(0, limit).map((i) => <InspectionEntry key={i.id} inspection={i} timeZone={tz} />)}
            </ol>
            {moreInspections ? <p className="text-sm text-muted">The {limit} newest are shown. Older inspections are in the <Link className="font-medium text-pine-700 underline" to={paths.inspections}>inspection log</Link>.</p> : null}
          </>
        )}
      </section>
      <section aria-labelledby="history-faults" className="space-y-2">
        <h3 id="history-faults" className="font-semibold">Faults</h3>
        {faults.isPending ? <Loading /> : faults.isError ? <ErrorState error={faults.error} retry={() => faults.refetch()} /> : faultRows.length === 0 ? (
          <p className="text-sm text-muted">No faults reported.</p>
        ) : (
          <ol className="space-y-2">
            {faultRows.slice(0, limit).map((f) => (
              <li key={f.id} className="space-y-1 rounded-lg border border-line bg-white p-3 text-sm">
                <div className="flex flex-wrap items-center gap-2"><FaultState status={f.status} /><SeverityBadge severity={f.severity} /></div>
                <p><span className="font-medium">{faultSubject(f)}:</span> {f.description}</p>
                <p className="text-muted">Reported {formatInZone(f.reportedAt, tz)} by {f.reportedBy ?? 'former staff'}{f.resolvedAt ? ` · resolved ${formatInZone(f.resolvedAt, tz)}` : ''}</p>
              </li>
            ))}
          </ol>
        )}
        <Link to={paths.faults} className="no-print inline-block text-sm font-medium text-pine-700 underline">All faults</Link>
      </section>
    </div>
  );
}
