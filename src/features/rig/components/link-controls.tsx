import { useId, useState } from 'react';
import { ArrowDown, ArrowUp, Replace, Trash2 } from 'lucide-react';
import { describeGear, gearKindLabels } from '../../../../shared/rigging';
import type { Gear } from '../../../../shared/schemas/rig';
import { loadingModes, type BridleLeg, type LoadingMode } from '../../../../shared/schemas/vocabulary';
import { Button } from '../../../components/ui/button';
import { CheckboxField, SelectField, TextField } from '../../../components/ui/field';
import { modeLabels } from '../format';
import type { LinkShape } from './link-card';

export interface DraftLink extends LinkShape {
  /** Stable across moves and swaps, so focus and React keys follow the link. */
  key: string;
  /** The included angle as typed; read into includedAngleDeg for the preview and the save. */
  angleText: string;
}

export type LinkPatch = Partial<Pick<DraftLink, 'mode' | 'threeWay' | 'basketOverHalf' | 'leg' | 'angleText'>>;

/** An editor's controls for one link: how it is loaded, its place in the chain, swap and remove. */
export function LinkControls({
  link,
  index,
  count,
  pool,
  angleError,
  bridleMeeting = false,
  onChange,
  onMove,
  onSwap,
  onRemove,
}: {
  link: DraftLink;
  index: number;
  count: number;
  pool: Gear[];
  angleError?: string;
  /** The link a bridle's legs meet in: three-way by construction (PRODUCT.md §4.2), shown set and locked. */
  bridleMeeting?: boolean;
  onChange: (patch: LinkPatch) => void;
  onMove: (dir: -1 | 1) => void;
  onSwap: (gear: Gear) => void;
  onRemove: () => void;
}) {
  const name = describeGear(link.gear);
  const [swapId, setSwapId] = useState('');
  const swapFieldId = useId();
  // Only an item of the same kind takes a link's place: a beam clamp is never swapped for a carabiner or a fabric.
  const candidates = pool.filter((g) => g.kind === link.gear.kind);
  const swapFor = candidates.find((g) => String(g.id) === swapId);
  const kindWord = (gearKindLabels[link.gear.kind] ?? link.gear.kind).toLowerCase();
  return (
    <div className="space-y-3">
      <div className="grid gap-3 sm:grid-cols-3">
        <SelectField label="Loaded along" value={link.mode} onChange={(e) => onChange({ mode: e.target.value as LoadingMode })}>
          {loadingModes.map((m) => <option key={m} value={m}>{modeLabels[m]}</option>)}
        </SelectField>
        <SelectField label="Bridle leg" value={link.leg ?? ''} onChange={(e) => onChange({ leg: (e.target.value || null) as BridleLeg | null })}>
          <option value="">Not a bridle leg</option>
          <option value="a">Leg a</option>
          <option value="b">Leg b</option>
        </SelectField>
        <TextField
          label="Included angle (°)"
          inputMode="decimal"
          disabled={!link.leg}
          value={link.angleText}
          hint={link.leg ? 'The angle between the two legs; every leg link carries the same one.' : 'For bridle legs only.'}
          error={angleError}
          onChange={(e) => onChange({ angleText: e.target.value })}
        />
      </div>
      <div className="flex flex-wrap gap-x-6">
        {bridleMeeting ? (
          <CheckboxField
            label="Takes a three-way load"
            checked
            disabled
            hint="The bridle legs meet in this link, so it takes three strands whatever is ticked: use a tri or delta screw link, or a swivel base, rated for it."
          />
        ) : (
          <CheckboxField label="Takes a three-way load" checked={link.threeWay} onChange={(e) => onChange({ threeWay: e.target.checked })} />
        )}
        <CheckboxField label="Wide material fills the basket past half" checked={link.basketOverHalf} onChange={(e) => onChange({ basketOverHalf: e.target.checked })} />
      </div>
      <div className="flex flex-wrap items-end gap-2">
        <Button type="button" variant="secondary" data-move={`${link.key}:-1`} disabled={index === 0} onClick={() => onMove(-1)} aria-label={`Move ${name} up`}>
          <ArrowUp className="size-4" aria-hidden /> Up
        </Button>
        <Button type="button" variant="secondary" data-move={`${link.key}:1`} disabled={index === count - 1} onClick={() => onMove(1)} aria-label={`Move ${name} down`}>
          <ArrowDown className="size-4" aria-hidden /> Down
        </Button>
        <div className="flex items-end gap-2">
          <div className="w-56">
            <SelectField id={swapFieldId} label={`Swap ${name} for`} value={swapId} onChange={(e) => setSwapId(e.target.value)} disabled={candidates.length === 0}>
              <option value="">{candidates.length === 0 ? `No spare ${kindWord} in service` : `Pick a spare ${kindWord}`}</option>
              {candidates.map((g) => <option key={g.id} value={g.id}>{describeGear(g)}</option>)}
            </SelectField>
          </div>
          <Button type="button" variant="secondary" disabled={!swapFor} onClick={() => { if (swapFor) { onSwap(swapFor); setSwapId(''); } }}>
            <Replace className="size-4" aria-hidden /> Swap
          </Button>
        </div>
        <Button type="button" variant="ghost" onClick={onRemove} aria-label={`Remove ${name} from the path`}>
          <Trash2 className="size-4" aria-hidden /> Remove
        </Button>
      </div>
    </div>
  );
}
