import { useQuery } from '@tanstack/react-query';
import { useSearchParams } from 'react-router-dom';
import { ClipboardCheck } from 'lucide-react';
import type { Point } from '../../../shared/schemas/rig';
import { Caution } from '../../components/ui/caution';
import { StatusBadge } from '../../components/ui/status-badge';
import { Card, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { formatInZone } from '../../components/ui/zoned-time';
import { useSignedIn } from '../../app/use-me';
import { studioQueries } from '../settings/api';
import { AuditVerifyPanel } from '../audit/components/audit-verify-panel';
import { inspectionQueries } from './api';
import { GearToInspect } from './components/gear-to-inspect';
import { InspectionForm } from './components/inspection-form';
import { InspectionLog } from './components/inspection-log';
import { PointHistory } from './components/point-history';
import { PointsToInspect } from './components/points-to-inspect';

/** The rigger's rounds and the owner's records: points by urgency, the inspection form, gear on its own, the log and the audit check. */
export function InspectionsPage() {
  const me = useSignedIn();
  const studio = useQuery(studioQueries.detail());
  const points = useQuery(inspectionQueries.points());
  const [params, setParams] = useSearchParams();
  const selectedId = Number(params.get('point')) || undefined;
  const selected = points.data?.find((p) => p.id === selectedId);
  const isRigger = me.role === 'rigger';

  if (studio.isPending) return <Loading />;
  if (studio.isError) return <ErrorState error={studio.error} retry={() => studio.refetch()} />;
  const { timeZone, warningDays } = studio.data.policy;
  const select = (p: Point) => setParams((old) => { const n = new URLSearchParams(old); n.set('point', String(p.id)); return n; });

  return (
    <div className="max-w-6xl space-y-8">
      <div className="hidden print:block">
        <p className="text-lg font-semibold">{studio.data.name}: inspection log</p>
        <p className="text-sm">Printed {formatInZone(new Date().toISOString(), timeZone)} ({timeZone})</p>
        <Caution className="mt-2" />
      </div>
      <div className="no-print">
        <PageHeader title="Inspections">
          {isRigger ? 'Your round, most urgent first. Pick a point to inspect it; signing a clean inspection clears it.' : 'Where each point stands, the inspection log for the insurer or the venue, and the audit check.'}
        </PageHeader>
        <Caution />
      </div>
      <section aria-labelledby="round-title" className="no-print grid grid-cols-1 gap-6 lg:grid-cols-[minmax(14rem,17rem)_minmax(0,1fr)] xl:grid-cols-[minmax(16rem,22rem)_minmax(0,1fr)]">
        <div className="min-w-0 space-y-3">
          <h2 id="round-title" className="text-xl font-semibold">Points to inspect</h2>
          <PointsToInspect selected={selectedId} timeZone={timeZone} onSelect={select} />
        </div>
        <Card className="min-w-0">
          {points.isPending && selectedId ? <Loading /> : selected ? (
            isRigger ? (
              <InspectionForm key={selected.id} point={selected} timeZone={timeZone} />
            ) : (
              <OwnerPointView point={selected} timeZone={timeZone} />
            )
          ) : (
            <div className="flex flex-col items-center gap-2 py-10 text-center text-muted">
              <ClipboardCheck className="size-8" aria-hidden />
              <p>{selectedId ? 'That point is not in the register any more.' : `Pick a point ${isRigger ? 'to inspect it' : 'to see its record'}.`}</p>
            </div>
          )}
        </Card>
      </section>
      <section aria-labelledby="gear-title" className="no-print space-y-3">
        <h2 id="gear-title" className="text-xl font-semibold">Gear to inspect on its own</h2>
        <GearToInspect days={warningDays} timeZone={timeZone} canInspect={isRigger} />
      </section>
      <InspectionLog timeZone={timeZone} canExport={me.role === 'owner' || isRigger} />
      {me.role === 'owner' ? <AuditVerifyPanel timeZone={timeZone} /> : null}
    </div>
  );
}

function OwnerPointView({ point, timeZone }: { point: Point; timeZone: string }) {
  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <h2 className="text-xl font-semibold">{point.label} <span className="text-base font-normal text-muted">· {point.roomName}</span></h2>
        <StatusBadge status={point.status.status} />
      </div>
      {point.status.reasons.length ? (
        <ul className="list-disc space-y-0.5 pl-6 text-sm text-stop-700">{point.status.reasons.map((r, i) => <li key={i}>{r.message}</li>)}</ul>
      ) : (
        <p className="text-sm">Cleared until {formatInZone(point.status.clearedUntil, timeZone)}.</p>
      )}
      <p className="text-sm text-muted">Only a rigger inspects and clears points.</p>
      <PointHistory pointId={point.id} limit={5} />
    </div>
  );
}
