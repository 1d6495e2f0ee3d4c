import { useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { Link } from 'react-router-dom';
import { Clock, ShieldAlert } from 'lucide-react';
import { gearKindLabels } from '../../../../shared/rigging/strength';
import { Button } from '../../../components/ui/button';
import { ErrorState, Loading } from '../../../components/ui/states';
import { formatInZone } from '../../../components/ui/zoned-time';
import { paths } from '../../../lib/paths';
import { inspectionQueries } from '../api';
import { GearInspectionForm } from './gear-inspection-form';

/** Gear to look at on its own: quarantined items, and items whose own inspection runs out within the warning window. */
export function GearToInspect({ days, timeZone, canInspect }: { days: number; timeZone: string; canInspect: boolean }) {
  const gear = useQuery(inspectionQueries.gearDue(days));
  const [open, setOpen] = useState<number | null>(null);
  if (gear.isPending) return <Loading label="Loading gear…" />;
  if (gear.isError) return <ErrorState error={gear.error} retry={() => gear.refetch()} />;
  if (gear.data.length === 0) return <p className="text-sm text-muted">No gear is quarantined or due for its own inspection in the next {days} days.</p>;
  return (
    <ul className="space-y-2">
      {gear.data.map((g) => (
        <li key={g.id} className="rounded-lg border border-line bg-white p-3">
          <div className="flex flex-wrap items-center justify-between gap-2">
            <div>
              <Link to={paths.gearItem(g.id)} className="font-semibold text-pine-700 hover:underline">{gearKindLabels[g.kind]} {g.serial}</Link>
              <p className={`flex items-center gap-1.5 text-sm ${g.status === 'quarantined' ? 'text-stop-700' : 'text-warn-700'}`}>
                {g.status === 'quarantined' ? <><ShieldAlert className="size-4" aria-hidden /> Quarantined{g.statusReason ? `: ${g.statusReason}` : ''}</> : <><Clock className="size-4" aria-hidden /> {!g.inspectedUntil ? 'Never inspected' : Date.parse(g.inspectedUntil) <= Date.now() ? `Own inspection ran out on ${formatInZone(g.inspectedUntil, timeZone)}` : `Own inspection due by ${formatInZone(g.inspectedUntil, timeZone)}`}</>}
              </p>
              <p className="text-xs text-muted">{g.pointLabel ? `On point ${g.pointLabel}` : 'In stock'}</p>
            </div>
            {canInspect && open !== g.id ? <Button variant="secondary" onClick={() => setOpen(g.id)}>Inspect<span className="sr-only"> {g.serial}</span></Button> : null}
          </div>
          {open === g.id ? (
            <div className="mt-3 border-t border-line pt-3">
              <GearInspectionForm gear={g} onDone={() => setOpen(null)} />
              <Button variant="ghost" className="mt-2" onClick={() => setOpen(null)}>Cancel</Button>
            </div>
          ) : null}
        </li>
      ))}
    </ul>
  );
}
