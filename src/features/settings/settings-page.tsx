import { useQuery } from '@tanstack/react-query';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { toast } from 'sonner';
import { z } from 'zod';
import { updateStudioSchema } from '../../../shared/schemas/studio';
import { defaultPolicy, type Policy } from '../../../shared/schemas/policy';
import { units } from '../../../shared/schemas/vocabulary';
import { Button } from '../../components/ui/button';
import { SelectField, TextField } from '../../components/ui/field';
import { Card, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { Caution } from '../../components/ui/caution';
import { ApiError, errorMessage } from '../../lib/api-client';
import { studioQueries, useUpdateStudio } from './api';

// Where each default comes from (../shared/CHECK-VALUES.md). A default with no published source is a studio choice.
const SOURCES = {
  intervals: 'Studio choice. Published practice: a frequent check each day of use and a periodic inspection at least yearly, monthly to quarterly in severe service (ASME B30.9 / B30.26, read through secondary copies).',
  warning: 'Studio choice.',
  factor: 'Studio choice: the chain must hold at least 5 × the peak dynamic load. Lifting hardware uses a design factor of at least 5 (ASME B30.26, via secondary copies). A 10:1 factor on people-carrying rigging is often quoted but not confirmed by a standard.',
  bodyMass: 'Studio choice.',
  dynamic: 'Studio choice on published figures: peak force as a multiple of body weight measured on aerial apparatus (Cossin, Bergeron-Parenteau & Ross, 2022). Hammock uses the fabric figure, straps the rope figure, trapeze the solo fixed figure.',
  reminders: 'Studio choice.',
};

const formSchema = z.object({
  name: z.string().trim().min(1, 'Enter the studio name').max(120),
  policy: updateStudioSchema.shape.policy.unwrap().extend({
    reminderLeadHours: z.string().regex(/^\s*\d+(\.\d+)?(\s*,\s*\d+(\.\d+)?)*\s*$/, 'List hours separated by commas, e.g. 24, 2'),
  }),
});
type FormValues = z.infer<typeof formSchema>;

export function SettingsPage() {
  const studio = useQuery(studioQueries.detail());
  if (studio.isPending) return <Loading />;
  if (studio.isError) return <ErrorState error={studio.error} retry={() => studio.refetch()} />;
  return <SettingsForm name={studio.data.name} policy={studio.data.policy} />;
}

function SettingsForm({ name, policy }: { name: string; policy: Policy }) {
  const save = useUpdateStudio();
  const form = useForm<FormValues>({
    resolver: zodResolver(formSchema),
    defaultValues: { name, policy: { ...policy, reminderLeadHours: policy.reminderLeadHours.join(', ') } },
  });
  const e = form.formState.errors;
  const num = { valueAsNumber: true } as const;
  const submit = form.handleSubmit((v) => {
    const body = { name: v.name, policy: { ...v.policy, reminderLeadHours: v.policy.reminderLeadHours.split(',').map((s) => Number(s.trim())) } };
    save.mutate(body, {
      onSuccess: () => toast.success('Studio policy saved.'),
      onError: (err) => {
        if (err instanceof ApiError) for (const [k, m] of Object.entries(err.fields)) form.setError(k as never, { message: m });
        toast.error(errorMessage(err));
      },
    });
  });
  return (
    <div className="max-w-3xl">
      <PageHeader title="Settings">Studio policy. The rules use these figures for every point and class.</PageHeader>
      <form onSubmit={submit} noValidate className="space-y-6">
        <Card className="grid gap-4 sm:grid-cols-2">
          <TextField label="Studio name" error={e.name?.message} {...form.register('name')} />
          <TextField label="Time zone" hint="IANA name, e.g. Europe/London" error={e.policy?.timeZone?.message} {...form.register('policy.timeZone')} />
          <SelectField label="Display units for forces" error={e.policy?.units?.message} {...form.register('policy.units')}>
            {units.map((u) => <option key={u} value={u}>{u}</option>)}
          </SelectField>
        </Card>
        <Card className="space-y-4">
          <h2 className="font-semibold">Inspection intervals (days)</h2>
          <div className="grid gap-4 sm:grid-cols-3">
            <TextField label="Textiles" type="number" hint={`Default ${defaultPolicy.intervalDays.textile}`} error={e.policy?.intervalDays?.textile?.message} {...form.register('policy.intervalDays.textile', num)} />
            <TextField label="Hardware and wire rope" type="number" hint={`Default ${defaultPolicy.intervalDays.hardware}`} error={e.policy?.intervalDays?.hardware?.message} {...form.register('policy.intervalDays.hardware', num)} />
            <TextField label="Structure" type="number" hint={`Default ${defaultPolicy.intervalDays.structure}`} error={e.policy?.intervalDays?.structure?.message} {...form.register('policy.intervalDays.structure', num)} />
          </div>
          <p className="text-xs text-muted">{SOURCES.intervals}</p>
          <TextField label="Warning window (days before a clearance runs out)" type="number" hint={SOURCES.warning} error={e.policy?.warningDays?.message} {...form.register('policy.warningDays', num)} />
        </Card>
        <Card className="space-y-4">
          <h2 className="font-semibold">Load check</h2>
          <div className="grid gap-4 sm:grid-cols-2">
            <TextField label="Required factor" type="number" step="0.1" hint={SOURCES.factor} error={e.policy?.requiredFactor?.message} {...form.register('policy.requiredFactor', num)} />
            <TextField label="Assumed body mass (kg)" type="number" step="1" hint={SOURCES.bodyMass} error={e.policy?.bodyMassKg?.message} {...form.register('policy.bodyMassKg', num)} />
          </div>
          <h3 className="text-sm font-medium">Dynamic factor by apparatus</h3>
          <div className="grid gap-4 sm:grid-cols-3">
            {(Object.keys(defaultPolicy.dynamicFactors) as (keyof Policy['dynamicFactors'])[]).map((k) => (
              <TextField key={k} label={k[0].toUpperCase() + k.slice(1)} type="number" step="0.1" hint={`Default ${defaultPolicy.dynamicFactors[k]}`} error={e.policy?.dynamicFactors?.[k]?.message} {...form.register(`policy.dynamicFactors.${k}`, num)} />
            ))}
          </div>
          <p className="text-xs text-muted">{SOURCES.dynamic}</p>
          <Caution />
        </Card>
        <Card>
          <TextField label="Reminder lead times (hours before class)" hint={SOURCES.reminders} error={e.policy?.reminderLeadHours?.message} {...form.register('policy.reminderLeadHours')} />
        </Card>
        <Button type="submit" busy={save.isPending}>Save policy</Button>
      </form>
    </div>
  );
}
