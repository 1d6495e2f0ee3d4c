import { useState } from 'react';
import { Link, useNavigate, useSearchParams } from 'react-router-dom';
import { keepPreviousData, useQuery } from '@tanstack/react-query';
import { ClipboardCheck, Plus } from 'lucide-react';
import { gearKindLabels } from '../../../shared/rigging';
import { gearKindSchema } from '../../../shared/schemas/vocabulary';
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
import { GearStatusBadge, gearNeedsInspection } from './components/gear-status-badge';

export function GearListPage() {
  const { canEdit, isRigger } = useRigAccess();
  const navigate = useNavigate();
  const [params, setParams] = useSearchParams();
  const filters = filtersFrom(params);
  const list = useQuery({ ...rigQueries.gearList(filters), placeholderData: keepPreviousData });
  const { studio, fmt } = useStudioFormat();
  // `?add=<kind>` (the fault resolution's "add one" link) opens the form for that kind.
  const addKind = gearKindSchema.safeParse(params.get('add')).data;
  const [adding, setAdding] = useState(canEdit && params.has('add'));
  const filtered = Object.values(filters).some((v) => v !== undefined);
  const failed = list.error ?? studio.error;
  return (
    <div className="max-w-6xl">
      <BackLink to={paths.rig}>Rig</BackLink>
      <PageHeader title="Gear" actions={canEdit && !adding ? <Button onClick={() => setAdding(true)}><Plus className="size-4" aria-hidden /> Add a gear item</Button> : null}>
        Every piece of rigging hardware, textile and apparatus, by serial.
      </PageHeader>
      {adding ? <GearForm kind={addKind} onDone={(created) => { setAdding(false); if (created) navigate(paths.gearItem(created.id)); }} /> : null}
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
                  <th scope="col" className="px-3 py-3">Serial<span className="xl:hidden"> and kind</span></th>
                  <th scope="col" className="hidden px-3 py-3 xl:table-cell">Kind</th>
                  <th scope="col" className="px-3 py-3">Maker and model</th>
                  <th scope="col" className="px-3 py-3">Major rating</th>
                  <th scope="col" className="px-3 py-3">Status</th>
                  <th scope="col" className="px-3 py-3">Inspected until</th>
                  <th scope="col" className="px-3 py-3">Mounted on</th>
                </tr>
              </thead>
              <tbody>
                {list.data.map((g) => {
                  const makerModel = [g.maker, g.model].filter(Boolean).join(' ');
                  return (
                    <tr key={g.id} className="border-b border-line last:border-0" data-testid={`gear-row-${g.id}`}>
                      <td className="px-3 py-1">
                        <Link to={paths.gearItem(g.id)} className="inline-flex min-h-11 items-center whitespace-nowrap font-semibold text-pine-700 underline underline-offset-2">{g.serial}</Link>
                        <span className="-mt-2 block pb-1 text-xs text-muted xl:hidden">{gearKindLabels[g.kind]}</span>
                      </td>
                      <td className="hidden px-3 py-2 xl:table-cell">{gearKindLabels[g.kind]}</td>
                      {/* Takes the room left over and never pushes the table wider: a long name wraps to three lines, then ends in an ellipsis with the whole name in its title. */}
                      <td className="w-full max-w-0 px-3 py-2">
                        {makerModel ? <span className="line-clamp-3 break-words" title={makerModel}>{makerModel}</span> : <span className="text-muted">—</span>}
                      </td>
                      <td className="whitespace-nowrap px-3 py-2">{fmt.force(g.majorKn)}</td>
                      <td className="px-3 py-2">
                        <GearStatusBadge gear={g} wrap />
                        {isRigger && gearNeedsInspection(g) ? (
                          <Link to={paths.inspectGear(g.id)} className="mt-1 flex min-h-11 items-center gap-1 text-sm font-medium text-pine-700 underline underline-offset-2">
                            <ClipboardCheck className="size-4" aria-hidden /> Inspect<span className="sr-only"> {g.serial}</span>
                          </Link>
                        ) : null}
                      </td>
                      <td className="px-3 py-2">{g.inspectedUntil ? <span className="whitespace-nowrap">{fmt.day(g.inspectedUntil)}</span> : <span className="text-muted">Not yet inspected</span>}</td>
                      <td className="whitespace-nowrap px-3 py-1">
                        {g.pointId ? <Link to={paths.point(g.pointId)} className="inline-flex min-h-11 items-center text-pine-700 underline underline-offset-2">{g.pointLabel ?? `Point ${g.pointId}`}</Link> : <span className="text-muted">Spare</span>}
                      </td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          </Card>
          <Caution className="mt-4" />
        </>
      )}
    </div>
  );
}
