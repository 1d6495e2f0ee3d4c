import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { toast } from 'sonner';
import { createClassTypeSchema, type ClassType, type CreateClassType } from '../../../../shared/schemas/class-types';
import { apparatusKinds } from '../../../../shared/schemas/vocabulary';
import { Button } from '../../../components/ui/button';
import { SelectField, TextField } from '../../../components/ui/field';
import { ApiError, errorMessage } from '../../../lib/api-client';
import { useScheduleMutations } from '../api';
import { apparatusLabel } from '../format';

const optionalNumber = (v: unknown) => (v === '' || v === null || v === undefined ? undefined : Number(v));

/**
 * A new class type, inline in the booking dialog. It sits inside the booking form, so it is not
 * a <form> of its own: its button and the Enter key submit only this part.
 */
export function ClassTypeForm({ onCreated, onCancel }: { onCreated: (c: ClassType) => void; onCancel: () => void }) {
  const { createClassType } = useScheduleMutations();
  const form = useForm<CreateClassType>({
    resolver: zodResolver(createClassTypeSchema),
    defaultValues: { name: '', apparatus: 'fabric', durationMinutes: 60, capacity: 8, performersPerPoint: 1 },
  });
  const e = form.formState.errors;
  const submit = form.handleSubmit((values) =>
    createClassType.mutate(values, {
      onSuccess: (c) => {
        toast.success(`Class type “${c.name}” added.`);
        onCreated(c);
      },
      onError: (err) => {
        if (err instanceof ApiError) for (const [k, v] of Object.entries(err.fields)) form.setError(k as keyof CreateClassType, { message: v });
        toast.error(errorMessage(err));
      },
    }),
  );
  return (
    <div
      role="group"
      aria-labelledby="new-class-type"
      className="space-y-3 rounded-xl border border-pine-600/40 bg-pine-50 p-4"
      onKeyDown={(ev) => {
        if (ev.key === 'Enter' && (ev.target as HTMLElement).tagName === 'INPUT') {
          ev.preventDefault();
          void submit();
        }
      }}
    >
      <h3 id="new-class-type" className="font-semibold">New class type</h3>
      <div className="grid gap-3 sm:grid-cols-2">
        <TextField label="Name" autoComplete="off" error={e.name?.message} {...form.register('name')} />
        <SelectField label="Apparatus" error={e.apparatus?.message} {...form.register('apparatus')}>
          {apparatusKinds.map((k) => <option key={k} value={k}>{apparatusLabel(k)}</option>)}
        </SelectField>
        <TextField label="Length (minutes)" type="number" inputMode="numeric" min={15} max={480} step={5} error={e.durationMinutes?.message} {...form.register('durationMinutes', { valueAsNumber: true })} />
        <TextField label="Places (capacity)" type="number" inputMode="numeric" min={1} error={e.capacity?.message} {...form.register('capacity', { valueAsNumber: true })} />
        <TextField
          label="Performers per point"
          type="number"
          inputMode="numeric"
          min={1}
          max={10}
          hint="2 for a duo class: the load check counts both."
          error={e.performersPerPoint?.message}
          {...form.register('performersPerPoint', { valueAsNumber: true })}
        />
        <TextField
          label="Dynamic factor (optional)"
          type="number"
          inputMode="decimal"
          step={0.1}
          hint="Leave empty to use the studio policy’s factor for the apparatus."
          error={e.dynamicFactor?.message}
          {...form.register('dynamicFactor', { setValueAs: optionalNumber })}
        />
        <TextField
          label="Body mass per performer, kg (optional)"
          type="number"
          inputMode="decimal"
          hint="Leave empty to use the policy’s assumed body mass."
          error={e.bodyMassKg?.message}
          {...form.register('bodyMassKg', { setValueAs: optionalNumber })}
        />
      </div>
      <div className="flex gap-2">
        <Button type="button" busy={createClassType.isPending} onClick={() => void submit()}>Add class type</Button>
        <Button type="button" variant="secondary" onClick={onCancel}>Cancel</Button>
      </div>
    </div>
  );
}
