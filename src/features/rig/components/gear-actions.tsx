import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { toast } from 'sonner';
import { z } from 'zod';
import { describeGear } from '../../../../shared/rigging';
import { gearEventBodySchema, reasonBodySchema, type Gear, type GearEventBody } from '../../../../shared/schemas/rig';
import { gearEventKinds } from '../../../../shared/schemas/vocabulary';
import { Button } from '../../../components/ui/button';
import { ConfirmDialog } from '../../../components/ui/confirm';
import { SelectField, TextAreaField } from '../../../components/ui/field';
import { Card } from '../../../components/ui/states';
import { errorMessage } from '../../../lib/api-client';
import { useRigMutations } from '../api';
import { eventKindLabels } from '../format';
import { applyServerErrors } from '../form-helpers';

type ReasonBody = z.infer<typeof reasonBodySchema>;

/** The rigger's actions on an item: quarantine, retire, and record an event that calls for an after-incident inspection. */
export function GearActions({ gear }: { gear: Gear }) {
  const name = describeGear(gear);
  const mounted = gear.pointLabel ? ` Point ${gear.pointLabel}, which holds it, is blocked while it is.` : '';
  return (
    <Card className="space-y-6">
      <h2 className="font-semibold">Rigger’s actions</h2>
      {gear.status !== 'retired' ? <RecordEvent gear={gear} /> : null}
      {gear.status === 'in_service' ? (
        <ReasonAction gear={gear} action="quarantine" title="Quarantine" confirmTitle={`Quarantine ${name}?`} explain={`Takes the item out of use until an inspection returns it to service.${mounted}`} />
      ) : null}
      {gear.status !== 'retired' ? (
        <ReasonAction gear={gear} action="retire" title="Retire" confirmTitle={`Retire ${name} for good?`} explain={`Retiring is final: the item never returns to service.${mounted}`} />
      ) : (
        <p className="text-sm text-muted">This item is retired. Its record and history stay for the log.</p>
      )}
    </Card>
  );
}

function ReasonAction({ gear, action, title, confirmTitle, explain }: { gear: Gear; action: 'retire' | 'quarantine'; title: string; confirmTitle: string; explain: string }) {
  const mutations = useRigMutations();
  const mutation = mutations[action];
  const [pending, setPending] = useState<ReasonBody | null>(null);
  const form = useForm<ReasonBody>({ resolver: zodResolver(reasonBodySchema), defaultValues: { reason: '' } });
  const run = () => {
    if (!pending) return;
    mutation.mutate({ id: gear.id, reason: pending.reason }, {
      onSuccess: () => { setPending(null); form.reset(); toast.success(action === 'retire' ? `${gear.serial} retired.` : `${gear.serial} quarantined.`); },
      onError: (err) => { setPending(null); applyServerErrors(form.setError, err); toast.error(errorMessage(err)); },
    });
  };
  return (
    <form noValidate onSubmit={form.handleSubmit(setPending)} className="space-y-2" aria-label={title}>
      <h3 className="font-medium">{title}</h3>
      <p className="text-sm text-muted">{explain}</p>
      <TextAreaField label={`Why (${title.toLowerCase()})`} rows={2} error={form.formState.errors.reason?.message} {...form.register('reason')} />
      <Button type="submit" variant={action === 'retire' ? 'danger' : 'secondary'}>{title}…</Button>
      <ConfirmDialog open={pending !== null} title={confirmTitle} confirmLabel={title} busy={mutation.isPending} onCancel={() => setPending(null)} onConfirm={run}>
        <p>{explain}</p>
        <p className="mt-2">Reason: {pending?.reason}</p>
      </ConfirmDialog>
    </form>
  );
}

function RecordEvent({ gear }: { gear: Gear }) {
  const { recordEvent } = useRigMutations();
  const [pending, setPending] = useState<GearEventBody | null>(null);
  const form = useForm<z.input<typeof gearEventBodySchema>, unknown, GearEventBody>({ resolver: zodResolver(gearEventBodySchema), defaultValues: { kind: 'shock_load', note: '' } });
  const run = () => {
    if (!pending) return;
    recordEvent.mutate({ id: gear.id, ...pending }, {
      onSuccess: () => { setPending(null); form.reset(); toast.success(`${eventKindLabels[pending.kind]} recorded. ${gear.serial} is quarantined until an after-incident inspection passes.`); },
      onError: (err) => { setPending(null); applyServerErrors(form.setError, err); toast.error(errorMessage(err)); },
    });
  };
  const explain = 'Recording an event quarantines the item until an after-incident inspection passes. It opens no fault and does not by itself void a point’s clearance, but a quarantined item blocks the point that holds it.';
  return (
    <form noValidate onSubmit={form.handleSubmit(setPending)} className="space-y-2" aria-label="Record an event">
      <h3 className="font-medium">Record an event</h3>
      <p className="text-sm text-muted">{explain}</p>
      <div className="grid gap-3 sm:grid-cols-[14rem_1fr]">
        <SelectField label="What happened" error={form.formState.errors.kind?.message} {...form.register('kind')}>
          {gearEventKinds.map((k) => <option key={k} value={k}>{eventKindLabels[k]}</option>)}
        </SelectField>
        <TextAreaField label="Note" rows={2} hint="When, how, who saw it." error={form.formState.errors.note?.message} {...form.register('note')} />
      </div>
      <Button type="submit" variant="secondary">Record event…</Button>
      <ConfirmDialog open={pending !== null} title={`Record ${pending ? eventKindLabels[pending.kind].toLowerCase() : 'event'} on ${describeGear(gear)}?`} confirmLabel="Record and quarantine" busy={recordEvent.isPending} onCancel={() => setPending(null)} onConfirm={run}>
        {explain}
      </ConfirmDialog>
    </form>
  );
}
