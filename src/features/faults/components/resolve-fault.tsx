import { useMemo, useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { Link } from 'react-router-dom';
import { paths } from '../../../lib/paths';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { z } from 'zod';
import { toast } from 'sonner';
import { resolveFaultSchema, type Fault, type ResolveFault as ResolveBody } from '../../../../shared/schemas/safety';
import { faultResolutions, type FaultResolution } from '../../../../shared/schemas/vocabulary';
import { Button } from '../../../components/ui/button';
import { ConfirmDialog } from '../../../components/ui/confirm';
import { SelectField, TextAreaField } from '../../../components/ui/field';
import { ApiError, errorMessage } from '../../../lib/api-client';
import { faultQueries, useResolveFault } from '../api';
import { faultSubject, gearKindWord, resolutionText } from '../labels';

const formSchema = z.object({
  resolution: z.enum(faultResolutions, { message: 'Pick what was done' }),
  note: resolveFaultSchema.shape.note,
  replacementGearId: z.string(),
  oldGearStatus: z.enum(['quarantined', 'retired']),
});
type FormValues = z.input<typeof formSchema>;

/** Where the faulted item hangs, taken before resolving (a replacement moves it out of the path). */
export interface FaultHolder { pointId: number | null; pointLabel: string | null }

/** A rigger's resolution of an open fault, confirmed before it is recorded. */
export function ResolveFault({ fault, onCancel, onResolved }: { fault: Fault; onCancel: () => void; onResolved: (f: Fault, holder: FaultHolder) => void }) {
  const onGear = fault.gearId !== null;
  const gear = useQuery({ ...faultQueries.gear(fault.gearId ?? 0), enabled: onGear });
  const resolve = useResolveFault();
  const [pending, setPending] = useState<ResolveBody | null>(null);
  const [formError, setFormError] = useState<string | null>(null);
  const schema = useMemo(
    () => formSchema.superRefine((v, ctx) => { if (onGear && v.resolution === 'replaced' && !v.replacementGearId) ctx.addIssue({ code: 'custom', path: ['replacementGearId'], message: 'Pick the stock item that takes its place' }); }),
    [onGear],
  );
  const form = useForm<FormValues>({ resolver: zodResolver(schema), defaultValues: { resolution: undefined, note: '', replacementGearId: '', oldGearStatus: 'quarantined' } });
  const resolution = form.watch('resolution') as FaultResolution | undefined;
  const replacing = onGear && resolution === 'replaced';
  const stock = useQuery({ ...faultQueries.stock(gear.data?.kind ?? 'carabiner'), enabled: replacing && !!gear.data });
  // The faulted item itself may be in stock: it never replaces itself.
  const stockItems = stock.data?.filter((g) => g.id !== fault.gearId);
  const e = form.formState.errors;
  const choices = onGear ? faultResolutions : faultResolutions.filter((r) => r !== 'retired');
  const holder: FaultHolder = onGear ? { pointId: gear.data?.pointId ?? null, pointLabel: gear.data?.pointLabel ?? null } : { pointId: fault.pointId, pointLabel: fault.pointLabel };

  const review = form.handleSubmit((v) => {
    setFormError(null);
    setPending({
      resolution: v.resolution!,
      note: v.note,
      ...(replacing ? { replacementGearId: Number(v.replacementGearId), oldGearStatus: v.oldGearStatus } : {}),
    });
  });
  const confirm = () => {
    if (!pending) return;
    resolve.mutate({ id: fault.id, ...pending }, {
      onSuccess: (f) => {
        setPending(null);
        toast.success(`Fault #${f.id} resolved. The point waits for a rigger’s clearance.`);
        onResolved(f, holder);
      },
      onError: (err) => {
        setPending(null);
        if (err instanceof ApiError) for (const [k, msg] of Object.entries(err.fields)) if (k in formSchema.shape) form.setError(k as keyof FormValues, { message: msg });
        setFormError(errorMessage(err));
      },
    });
  };
  const replacement = stockItems?.find((g) => String(g.id) === form.watch('replacementGearId'));
  const oldStatus = form.watch('oldGearStatus');

  return (
    <>
      <form onSubmit={review} noValidate className="space-y-4 rounded-lg border border-pine-600 bg-pine-50 p-4" aria-label={`Resolve fault #${fault.id}`}>
        <fieldset className="space-y-2">
          <legend className="text-sm font-medium">What was done?</legend>
          <div className="grid gap-2 sm:grid-cols-2">
            {choices.map((r) => (
              <label key={r} className="flex min-h-11 cursor-pointer items-start gap-3 rounded-lg border-2 border-line bg-white p-3 has-[:checked]:border-pine-700 has-[:focus-visible]:outline has-[:focus-visible]:outline-3 has-[:focus-visible]:outline-brass-500">
                <input type="radio" value={r} className="mt-1 size-5 accent-pine-700" {...form.register('resolution')} />
                <span><span className="block font-medium">{resolutionText[r].label}</span><span className="block text-xs text-muted">{!onGear && r === 'replaced' ? 'A part was replaced. If it was a link, record the change in the load path on the Rig page.' : resolutionText[r].explain}</span></span>
              </label>
            ))}
          </div>
          {e.resolution ? <p role="alert" className="text-sm text-stop-700">{e.resolution.message}</p> : null}
        </fieldset>
        {replacing ? (
          <div className="space-y-3 rounded-lg bg-white p-3">
            <SelectField
              label={`Replacement ${gearKindWord(gear.data?.kind).toLowerCase()} from stock`}
              error={e.replacementGearId?.message ?? (stock.isError ? errorMessage(stock.error) : undefined)}
              hint={stockItems && stockItems.length === 0 ? (
                <>No {gearKindWord(gear.data?.kind).toLowerCase()} is in stock and in service. <Link to={`${paths.gear}?add=${gear.data?.kind ?? ''}`} className="font-medium text-pine-700 underline underline-offset-2">Add one on the gear page</Link>, then come back to resolve this fault.</>
              ) : 'Only items in service and not hung on any point are listed.'}
              {...form.register('replacementGearId')}
            >
              <option value="">{stock.isPending ? 'Loading stock…' : 'Pick the replacement'}</option>
              {stockItems?.map((g) => <option key={g.id} value={String(g.id)}>{g.serial}{g.maker ? ` — ${g.maker}${g.model ? ` ${g.model}` : ''}` : ''}</option>)}
            </SelectField>
            <fieldset className="space-y-1">
              <legend className="text-sm font-medium">What becomes of the old {gear.data?.serial ?? 'item'}?</legend>
              <label className="flex min-h-11 items-center gap-3"><input type="radio" value="quarantined" className="size-5 accent-pine-700" {...form.register('oldGearStatus')} /> Quarantined: kept aside until an after-incident inspection passes</label>
              <label className="flex min-h-11 items-center gap-3"><input type="radio" value="retired" className="size-5 accent-pine-700" {...form.register('oldGearStatus')} /> Retired: out of use for good</label>
            </fieldset>
          </div>
        ) : null}
        {onGear && resolution === 'retired' ? <p className="rounded-lg bg-warn-50 p-3 text-sm text-warn-700">{holder.pointLabel ? `The item stays in point ${holder.pointLabel}’s load path and keeps it blocked until the path is changed. To swap it for stock in one step, choose Replaced.` : 'The item is retired for good.'}</p> : null}
        <TextAreaField label="Note" hint="What you found and what you did. It goes in the fault record and the audit trail." error={e.note?.message} {...form.register('note')} />
        {formError ? <p role="alert" className="rounded-lg bg-stop-50 p-3 text-sm text-stop-700">{formError}</p> : null}
        <div className="flex flex-wrap gap-2">
          <Button type="submit">Resolve fault</Button>
          <Button type="button" variant="secondary" onClick={onCancel}>Cancel</Button>
        </div>
      </form>
      <ConfirmDialog
        open={pending !== null}
        title={`Resolve fault #${fault.id} as ${pending ? resolutionText[pending.resolution].label.toLowerCase() : ''}?`}
        confirmLabel="Resolve"
        danger={false}
        busy={resolve.isPending}
        onCancel={() => setPending(null)}
        onConfirm={confirm}
      >
        <p>{faultSubject(fault)}.</p>
        {pending?.replacementGearId ? <p className="mt-2">{replacement?.serial ?? 'The replacement'} takes its place{holder.pointLabel ? ` on point ${holder.pointLabel}` : ''}; the old item is {oldStatus === 'retired' ? 'retired for good' : 'quarantined'}.</p> : null}
        {pending?.resolution === 'retired' ? <p className="mt-2">The item is retired for good. This cannot be undone here.</p> : null}
        <p className="mt-2 font-medium text-ink">Resolving does not reopen the point: it stays blocked until a rigger inspects and clears it.</p>
      </ConfirmDialog>
    </>
  );
}
