import { useMemo } from 'react';
import { useSearchParams } from 'react-router-dom';
import { useQuery } from '@tanstack/react-query';
import { Printer } from 'lucide-react';
import { gearKindLabels } from '../../../shared/rigging';
import { Button } from '../../components/ui/button';
import { ChoiceGroup } from '../../components/ui/choice-group';
import { EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { paths } from '../../lib/paths';
import { rigQueries } from './api';
import { BackLink } from './components/back-link';
import { QrLabel, type LabelItem } from './components/qr-label';

type Which = 'all' | 'points' | 'gear';
const ids = (text: string | null) => new Set((text ?? '').split(',').map((s) => Number(s.trim())).filter((n) => Number.isInteger(n) && n > 0));

/** A sheet of labels to print and fix to each point and gear item; scanning one opens its page. */
export function LabelsPage() {
  const [params, setParams] = useSearchParams();
  const points = useQuery(rigQueries.points());
  const gear = useQuery(rigQueries.gearList());
  const pointIds = ids(params.get('point'));
  const gearIds = ids(params.get('gear'));
  const picked = pointIds.size > 0 || gearIds.size > 0;
  const which = (params.get('which') as Which | null) ?? 'all';

  const items = useMemo<LabelItem[]>(() => {
    if (!points.data || !gear.data) return [];
    const pointItems = points.data
      .filter((p) => (picked ? pointIds.has(p.id) : which !== 'gear'))
      .sort((a, b) => a.roomName.localeCompare(b.roomName) || a.label.localeCompare(b.label, undefined, { numeric: true }))
      .map((p) => ({ key: `p${p.id}`, title: p.label, subtitle: `Rigging point · ${p.roomName}`, path: paths.point(p.id) }));
    const gearItems = gear.data
      .filter((g) => (picked ? gearIds.has(g.id) : which !== 'points' && g.status !== 'retired'))
      .sort((a, b) => a.serial.localeCompare(b.serial, undefined, { numeric: true }))
      .map((g) => ({ key: `g${g.id}`, title: g.serial, subtitle: `${gearKindLabels[g.kind]}${g.maker ? ` · ${g.maker}` : ''}`, path: paths.gearItem(g.id) }));
    return [...pointItems, ...gearItems];
    // The id sets are rebuilt from the address each render; their text is the real dependency.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [points.data, gear.data, params.toString(), which, picked]);

  const failed = points.error ?? gear.error;
  return (
    <div className="max-w-5xl">
      <div className="no-print">
        <BackLink to={paths.rig}>Rig</BackLink>
        <PageHeader title="Labels" actions={<Button onClick={() => window.print()} disabled={items.length === 0}><Printer className="size-4" aria-hidden /> Print</Button>}>
          One label per point and gear item. Scanning a label opens its page, with its status now.
        </PageHeader>
        {picked ? (
          <p className="mb-4 text-sm text-muted">
            Showing only the labels asked for. <button type="button" className="min-h-11 font-medium text-pine-700 underline" onClick={() => setParams(new URLSearchParams())}>Show all labels</button>
          </p>
        ) : (
          <div className="mb-4">
            <ChoiceGroup<Which>
              legend="Labels to print"
              value={which}
              options={[{ value: 'all', label: 'Points and gear' }, { value: 'points', label: 'Points only' }, { value: 'gear', label: 'Gear only' }]}
              onChange={(v) => setParams(v === 'all' ? new URLSearchParams() : new URLSearchParams({ which: v }), { replace: true })}
            />
            <p className="mt-1 text-xs text-muted">Retired gear is left out.</p>
          </div>
        )}
      </div>
      {failed ? <ErrorState error={failed} retry={() => { void points.refetch(); void gear.refetch(); }} /> : !points.data || !gear.data ? <Loading label="Loading points and gear…" /> : items.length === 0 ? (
        <EmptyState title="No labels to print">Add points and gear first, or show all labels.</EmptyState>
      ) : (
        <ul aria-label="Labels" className="grid gap-4 sm:grid-cols-2 print:grid-cols-2 print:gap-3">
          {items.map((item) => <QrLabel key={item.key} item={item} />)}
        </ul>
      )}
    </div>
  );
}
