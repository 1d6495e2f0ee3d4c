import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { ConfirmDialog } from '../../../components/ui/confirm';
import { toast } from 'sonner';
import { createPointSchema, updatePointSchema, type CreatePoint, type Point, type Room, type UpdatePoint } from '../../../../shared/schemas/rig';
import { apparatusKinds, structures, type ApparatusKind, type ForceUnit, type Structure } from '../../../../shared/schemas/vocabulary';
import { Button } from '../../../components/ui/button';
import { CheckboxField, SelectField, TextAreaField, TextField } from '../../../components/ui/field';
import { Card } from '../../../components/ui/states';
import { errorMessage } from '../../../lib/api-client';
import { useRigMutations } from '../api';
import { apparatusLabel, structureLabels } from '../format';
import { applyServerErrors, numberOrNull, preparedResolver } from '../form-helpers';
import { ForceField, ForceUnitToggle, useForceUnits } from './force-field';
import { useStudioFormat } from '../use-studio-format';

// Field names match the schema's, so its messages (and the server's) land next to the right field.
interface PointFormValues {
  roomId: string;
  label: string;
  structure: Structure;
  structuralRatingKn: string;
  apparatus: ApparatusKind[];
  maxPerformers: string;
  inService: boolean;
  notes: string;
}

function prepare(v: PointFormValues, ratingKn: (text: string) => number | null) {
  return {
    roomId: numberOrNull(v.roomId) ?? undefined,
    label: v.label,
    structure: v.structure,
    structuralRatingKn: ratingKn(v.structuralRatingKn) ?? undefined,
    apparatus: Array.isArray(v.apparatus) ? v.apparatus : v.apparatus ? [v.apparatus] : [],
    maxPerformers: numberOrNull(v.maxPerformers) ?? undefined,
    inService: v.inService,
    notes: v.notes,
  };
}

/** Adds a point (`point` absent) or edits one. The structural rating is the engineer's allowable load for the point. */
export function PointForm({ rooms, roomId, point, onDone }: { rooms: Room[]; roomId?: number; point?: Point; onDone: () => void }) {
  const { createPoint, updatePoint } = useRigMutations();
  const { fmt } = useStudioFormat();
  // The rating opens in the studio's display unit; switching the unit converts the figure.
  const forces = useForceUnits<'structuralRatingKn'>(fmt?.unit ?? 'kN', { structuralRatingKn: point?.structuralRatingKn });
  const { unit } = forces;
  const ratingKn = (text: string | undefined) => forces.knOf('structuralRatingKn', text);
  const editing = point !== undefined;
  const form = useForm<PointFormValues, unknown, CreatePoint | UpdatePoint>({
    resolver: preparedResolver<PointFormValues, CreatePoint | UpdatePoint>(editing ? updatePointSchema : createPointSchema, (v) => prepare(v, ratingKn)),
    defaultValues: {
      roomId: String(point?.roomId ?? roomId ?? rooms[0]?.id ?? ''),
      label: point?.label ?? '',
      structure: point?.structure ?? 'beam',
      structuralRatingKn: forces.initialTexts.structuralRatingKn,
      apparatus: point?.apparatus ?? [],
      maxPerformers: String(point?.maxPerformers ?? 1),
      inService: point?.inService ?? true,
      notes: point?.notes ?? '',
    },
  });
  const e = form.formState.errors;
  const busy = createPoint.isPending || updatePoint.isPending;
  const onError = (err: unknown) => {
    applyServerErrors(form.setError, err);
    toast.error(errorMessage(err));
  };
  const [pending, setPending] = useState<UpdatePoint | null>(null);
  const clearanceInForce = editing && point.lastClearedAt !== null && point.clearanceVoidedAt === null;
  const saveEdit = (patch: UpdatePoint) => {
    if (!editing) return;
    updatePoint.mutate({ id: point.id, ...patch }, { onSuccess: () => { setPending(null); toast.success(`Point ${point.label} saved.`); onDone(); }, onError: (err) => { setPending(null); onError(err); } });
  };
  const submit = form.handleSubmit((body) => {
    if (editing) {
      const patch: UpdatePoint = { ...body };
      // An unchanged rating is not sent: a change voids the clearance, so it is confirmed first while one is in force.
      if (patch.structuralRatingKn === point.structuralRatingKn) delete patch.structuralRatingKn;
      if (patch.structuralRatingKn !== undefined && clearanceInForce) setPending(patch);
      else saveEdit(patch);
    } else {
      createPoint.mutate(body as CreatePoint, { onSuccess: (p) => { toast.success(`Point ${p.label} added. Give it a load path next.`); onDone(); }, onError });
    }
  });
  const title = editing ? `Edit point ${point.label}` : 'Add a point';
  return (
    <Card className="mb-6">
      <h2 className="mb-4 font-semibold">{title}</h2>
      <form onSubmit={submit} noValidate className="grid gap-4 sm:grid-cols-2" aria-label={title}>
        <SelectField label="Room" error={e.roomId?.message} {...form.register('roomId')}>
          {rooms.map((r) => <option key={r.id} value={r.id}>{r.name}</option>)}
        </SelectField>
        <TextField label="Label" hint="As written on the point, e.g. B-2" autoComplete="off" error={e.label?.message} {...form.register('label')} />
        <SelectField label="Structure" error={e.structure?.message} {...form.register('structure')}>
          {structures.map((s) => <option key={s} value={s}>{structureLabels[s]}</option>)}
        </SelectField>
        <TextField label="Most performers at once" type="number" inputMode="numeric" min={1} max={10} error={e.maxPerformers?.message} {...form.register('maxPerformers')} />
        <div className="space-y-3 sm:col-span-2">
          <ForceUnitToggle unit={unit} onChange={(next) => forces.switchTo(next, () => form.getValues('structuralRatingKn'), (_, text) => form.setValue('structuralRatingKn', text, { shouldDirty: true }))} />
          <ForceField
            label="Structural rating"
            unit={unit}
            typed={form.watch('structuralRatingKn')}
            kn={ratingKn(form.watch('structuralRatingKn'))}
            optionalHint="The allowable load from the engineer’s assessment of the point — a working figure, not a breaking strength."
            error={e.structuralRatingKn?.message}
            {...form.register('structuralRatingKn')}
          />
          {editing ? <p className="text-sm text-muted">Changing the structural rating voids the point’s clearance until a rigger re-inspects it.</p> : null}
        </div>
        <fieldset className="sm:col-span-2" aria-describedby={e.apparatus ? 'apparatus-error' : undefined}>
          <legend className="text-sm font-medium">Apparatus allowed on this point</legend>
          <div className="mt-1 grid grid-cols-2 gap-x-4 sm:grid-cols-3">
            {apparatusKinds.map((k) => <CheckboxField key={k} label={apparatusLabel(k)} value={k} {...form.register('apparatus')} />)}
          </div>
          {e.apparatus ? <p id="apparatus-error" role="alert" className="text-sm text-stop-700">{e.apparatus.message}</p> : null}
        </fieldset>
        {editing ? (
          <CheckboxField className="sm:col-span-2" label="In service" hint="Out of service blocks the point, whatever its clearance." {...form.register('inService')} />
        ) : null}
        <div className="sm:col-span-2">
          <TextAreaField label="Notes (optional)" error={e.notes?.message} {...form.register('notes')} />
        </div>
        <div className="flex gap-2 sm:col-span-2">
          <Button type="submit" busy={busy}>{editing ? 'Save point' : 'Add point'}</Button>
          <Button type="button" variant="secondary" onClick={onDone}>Cancel</Button>
        </div>
      </form>
      {editing ? (
        <ConfirmDialog
          open={pending !== null}
          title={`Void the clearance of point ${point.label}?`}
          confirmLabel="Save and void the clearance"
          busy={updatePoint.isPending}
          onCancel={() => setPending(null)}
          onConfirm={() => pending && saveEdit(pending)}
        >
          <p>The structural rating goes from {fmt?.force(point.structuralRatingKn) ?? `${point.structuralRatingKn} kN`} to {pending?.structuralRatingKn !== undefined ? fmt?.force(pending.structuralRatingKn) ?? `${pending.structuralRatingKn} kN` : 'a new figure'}. That changes what the clearance{point.status.clearedUntil ? ` (cleared until ${fmt?.when(point.status.clearedUntil) ?? point.status.clearedUntil})` : ''} vouched for.</p>
          <p className="mt-2">Once saved, the point is blocked and no class can be booked on it until a rigger inspects it and clears it again.</p>
        </ConfirmDialog>
      ) : null}
    </Card>
  );
}
