import { useId, useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { toast } from 'sonner';
import { ArrowDownToLine } from 'lucide-react';
import { describeGear } from '../../../../shared/rigging';
import type { Point } from '../../../../shared/schemas/rig';
import { isApparatusKind } from '../../../../shared/schemas/vocabulary';
import { Button } from '../../../components/ui/button';
import { SelectField } from '../../../components/ui/field';
import { ErrorState } from '../../../components/ui/states';
import { errorMessage } from '../../../lib/api-client';
import { rigQueries, useMountApparatus } from '../api';

/**
 * A changeover from the point page (PRODUCT.md §4.7): hang another apparatus of a kind the point
 * allows. Only the apparatus changes, so the clearance stands; the server refuses an item that is
 * not fit to hang (quarantined, not inspected, with an open fault, past its service life).
 */
export function MountApparatus({ point }: { point: Point }) {
  const gear = useQuery(rigQueries.gearList({ status: 'in_service' }));
  const mount = useMountApparatus();
  const [gearId, setGearId] = useState('');
  const [error, setError] = useState<string | null>(null);
  const fieldId = useId();
  const mounted = (point.links ?? []).map((l) => l.gear).find((g) => isApparatusKind(g.kind)) ?? null;
  const choices = (gear.data ?? [])
    .filter((g) => isApparatusKind(g.kind) && point.apparatus.includes(g.kind as never) && g.id !== mounted?.id)
    .sort((a, b) => describeGear(a).localeCompare(describeGear(b), undefined, { numeric: true }));
  const chosen = choices.find((g) => String(g.id) === gearId);
  const submit = () => {
    if (!chosen) return;
    setError(null);
    mount.mutate(
      { pointId: point.id, gearId: chosen.id },
      {
        onSuccess: (res) => {
          toast.success(`${describeGear(chosen)} mounted on ${point.label}${res.movedFrom ? `, taken down from ${res.movedFrom}` : ''}. The clearance stands.`);
          setGearId('');
        },
        onError: (err) => setError(errorMessage(err)),
      },
    );
  };
  return (
    <section aria-labelledby={`${fieldId}-h`} className="space-y-3 border-t border-line pt-4">
      <div>
        <h3 id={`${fieldId}-h`} className="font-semibold">Mount an apparatus</h3>
        <p className="text-sm text-muted">
          {mounted ? `Mounted now: ${describeGear(mounted)}.` : 'No apparatus is mounted.'} Swapping only the apparatus voids no clearance: it carries its own inspection.
        </p>
      </div>
      {gear.isError ? <ErrorState error={gear.error} retry={() => gear.refetch()} /> : (
        <div className="flex flex-wrap items-end gap-2">
          <div className="w-72">
            <SelectField id={fieldId} label="Apparatus to mount" value={gearId} error={error ?? undefined} disabled={gear.isPending} onChange={(e) => { setGearId(e.target.value); setError(null); }}>
              <option value="">{gear.isPending ? 'Loading apparatus…' : choices.length ? 'Pick an apparatus' : 'No other apparatus of an allowed kind'}</option>
              {choices.map((g) => <option key={g.id} value={g.id}>{describeGear(g)}{g.pointLabel ? ` (on ${g.pointLabel})` : ''}</option>)}
            </SelectField>
          </div>
          <Button type="button" variant="secondary" busy={mount.isPending} disabled={!chosen} onClick={submit}><ArrowDownToLine className="size-4" aria-hidden /> Mount</Button>
        </div>
      )}
    </section>
  );
}
