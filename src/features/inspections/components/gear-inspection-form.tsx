import { useId, useState, type FormEvent } from 'react';
import { toast } from 'sonner';
import { gearInspectionBodySchema, type GearInspectionBody } from '../../../../shared/schemas/safety';
import type { Gear } from '../../../../shared/schemas/rig';
import type { InspectionResult } from '../../../../shared/schemas/vocabulary';
import { Button } from '../../../components/ui/button';
import { ChoiceGroup } from '../../../components/ui/choice-group';
import { TextAreaField } from '../../../components/ui/field';
import { ApiError, errorMessage } from '../../../lib/api-client';
import { useGearInspection } from '../api';
import { ResultChoice } from './result-choice';

/**
 * One gear item inspected on its own (PRODUCT.md §6.1): periodic, or after an incident, which is
 * what returns a quarantined item to service. A fail opens a fault on it. Rigger only.
 */
export function GearInspectionForm({ gear, onDone }: { gear: Pick<Gear, 'id' | 'serial' | 'status'>; onDone?: () => void }) {
  const save = useGearInspection(gear.id);
  const [kind, setKind] = useState<GearInspectionBody['kind']>(gear.status === 'quarantined' ? 'after_incident' : 'periodic');
  const [result, setResult] = useState<InspectionResult | undefined>();
  const [note, setNote] = useState('');
  const [errors, setErrors] = useState<{ result?: string; note?: string; form?: string }>({});
  const id = useId();
  const submit = (e: FormEvent) => {
    e.preventDefault();
    if (!result) return setErrors({ result: 'Pick the result' });
    if (result === 'fail' && !note.trim()) return setErrors({ note: 'Say what failed: it becomes the fault’s description' });
    const body = gearInspectionBodySchema.safeParse({ kind, result, note: note.trim() || undefined });
    if (!body.success) return setErrors({ form: body.error.issues[0]?.message });
    setErrors({});
    save.mutate(body.data, {
      onSuccess: () => {
        toast.success(result === 'fail' ? `${gear.serial} failed: a fault is open on it.` : kind === 'after_incident' && gear.status === 'quarantined' ? `${gear.serial} passed and is back in service.` : `${gear.serial} inspected; its own inspection is renewed.`);
        onDone?.();
      },
      onError: (err) => setErrors(err instanceof ApiError ? { note: err.fields.note, form: err.message } : { form: errorMessage(err) }),
    });
  };
  return (
    <form onSubmit={submit} noValidate className="space-y-3" aria-label={`Inspect ${gear.serial}`}>
      <ChoiceGroup
        legend="Kind of inspection"
        value={kind}
        onChange={setKind}
        options={[{ value: 'periodic', label: 'Periodic' }, { value: 'after_incident', label: 'After an incident' }]}
      />
      {gear.status === 'quarantined' && kind === 'periodic' ? <p className="text-sm text-warn-700">A quarantined item returns to service only after an after-incident inspection passes.</p> : null}
      <div className="space-y-1">
        <p id={`${id}-result`} className="text-sm font-medium">Result</p>
        <ResultChoice name={`${id}-r`} legend="Result" value={result} onChange={(r) => { setResult(r); setErrors({}); }} invalid={!!errors.result} describedBy={`${id}-result`} />
        {errors.result ? <p role="alert" className="text-sm text-stop-700">{errors.result}</p> : null}
      </div>
      <TextAreaField label="Note" rows={2} value={note} onChange={(e) => setNote(e.target.value)} error={errors.note} hint={result === 'fail' ? 'A fail opens a high-severity fault on this item.' : undefined} />
      {errors.form ? <p role="alert" className="rounded-lg bg-stop-50 p-3 text-sm text-stop-700">{errors.form}</p> : null}
      <Button type="submit" busy={save.isPending}>Record the inspection</Button>
    </form>
  );
}
