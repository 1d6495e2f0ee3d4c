import { useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { toast } from 'sonner';
import { z } from 'zod';
import { strictPolicyFields, type PolicyPreview } from '../../../shared/schemas/studio';
import { defaultPolicy, FACTOR_NEEDS_REASON_BELOW, policySchema, requireFactorReason, type Policy } from '../../../shared/schemas/policy';
import { formatFactor, formatRequiredFactor } from '../../../shared/rigging';
import { units } from '../../../shared/schemas/vocabulary';
import { Button } from '../../components/ui/button';
import { SelectField, TextAreaField, TextField } from '../../components/ui/field';
import { ConfirmDialog } from '../../components/ui/confirm';
import { StatusBadge } from '../../components/ui/status-badge';
import { Card, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { Caution } from '../../components/ui/caution';
import { ApiError, errorMessage } from '../../lib/api-client';
import { studioFormat } from '../rig/format';
import { studioQueries, usePolicyPreview, useUpdateStudio } from './api';
import { describePolicyChanges } from './policy-changes';

// Where each default comes from (../shared/CHECK-VALUES.md). A default with no published source is a studio choice.
const SOURCES = {
  intervals: 'Studio choice. Published practice: a frequent check each day of use and a periodic inspection at least yearly, monthly to quarterly in severe service (ASME B30.9 / B30.26, read through secondary copies).',
  warning: 'Studio choice.',
  factor: 'Studio choice: the chain must hold at least 5 × the peak dynamic load. Lifting hardware uses a design factor of at least 5 (ASME B30.26, via secondary copies). A 10:1 factor on people-carrying rigging is often quoted but not confirmed by a standard.',
  bodyMass: 'Studio choice.',
  dynamic: 'Studio choice on published figures: peak force as a multiple of body weight measured on aerial apparatus (Cossin, Bergeron-Parenteau & Ross, 2022). Hammock uses the fabric figure, straps the rope figure, trapeze the solo fixed figure.',
  reminders: 'Studio choice.',
  waiver: `Studio choice. Default ${defaultPolicy.waiverValidMonths}.`,
  cutoff: `Studio choice. Default ${defaultPolicy.studentCancelCutoffHours}; the desk may cancel any time.`,
};

const leadHours = (text: string) => text.split(',').map((h) => Number(h.trim()));

const formSchema = z.object({
  name: z.string().trim().min(1, 'Enter the studio name').max(120),
  policy: strictPolicyFields
    .extend({
      reminderLeadHours: z
        .string()
        .regex(/^\s*\d+(\.\d+)?(\s*,\s*\d+(\.\d+)?)*\s*$/, 'List hours separated by commas, e.g. 24, 2')
        // Each hour within the policy's own limits, worded by the policy schema, so the field says it before the server does.
        .superRefine((text, ctx) => {
          const checked = policySchema.shape.reminderLeadHours.safeParse(leadHours(text));
          if (!checked.success) ctx.addIssue({ code: 'custom', message: checked.error.issues[0].message });
        }),
    })
    .superRefine(requireFactorReason),
});
type FormValues = z.infer<typeof formSchema>;

export function SettingsPage() {
  const studio = useQuery(studioQueries.detail());
  if (studio.isPending) return <Loading />;
  if (studio.isError) return <ErrorState error={studio.error} retry={() => studio.refetch()} />;
  return <SettingsForm name={studio.data.name} policy={studio.data.policy} />;
}

interface Pending {
  body: { name: string; policy: Policy };
  changes: string[];
  preview: PolicyPreview;
}

function SettingsForm({ name, policy }: { name: string; policy: Policy }) {
  const save = useUpdateStudio();
  const preview = usePolicyPreview();
  const [pending, setPending] = useState<Pending | null>(null);
  const form = useForm<FormValues>({
    resolver: zodResolver(formSchema),
    defaultValues: { name, policy: { ...policy, requiredFactorReason: policy.requiredFactorReason ?? '', reminderLeadHours: policy.reminderLeadHours.join(', ') } },
  });
  const e = form.formState.errors;
  const num = { valueAsNumber: true } as const;
  const factor = form.watch('policy.requiredFactor');
  const needsReason = Number.isFinite(factor) && factor < FACTOR_NEEDS_REASON_BELOW;
  const onError = (err: unknown) => {
    // A message about one item of a list (`policy.reminderLeadHours.1`) belongs to the list's field.
    if (err instanceof ApiError) for (const [k, m] of Object.entries(err.fields)) form.setError(k.replace(/(\.\d+)+$/, '') as never, { message: m });
    toast.error(errorMessage(err));
  };
  const store = (body: Pending['body']) =>
    save.mutate(body, {
      onSuccess: () => { setPending(null); toast.success('Studio policy saved.'); },
      onError: (err) => { setPending(null); onError(err); },
    });
  // A policy change is confirmed after the owner has seen what it does to today's points and booked classes.
  const submit = form.handleSubmit((v) => {
    const proposed: Policy = {
      ...v.policy,
      requiredFactorReason: v.policy.requiredFactor < FACTOR_NEEDS_REASON_BELOW ? (v.policy.requiredFactorReason ?? '').trim() || null : null,
      reminderLeadHours: leadHours(v.policy.reminderLeadHours),
    };
    const body = { name: v.name, policy: proposed };
    const changes = describePolicyChanges(policy, proposed);
    if (changes.length === 0) return store(body);
    preview.mutate({ policy: proposed }, { onSuccess: (effects) => setPending({ body, changes, preview: effects }), onError });
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
          {needsReason ? (
            <TextAreaField
              label={`Why the studio accepts a factor below ${FACTOR_NEEDS_REASON_BELOW}`}
              hint="Required. It is shown beside the factor on every load check."
              error={e.policy?.requiredFactorReason?.message}
              {...form.register('policy.requiredFactorReason')}
            />
          ) : null}
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
        <Card className="space-y-4">
          <h2 className="font-semibold">Students</h2>
          <div className="grid gap-4 sm:grid-cols-2">
            <TextField label="A signed waiver holds for (months)" type="number" step="1" hint={SOURCES.waiver} error={e.policy?.waiverValidMonths?.message} {...form.register('policy.waiverValidMonths', num)} />
            <TextField label="Students cancel up to (hours before class)" type="number" step="0.5" hint={SOURCES.cutoff} error={e.policy?.studentCancelCutoffHours?.message} {...form.register('policy.studentCancelCutoffHours', num)} />
          </div>
        </Card>
        <Button type="submit" busy={save.isPending || preview.isPending}>Save policy</Button>
      </form>
      {pending ? (
        <ConfirmDialog
          open
          wide
          title="Save this policy change?"
          confirmLabel="Save the change"
          danger={pending.preview.points.length + pending.preview.sessions.length > 0 || pending.body.policy.requiredFactor < FACTOR_NEEDS_REASON_BELOW}
          busy={save.isPending}
          onCancel={() => setPending(null)}
          onConfirm={() => store(pending.body)}
        >
          <PolicyEffects pending={pending} />
        </ConfirmDialog>
      ) : null}
    </div>
  );
}

/** What the proposed policy changes, and what it does now to the points and the booked classes. */
function PolicyEffects({ pending }: { pending: Pending }) {
  const { preview, changes, body } = pending;
  const fmt = studioFormat(body.policy);
  return (
    // Focusable, so the list scrolls from the keyboard too.
    <div tabIndex={0} role="region" aria-label="What this change does" className="max-h-[60vh] space-y-4 overflow-y-auto text-ink">
      <section aria-label="Changes">
        <h3 className="font-medium">You are changing</h3>
        <ul className="list-disc pl-5">{changes.map((c) => <li key={c}>{c}</li>)}</ul>
        {body.policy.requiredFactor < FACTOR_NEEDS_REASON_BELOW ? (
          <p role="alert" className="mt-2 text-stop-700">
            A required factor of {formatRequiredFactor(body.policy.requiredFactor)} × is below {FACTOR_NEEDS_REASON_BELOW} ×: every load check will pass with a smaller margin. Reason given: {body.policy.requiredFactorReason}
          </p>
        ) : null}
      </section>
      <section aria-label="Points whose status changes now">
        <h3 className="font-medium">Points whose status changes now</h3>
        {preview.points.length === 0 ? (
          <p className="text-muted">No point changes status or clearance date now (of {preview.checked.points} points).</p>
        ) : (
          <ul className="space-y-2">
            {preview.points.map((p) => (
              <li key={p.pointId}>
                <span className="font-medium">{p.label}</span> <span className="text-muted">({p.roomName})</span>:{' '}
                <StatusBadge status={p.before.status} /> → <StatusBadge status={p.after.status} />
                <span className="block text-xs text-muted">Cleared until {fmt.when(p.before.clearedUntil, 'never')} → {fmt.when(p.after.clearedUntil, 'never')}</span>
                {p.after.reasons.map((r) => <span key={r.code + r.message} className="block text-xs text-stop-700">{r.message}</span>)}
              </li>
            ))}
          </ul>
        )}
      </section>
      <section aria-label="Booked classes whose load check would fail">
        <h3 className="font-medium">Booked classes whose load check would fail</h3>
        {preview.sessions.length === 0 ? (
          <p className="text-muted">No booked class newly fails its load check (of {preview.checked.sessions} booked).</p>
        ) : (
          <ul className="space-y-2">
            {preview.sessions.map((s) => (
              <li key={`${s.sessionId}:${s.pointId}`}>
                <span className="font-medium">{s.className}</span>, {fmt.when(s.startsAt)}, point {s.label}: factor {formatFactor(s.achievedFactor)} × of {formatRequiredFactor(s.requiredFactor)} × required
                {s.violations.map((v) => <span key={v.code + v.message} className="block text-xs text-stop-700">{v.message}</span>)}
              </li>
            ))}
          </ul>
        )}
      </section>
      <Caution />
    </div>
  );
}
