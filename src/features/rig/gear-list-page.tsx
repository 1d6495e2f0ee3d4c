import { useState } from 'react';
import { Link, useNavigate, useSearchParams } from 'react-router-dom';
import { keepPreviousData, useQuery } from '@tanstack/react-query';
import { Plus } from 'lucide-react';
import { gearKindLabels } from '../../../shared/rigging';
import { Button } from '../../components/ui/button';
import { Caution } from '../../components/ui/caution';
import { Card, EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { paths } from '../../lib/paths';
import { rigQueries } from './api';
import { useRigAccess } from './access';
import { BackLink } from './components/back-link';
import { useStudioFormat } from './use-studio-format';
import { filtersFrom, GearFilters } from './components/gear-filters';
import { GearForm } from './components/gear-form';
import { GearStatusBadge } from './components/gear-status-badge';

export function GearListPage() {
  const { canEdit } = useRigAccess();
  const navigate = useNavigate();
  const [params, setParams] = useSearchParams();
  const filters = filtersFrom(params);
  const list = useQuery({ ...rigQueries.gearList(filters), placeholderData: keepPreviousData });
  const { studio, fmt } = useStudioFormat();
  const [adding, setAdding] = useState(false);
  const filtered = Object.values(filters).some((v) => v !== undefined);
  const failed = list.error ?? studio.error;
  return (
    <div className="max-w-6xl">
      <BackLink to={paths.rig}>Rig</BackLink>
      <PageHeader title="Gear" actions={canEdit && !adding ? <Button onClick={() => setAdding(true)}><Plus className="size-4" aria-hidden /> Add a gear item</Button> : null}>
        Every piece of rigging hardware, textile and apparatus, by serial.
      </PageHeader>
      {adding ? <GearForm onDone={(created) => { setAdding(false); if (created) navigate(paths.gearItem(created.id)); }} /> : null}
      <GearFilters params={params} onChange={(next) => setParams(next, { replace: true })} />
      {failed ? <ErrorState error={failed} retry={() => { void list.refetch(); void studio.refetch(); }} /> : !list.data || !fmt ? <Loading label="Loading gear…" /> : list.data.length === 0 ? (
        <EmptyState title={filtered ? 'No gear matches these filters' : 'No gear yet'}>{filtered ? 'Loosen a filter or clear them all.' : canEdit ? 'Add each item with the ratings marked on it.' : 'A rigger adds gear here.'}</EmptyState>
      ) : (
        <>
          <p className="mb-2 text-sm text-muted" aria-live="polite">{list.data.length} {list.data.length === 1 ? 'item' : 'items'}{list.isFetching ? ' — updating…' : ''}</p>
          <Card className="overflow-x-auto p-0!">
            <table className="w-full text-left text-sm">
              <caption className="sr-only">Gear items</caption>
              <thead className="border-b border-line bg-pine-50 text-xs uppercase tracking-wide text-muted">
                <tr>
                  <th scope="col" className="px-4 py-3">Serial</th>
                  <th scope="col" className="px-4 py-3">Kind</th>
                  <th scope="col" className="px-4 py-3">Maker and model</th>
                  <th scope="col" className="px-4 py-3">Major rating</th>
                  <th scope="col" className="px-4 py-3">Status</th>
                  <th scope="col" className="px-4 py-3">Inspected until</th>
                  <th scope="col" className="px-4 py-3">Mounted on</th>
                </tr>
              </thead>
              <tbody>
                {list.data.map((g) => (
                  <tr key={g.id} className="border-b border-line last:border-0">
                    <td className="px-4 py-1"><Link to={paths.gearItem(g.id)} className="inline-flex min-h-11 items-center font-semibold text-pine-700 underline underline-offset-2">{g.serial}</Link></td>
                    <td className="px-4 py-2">{gearKindLabels[g.kind]}</td>
                    <td className="px-4 py-2">{[g.maker, g.model].filter(Boolean).join(' ') || <span className="text-muted">—</span>}</td>
                    <td className="whitespace-nowrap px-4 py-2">{fmt.force(g.majorKn)}</td>
                    <td className="px-4 py-2"><GearStatusBadge status={g.status} /></td>
                    <td className="whitespace-nowrap px-4 py-2">{fmt.day(g.inspectedUntil, 'Not yet inspected')}</td>
                    <td className="px-4 py-1">
                      {g.pointId ? <Link to={paths.point(g.pointId)} className="inline-flex min-h-11 items-center text-pine-700 underline underline-offset-2">{g.pointLabel ?? `Point ${g.pointId}`}</Link> : <span className="text-muted">Spare</span>}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </Card>
          <Caution className="mt-4" />
        </>
      )}
    </div>
  );
}
