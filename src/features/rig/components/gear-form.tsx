import { useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { useForm } from 'react-hook-form';
import { gearRatingChangeVoids } from '../../../../shared/clearance/voiding';
import { ConfirmDialog } from '../../../components/ui/confirm';
import { toast } from 'sonner';
import { gearKindLabels } from '../../../../shared/rigging';
import { createGearSchema, updateGearSchema, type CreateGear, type Gear, type UpdateGear } from '../../../../shared/schemas/rig';
import { gates, gearKinds, materials, type ForceUnit, type Gate, type GearKind, type Material } from '../../../../shared/schemas/vocabulary';
import { Button } from '../../../components/ui/button';
import { CheckboxField, SelectField, TextAreaField, TextField } from '../../../components/ui/field';
import { Card } from '../../../components/ui/states';
import { errorMessage } from '../../../lib/api-client';
import { rigQueries, useRigMutations } from '../api';
import { gateLabels, materialLabels } from '../format';
import { applyServerErrors, numberOrNull, preparedResolver, textOrNull } from '../form-helpers';
import { ForceField, ForceUnitToggle, useForceUnits } from './force-field';
import { useStudioFormat } from '../use-studio-format';

// Names match the schema's so its messages land next to the right field; figures stay as typed.
interface GearFormValues {
  kind: GearKind;
  material: Material;
  gate: Gate;
  majorKn: string;
  minorKn: string;
  gateOpenKn: string;
  wllKn: string;
  multiDirectional: boolean;
  serial: string;
  maker: string;
  model: string;
  manufacturedOn: string;
  inServiceOn: string;
  serviceLifeYears: string;
  notes: string;
}
type RatingName = 'majorKn' | 'minorKn' | 'gateOpenKn' | 'wllKn';

function prepare(v: GearFormValues, kn: (name: RatingName, text: string) => number | null) {
  return {
    kind: v.kind,
    material: v.material,
    gate: v.gate,
    majorKn: kn('majorKn', v.majorKn) ?? undefined,
    minorKn: kn('minorKn', v.minorKn),
    gateOpenKn: kn('gateOpenKn', v.gateOpenKn),
    wllKn: kn('wllKn', v.wllKn),
    multiDirectional: v.multiDirectional,
    serial: v.serial,
    maker: textOrNull(v.maker),
    model: textOrNull(v.model),
    manufacturedOn: textOrNull(v.manufacturedOn),
    inServiceOn: textOrNull(v.inServiceOn),
    serviceLifeYears: numberOrNull(v.serviceLifeYears),
    notes: textOrNull(v.notes),
  };
}

const RATINGS: RatingName[] = ['majorKn', 'minorKn', 'gateOpenKn', 'wllKn'];

/** Adds a gear item (`gear` absent) or edits one. Ratings are typed from the marking, in kN, lbf or kgf, and stored in kN. */
export function GearForm({ gear, kind, onDone }: { gear?: Gear; /** The kind a new item starts as (a fault's "add one" link names it). */ kind?: GearKind; onDone: (created?: { id: number; serial: string }) => void }) {
  const { createGear, updateGear } = useRigMutations();
  const { fmt } = useStudioFormat();
  // Ratings open in the studio's display unit; the rigger may switch to the unit of the marking.
  const forces = useForceUnits<RatingName>(fmt?.unit ?? 'kN', { majorKn: gear?.majorKn, minorKn: gear?.minorKn, gateOpenKn: gear?.gateOpenKn, wllKn: gear?.wllKn });
  const { unit, knOf } = forces;
  const editing = gear !== undefined;
  const form = useForm<GearFormValues, unknown, CreateGear | UpdateGear>({
    resolver: preparedResolver<GearFormValues, CreateGear | UpdateGear>(editing ? updateGearSchema : createGearSchema, (v) => prepare(v, knOf)),
    defaultValues: {
      kind: gear?.kind ?? kind ?? 'carabiner',
      material: gear?.material ?? 'steel',
      gate: gear?.gate ?? 'screw',
      ...forces.initialTexts,
      multiDirectional: gear?.multiDirectional ?? false,
      serial: gear?.serial ?? '',
      maker: gear?.maker ?? '',
      model: gear?.model ?? '',
      manufacturedOn: gear?.manufacturedOn ?? '',
      inServiceOn: gear?.inServiceOn ?? '',
      serviceLifeYears: gear?.serviceLifeYears == null ? '' : String(gear.serviceLifeYears),
      notes: gear?.notes ?? '',
    },
  });
  const e = form.formState.errors;
  const onError = (err: unknown) => { applyServerErrors(form.setError, err); toast.error(errorMessage(err)); };
  // The point holding the item: a rating change voids its clearance, so the save asks first while one is in force.
  const holder = useQuery({ ...rigQueries.point(gear?.pointId ?? 0), enabled: editing && gear.pointId !== null });
  const [pending, setPending] = useState<UpdateGear | null>(null);
  const saveEdit = (patch: UpdateGear) => {
    if (!editing) return;
    updateGear.mutate({ id: gear.id, ...patch }, { onSuccess: () => { setPending(null); toast.success(`${gear.serial} saved.`); onDone(); }, onError: (err) => { setPending(null); onError(err); } });
  };
  const voidsHolder = (patch: UpdateGear) => {
    if (!editing || gear.pointId === null) return false;
    const after = { ...gear, ...Object.fromEntries(Object.entries(patch).filter(([, v]) => v !== undefined)) } as Gear;
    if (!gearRatingChangeVoids(gear, after)) return false;
    const p = holder.data;
    // Unknown yet: ask rather than void unasked.
    return !p || (p.lastClearedAt !== null && p.clearanceVoidedAt === null);
  };
  const submit = form.handleSubmit((body) => {
    if (editing) {
      // Send only the ratings that changed: a rating change voids the clearance of the point holding the item.
      const patch: UpdateGear = { ...body };
      for (const r of RATINGS) if ((patch[r] ?? null) === (gear[r] ?? null)) delete patch[r];
      if (voidsHolder(patch)) setPending(patch);
      else saveEdit(patch);
    } else createGear.mutate(body as CreateGear, { onSuccess: (g) => { toast.success(`${g.serial} added. It needs an inspection before use.`); onDone(g); }, onError });
  });
  const rating = (name: RatingName, label: string, optionalHint?: string) => (
    <ForceField label={label} unit={unit} typed={form.watch(name)} kn={knOf(name, form.watch(name))} optionalHint={optionalHint} error={e[name]?.message} {...form.register(name)} />
  );
  const title = editing ? `Edit ${gear.serial}` : 'Add a gear item';
  return (
    <Card className="mb-6">
      <h2 className="mb-4 font-semibold">{title}</h2>
      <form onSubmit={submit} noValidate className="space-y-5" aria-label={title}>
        <div className="grid gap-4 sm:grid-cols-3">
          <SelectField label="Kind" error={e.kind?.message} {...form.register('kind')}>
            {gearKinds.map((k) => <option key={k} value={k}>{gearKindLabels[k]}</option>)}
          </SelectField>
          <SelectField label="Material" error={e.material?.message} {...form.register('material')}>
            {materials.map((m) => <option key={m} value={m}>{materialLabels[m]}</option>)}
          </SelectField>
          <SelectField label="Gate" error={e.gate?.message} {...form.register('gate')}>
            {gates.map((g) => <option key={g} value={g}>{gateLabels[g]}</option>)}
          </SelectField>
          <TextField label="Serial or lot number" autoComplete="off" error={e.serial?.message} {...form.register('serial')} />
          <TextField label="Maker (optional)" autoComplete="off" error={e.maker?.message} {...form.register('maker')} />
          <TextField label="Model (optional)" autoComplete="off" error={e.model?.message} {...form.register('model')} />
        </div>
        <fieldset className="space-y-3">
          <legend className="font-medium">Ratings, as marked on the item</legend>
          <ForceUnitToggle unit={unit} onChange={(next) => forces.switchTo(next, (n) => form.getValues(n), (n, text) => form.setValue(n, text, { shouldDirty: true }))} />
          <div className="grid gap-4 sm:grid-cols-2">
            {rating('majorKn', 'Breaking strength, major axis')}
            {rating('minorKn', 'Minor axis (optional)', 'Left empty, a cross-loaded link counts at 30 % of the major rating.')}
            {rating('gateOpenKn', 'Gate open (optional)', 'Left empty, a link loaded gate open fails the check.')}
            {rating('wllKn', 'Working load limit (optional)', 'Only where the maker rates the item this way.')}
          </div>
          <CheckboxField label="Rated multi-directional (may take a three-way load)" {...form.register('multiDirectional')} />
          {editing && gear.pointId ? <p className="text-sm text-muted">This item is in the load path of point {gear.pointLabel}. Changing its ratings voids that point’s clearance unless it is the mounted apparatus.</p> : null}
        </fieldset>
        <div className="grid gap-4 sm:grid-cols-3">
          <TextField label="Manufactured on (optional)" type="date" error={e.manufacturedOn?.message} {...form.register('manufacturedOn')} />
          <TextField label="In service since (optional)" type="date" error={e.inServiceOn?.message} {...form.register('inServiceOn')} />
          <TextField label="Service life in years (optional)" inputMode="decimal" hint="From the maker; counted from manufacture, else from first use." error={e.serviceLifeYears?.message} {...form.register('serviceLifeYears')} />
        </div>
        <TextAreaField label="Notes (optional)" error={e.notes?.message} {...form.register('notes')} />
        <div className="flex gap-2">
          <Button type="submit" busy={createGear.isPending || updateGear.isPending}>{editing ? 'Save item' : 'Add item'}</Button>
          <Button type="button" variant="secondary" onClick={() => onDone()}>Cancel</Button>
        </div>
      </form>
      {editing ? (
        <ConfirmDialog
          open={pending !== null}
          title={`Void the clearance of point ${gear.pointLabel ?? gear.pointId}?`}
          confirmLabel="Save and void the clearance"
          busy={updateGear.isPending}
          onCancel={() => setPending(null)}
          onConfirm={() => pending && saveEdit(pending)}
        >
          <p>{gear.serial} is a fixed link in the load path of point {gear.pointLabel ?? gear.pointId}. New ratings change what its clearance vouched for{holder.data?.status.clearedUntil ? ` (cleared until ${fmt?.when(holder.data.status.clearedUntil) ?? holder.data.status.clearedUntil})` : ''}.</p>
          <p className="mt-2">Once saved, the point is blocked and no class can be booked on it until a rigger inspects it and clears it again.</p>
        </ConfirmDialog>
      ) : null}
    </Card>
  );
}
