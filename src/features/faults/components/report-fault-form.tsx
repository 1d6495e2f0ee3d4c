import { useEffect, useMemo, useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { useForm, type UseFormRegisterReturn } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { z } from 'zod';
import { toast } from 'sonner';
import { OctagonX, Send } from 'lucide-react';
import { createFaultSchema, type Fault } from '../../../../shared/schemas/safety';
import { severities } from '../../../../shared/schemas/vocabulary';
import { Button } from '../../../components/ui/button';
import { SelectField, TextAreaField } from '../../../components/ui/field';
import { ApiError, errorMessage } from '../../../lib/api-client';
import { faultQueries, useReportFault } from '../api';
import { faultSubject, gearKindWord, severityText } from '../labels';
import { PhotoPicker, photoProblem } from './photo-picker';

const formSchema = z.object({
  pointId: z.string(),
  severity: z.enum(severities, { message: 'Pick how serious it looks' }),
  description: createFaultSchema.shape.description,
});
type FormValues = z.input<typeof formSchema>;

/**
 * Report a fault on a point or a gear item (PRODUCT.md §3): anyone signed in may. With neither
 * given, the reporter picks the point. Every open fault blocks, whatever its severity.
 */
export function ReportFaultForm({ pointId, gearId, onDone, onCancel, onDirty }: { pointId?: number; gearId?: number; onDone?: (f: Fault) => void; onCancel?: () => void; onDirty?: (dirty: boolean) => void }) {
  const fixed = pointId !== undefined || gearId !== undefined;
  const report = useReportFault();
  const [photos, setPhotos] = useState<File[]>([]);
  const [photoError, setPhotoError] = useState<string | undefined>();
  const [formError, setFormError] = useState<string | null>(null);
  const [done, setDone] = useState<Fault | null>(null);
  const schema = useMemo(
    () => formSchema.superRefine((v, ctx) => { if (!fixed && !v.pointId) ctx.addIssue({ code: 'custom', path: ['pointId'], message: 'Pick the point the fault is on' }); }),
    [fixed],
  );
  const form = useForm<FormValues>({ resolver: zodResolver(schema), defaultValues: { pointId: '', severity: undefined, description: '' } });
  const e = form.formState.errors;
  // Whether closing would lose something typed or picked (told to a dialog that asks first); not after it is sent.
  const description = form.watch('description');
  const dirty = done === null && ((description ?? '').trim().length > 0 || photos.length > 0);
  useEffect(() => onDirty?.(dirty), [dirty, onDirty]);

  const submit = form.handleSubmit((v) => {
    const bad = photos.map(photoProblem).find(Boolean);
    if (bad) return setPhotoError(bad);
    setPhotoError(undefined);
    setFormError(null);
    const target = fixed ? { pointId, gearId } : { pointId: Number(v.pointId) };
    report.mutate(
      { ...target, severity: v.severity!, description: v.description, photos },
      {
        onSuccess: (f) => {
          toast.success('Fault reported. The point is blocked until a rigger clears it.');
          // The report stands even when the server could not keep its photos; say so plainly.
          for (const w of f.warnings ?? []) toast.warning(w.message, { duration: 15_000 });
          setDone(f);
        },
        onError: (err) => {
          if (err instanceof ApiError) {
            for (const [k, msg] of Object.entries(err.fields)) {
              if (k === 'severity' || k === 'description' || k === 'pointId') form.setError(k, { message: msg });
              else if (k === 'photos') setPhotoError(msg);
            }
            if (err.status === 413 || err.status === 415 || err.code.includes('file')) return setPhotoError(err.message);
            if (err.fields.gearId) return setFormError(err.fields.gearId);
          }
          setFormError(errorMessage(err));
        },
      },
    );
  });

  if (done) return <ReportedNotice fault={done} onDone={() => onDone?.(done)} onAnother={() => { setDone(null); setPhotos([]); form.reset(); }} />;

  return (
    <form onSubmit={submit} noValidate className="space-y-5" aria-label="Report a fault">
      {fixed ? <Subject pointId={pointId} gearId={gearId} /> : <PointPicker error={e.pointId?.message} register={form.register('pointId')} />}
      <fieldset className="space-y-2" aria-describedby="severity-hint">
        <legend className="text-sm font-medium text-ink">How serious does it look?</legend>
        <p id="severity-hint" className="text-xs text-muted">Whatever you pick, the point is blocked until a rigger has looked at it. Severity tells the rigger how fast to come.</p>
        <div className="grid gap-2">
          {severities.map((s) => (
            <label key={s} className="flex min-h-12 cursor-pointer items-start gap-3 rounded-lg border-2 border-line bg-white p-3 has-[:checked]:border-pine-700 has-[:checked]:bg-pine-50 has-[:focus-visible]:outline has-[:focus-visible]:outline-3 has-[:focus-visible]:outline-brass-500">
              <input type="radio" value={s} className="mt-1 size-5 accent-pine-700" aria-invalid={e.severity ? true : undefined} {...form.register('severity')} />
              <span>
                <span className="block font-medium">{severityText[s].label}</span>
                <span className="block text-sm text-muted">{severityText[s].explain}</span>
              </span>
            </label>
          ))}
        </div>
        {e.severity ? <p role="alert" className="text-sm text-stop-700">{e.severity.message}</p> : null}
      </fieldset>
      <TextAreaField label="What is wrong?" rows={4} hint="Where on the item, what you saw, and anything you did (for example: took the fabric down)." error={e.description?.message} {...form.register('description')} />
      <PhotoPicker files={photos} onChange={(f) => { setPhotos(f); setPhotoError(undefined); }} error={photoError} />
      {formError ? <p role="alert" className="rounded-lg bg-stop-50 p-3 text-sm text-stop-700">{formError}</p> : null}
      <div className="grid gap-2 sm:flex">
        <Button type="submit" variant="danger" className="min-h-12 text-base" busy={report.isPending}><Send className="size-5" aria-hidden /> Report the fault</Button>
        {onCancel ? <Button type="button" variant="secondary" className="min-h-12 text-base" onClick={onCancel}>Cancel</Button> : null}
      </div>
    </form>
  );
}

function Subject({ pointId, gearId }: { pointId?: number; gearId?: number }) {
  const point = useQuery({ ...faultQueries.point(pointId ?? 0), enabled: pointId !== undefined && gearId === undefined });
  const gear = useQuery({ ...faultQueries.gear(gearId ?? 0), enabled: gearId !== undefined });
  let text = 'Loading…';
  if (gearId !== undefined) {
    if (gear.data) text = `${gearKindWord(gear.data.kind)} ${gear.data.serial}${gear.data.pointLabel ? `, on point ${gear.data.pointLabel}` : ', not in any load path'}`;
    else if (gear.isError) text = `Gear item #${gearId}`;
  } else if (point.data) text = `Point ${point.data.label}, ${point.data.roomName}`;
  else if (point.isError) text = `Point #${pointId}`;
  return (
    <div className="rounded-lg border border-line bg-canvas p-3">
      <p className="text-xs font-medium uppercase tracking-wide text-muted">Fault on</p>
      <p className="text-lg font-semibold" data-testid="fault-subject">{text}</p>
    </div>
  );
}

function PointPicker({ error, register }: { error?: string; register: UseFormRegisterReturn<'pointId'> }) {
  const points = useQuery(faultQueries.points());
  return (
    <SelectField label="Which point?" error={error ?? (points.isError ? errorMessage(points.error) : undefined)} hint="A fault on one gear item can be reported from that item’s page." {...register}>
      <option value="">{points.isPending ? 'Loading points…' : 'Pick a point'}</option>
      {points.data?.map((p) => <option key={p.id} value={String(p.id)}>{p.label} — {p.roomName}</option>)}
    </SelectField>
  );
}

function ReportedNotice({ fault, onDone, onAnother }: { fault: Fault; onDone: () => void; onAnother: () => void }) {
  return (
    <div role="status" className="space-y-3 rounded-xl border-2 border-stop-700/50 bg-stop-50 p-4">
      <p className="flex items-center gap-2 text-lg font-semibold text-stop-700"><OctagonX className="size-6" aria-hidden /> Fault reported</p>
      {fault.pointLabel ? (
        <p>{fault.gearSerial ? `${faultSubject(fault)}: point ${fault.pointLabel}` : `Point ${fault.pointLabel}`} is now <strong>blocked</strong>. No class can use it until a rigger has resolved the fault and cleared the point again.</p>
      ) : (
        <p>{faultSubject(fault)} is now marked <strong>faulty</strong>. It must not be hung until a rigger has resolved the fault.</p>
      )}
      <p>Reception and the rigger are told, so reception can move any class booked on it.</p>
      {fault.photos.length ? <p className="text-sm text-muted">{fault.photos.length} photo{fault.photos.length === 1 ? '' : 's'} attached.</p> : null}
      <div className="grid gap-2 sm:flex">
        <Button className="min-h-12 text-base" onClick={onDone}>Done</Button>
        <Button className="min-h-12 text-base" variant="secondary" onClick={onAnother}>Report another fault</Button>
      </div>
    </div>
  );
}
