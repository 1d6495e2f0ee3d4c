import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { z } from 'zod';
import { toast } from 'sonner';
import { Button } from '../../../components/ui/button';
import { TextField } from '../../../components/ui/field';
import { ApiError, errorMessage } from '../../../lib/api-client';
import { conflictOf, useScheduleMutations, type Conflict, type Session } from '../api';
import { firstTimes } from '../booking-form';
import { whenShort } from '../format';
import { minutesOf, wallParts } from '../zone';
import { RefusalView } from './conflict-view';
import { PointPicker } from './point-picker';
import { MAIL_NOTE, ScopeChoice, type Scope } from './scope-choice';

const moveSchema = z
  .object({ date: z.iso.date({ message: 'Pick the day' }), start: z.string().regex(/^\d{2}:\d{2}$/, 'Pick a time'), end: z.string().regex(/^\d{2}:\d{2}$/, 'Pick a time') })
  .refine((v) => (minutesOf(v.end) ?? 0) > (minutesOf(v.start) ?? 0), { path: ['end'], message: 'The class must end after it starts (on the same day)' });
type MoveForm = z.infer<typeof moveSchema>;

/** Move or stretch the class; re-checked by the server like a new booking. */
export function MoveSessionForm({ session, timeZone, onDone }: { session: Session; timeZone: string; onDone: (message?: string) => void }) {
  const { update } = useScheduleMutations();
  const [scope, setScope] = useState<Scope>('this');
  const [refusal, setRefusal] = useState<Conflict | null>(null);
  const start = wallParts(session.startsAt, timeZone);
  const form = useForm<MoveForm>({ resolver: zodResolver(moveSchema), defaultValues: { date: start.date, start: start.time, end: wallParts(session.endsAt, timeZone).time } });
  const e = form.formState.errors;
  const [labels] = useState(() => new Map(session.points.map((p) => [p.pointId, p.label])));
  const labelOf = (id: number) => labels.get(id);
  // A blocked point would refuse every move: the class moves with points picked for the new time.
  const blocked = session.points.filter((p) => p.status === 'blocked').map((p) => p.pointId);
  const [pointIds, setPointIds] = useState(() => session.pointIds.filter((id) => !blocked.includes(id)));
  const [pointsError, setPointsError] = useState<string | undefined>();
  const w = form.watch();
  const when = w.date && w.start && w.end ? firstTimes(w, timeZone) : null;
  const query = blocked.length && when ? { roomId: session.roomId, classTypeId: session.classTypeId, startsAt: when.startsAt.toISOString(), endsAt: when.endsAt.toISOString(), instructorId: session.instructorId, excludeSessionId: session.id } : null;
  const submit = form.handleSubmit((v) => {
    if (blocked.length && pointIds.length === 0) return setPointsError('Tick at least one point for the new time');
    const t = firstTimes(v, timeZone);
    if (!t) return form.setError('date', { message: 'Check the day and times' });
    setRefusal(null);
    update.mutate(
      { id: session.id, startsAt: t.startsAt.toISOString(), endsAt: t.endsAt.toISOString(), scope, ...(blocked.length ? { pointIds } : {}) },
      {
        onSuccess: (s) => {
          const text = `Moved to ${whenShort(s.startsAt, s.endsAt, timeZone)}${scope === 'following' ? ', with the following classes' : ''}. ${MAIL_NOTE}`;
          toast.success(`${s.className}: ${text}`);
          onDone(text);
        },
        onError: (err) => {
          const c = conflictOf(err);
          if (c) return setRefusal(c);
          if (err instanceof ApiError) {
            if (err.fields.startsAt) form.setError('start', { message: err.fields.startsAt });
            if (err.fields.endsAt) form.setError('end', { message: err.fields.endsAt });
          }
          toast.error(errorMessage(err));
        },
      },
    );
  });
  return (
    <form onSubmit={submit} noValidate className="space-y-4" aria-labelledby="move-title">
      <h3 id="move-title" className="font-semibold">Move the class</h3>
      {refusal ? (
        <RefusalView title="Not moved: the class cannot run then." seriesTitle={(n) => `Not moved: ${n} cannot run then. Nothing was moved.`} conflict={refusal} labelOf={labelOf} timeZone={timeZone} />
      ) : null}
      <div className="grid gap-3 sm:grid-cols-3">
        <TextField label="Day" type="date" error={e.date?.message} {...form.register('date')} />
        <TextField label="Starts" type="time" step={300} error={e.start?.message} {...form.register('start')} />
        <TextField label="Ends" type="time" step={300} error={e.end?.message} {...form.register('end')} />
      </div>
      {blocked.length ? (
        <PointPicker
          query={query}
          value={pointIds}
          onChange={(ids) => { setPointIds(ids); setPointsError(undefined); }}
          onLoaded={(a) => a.points.forEach((p) => labels.set(p.pointId, p.label))}
          error={pointsError}
          note={`Points for the new time: ${blocked.map((id) => labelOf(id)).join(', ')} ${blocked.length === 1 ? 'is' : 'are'} blocked, so the class moves without ${blocked.length === 1 ? 'it' : 'them'}. Tick a replacement if one is free then.`}
        />
      ) : null}
      <ScopeChoice seriesId={session.seriesId} value={scope} onChange={setScope} />
      {session.seriesId && scope === 'following' ? <p className="text-xs text-muted">Each following class moves by the same amount.</p> : null}
      <p className="text-sm text-muted">{MAIL_NOTE}</p>
      <div className="flex gap-2">
        <Button type="submit" busy={update.isPending}>Move</Button>
        <Button type="button" variant="secondary" onClick={() => onDone()}>Cancel</Button>
      </div>
    </form>
  );
}
