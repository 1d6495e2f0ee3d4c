import { useState } from 'react';
import { useInfiniteQuery } from '@tanstack/react-query';
import { useSearchParams } from 'react-router-dom';
import { TriangleAlert, X } from 'lucide-react';
import type { Fault } from '../../../shared/schemas/safety';
import { Button } from '../../components/ui/button';
import { ChoiceGroup } from '../../components/ui/choice-group';
import { Card, EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { useSignedIn } from '../../app/use-me';
import { useStudioTimeZone } from '../today/api';
import { faultQueries } from './api';
import { AfterResolve, FaultCard } from './components/fault-card';
import { ReportFaultForm } from './components/report-fault-form';
import type { FaultHolder } from './components/resolve-fault';

type Filter = 'open' | 'resolved' | 'all';
const filters = [
  { value: 'open', label: 'Open' },
  { value: 'resolved', label: 'Resolved' },
  { value: 'all', label: 'All' },
] as const;

/** Every fault, open ones first; riggers resolve them here. */
export function FaultsPage() {
  const me = useSignedIn();
  const [params, setParams] = useSearchParams();
  const filter = (filters.some((f) => f.value === params.get('show')) ? params.get('show') : 'open') as Filter;
  const list = useInfiniteQuery(faultQueries.list(filter === 'all' ? {} : { status: filter }));
  const zone = useStudioTimeZone();
  const [reporting, setReporting] = useState(false);
  const [justResolved, setJustResolved] = useState<{ fault: Fault; holder: FaultHolder } | null>(null);
  const canResolve = me.role === 'rigger';
  // The server sends open faults first, newest first, a page at a time.
  const sorted = list.data?.pages.flatMap((p) => p.items) ?? [];

  return (
    <div className="max-w-4xl">
      <PageHeader
        title="Faults"
        actions={reporting ? null : <Button variant="danger" onClick={() => setReporting(true)}><TriangleAlert className="size-4" aria-hidden /> Report a fault</Button>}
      >
        Every open fault blocks its point, whatever its severity. {canResolve ? 'Resolve a fault once it is dealt with; the point then waits for your clearance.' : 'A rigger resolves faults and clears the point again.'}
      </PageHeader>
      {reporting ? (
        <Card className="mb-6">
          <div className="mb-4 flex items-center justify-between gap-2">
            <h2 className="text-lg font-semibold">Report a fault</h2>
            <button type="button" onClick={() => setReporting(false)} className="flex size-11 items-center justify-center rounded-lg hover:bg-pine-50" aria-label="Close the fault form"><X aria-hidden /></button>
          </div>
          <ReportFaultForm onDone={() => setReporting(false)} onCancel={() => setReporting(false)} />
        </Card>
      ) : null}
      {justResolved ? <div className="mb-4"><AfterResolve fault={justResolved.fault} holder={justResolved.holder} onDismiss={() => setJustResolved(null)} /></div> : null}
      <div className="mb-4">
        <ChoiceGroup<Filter>
          legend="Show"
          value={filter}
          options={filters}
          onChange={(v) => setParams((p) => { const n = new URLSearchParams(p); if (v === 'open') n.delete('show'); else n.set('show', v); return n; }, { replace: true })}
        />
      </div>
      {list.isPending || zone.isPending ? <Loading label="Loading faults…" /> : list.isError ? <ErrorState error={list.error} retry={() => list.refetch()} /> : zone.isError ? <ErrorState error={zone.error} retry={() => zone.refetch()} /> : sorted.length === 0 ? (
        <EmptyState title={filter === 'open' ? 'No open faults' : filter === 'resolved' ? 'No resolved faults yet' : 'No faults reported yet'}>
          {filter === 'open' ? 'Nothing is blocking a point because of a fault right now.' : null}
        </EmptyState>
      ) : (
        <ul className="space-y-3" aria-label={`${filters.find((f) => f.value === filter)!.label} faults`}>
          {sorted.map((f) => <FaultCard key={f.id} fault={f} timeZone={zone.data} canResolve={canResolve} onResolved={(fault, holder) => setJustResolved({ fault, holder })} />)}
        </ul>
      )}
      {list.hasNextPage ? (
        <div className="mt-4">
          <Button variant="secondary" onClick={() => list.fetchNextPage()} busy={list.isFetchingNextPage}>Show older faults</Button>
        </div>
      ) : null}
    </div>
  );
}
