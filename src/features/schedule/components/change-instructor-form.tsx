import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { toast } from 'sonner';
import { Button } from '../../../components/ui/button';
import { SelectField } from '../../../components/ui/field';
import { errorMessage } from '../../../lib/api-client';
import { conflictOf, useScheduleMutations, type Conflict, type Session } from '../api';
import { staffQueries } from '../../staff/api';
import { RefusalView } from './conflict-view';
import { MAIL_NOTE, ScopeChoice, type Scope } from './scope-choice';

export function ChangeInstructorForm({ session, timeZone, onDone }: { session: Session; timeZone: string; onDone: (message?: string) => void }) {
  const instructors = useQuery(staffQueries.instructors());
  const { update } = useScheduleMutations();
  const [instructorId, setInstructorId] = useState(String(session.instructorId));
  const [scope, setScope] = useState<Scope>('this');
  const [refusal, setRefusal] = useState<Conflict | null>(null);
  const [error, setError] = useState<string | undefined>();
  const submit = (ev: React.FormEvent) => {
    ev.preventDefault();
    if (Number(instructorId) === session.instructorId) return setError('Pick a different instructor');
    setError(undefined);
    setRefusal(null);
    update.mutate(
      { id: session.id, instructorId: Number(instructorId), scope },
      {
        onSuccess: (s) => {
          const text = `${s.instructorName} now teaches this class${scope === 'following' ? ' and the following ones' : ''}. Both instructors are e-mailed.`;
          toast.success(text);
          onDone(text);
        },
        onError: (err) => {
          const c = conflictOf(err);
          if (c) return setRefusal(c);
          toast.error(errorMessage(err));
        },
      },
    );
  };
  return (
    <form onSubmit={submit} noValidate className="space-y-4" aria-labelledby="instructor-title">
      <h3 id="instructor-title" className="font-semibold">Change the instructor</h3>
      {refusal ? (
        <RefusalView
          title="Not changed."
          seriesTitle={(n) => `Not changed: ${n} cannot take this instructor. Nothing was changed.`}
          conflict={refusal}
          labelOf={(id) => session.points.find((p) => p.pointId === id)?.label}
          timeZone={timeZone}
        />
      ) : null}
      <SelectField label="Instructor" value={instructorId} error={error} hint={instructors.isError ? errorMessage(instructors.error) : undefined} onChange={(e) => setInstructorId(e.target.value)}>
        {instructors.data?.some((u) => u.id === session.instructorId) ? null : <option value={session.instructorId}>{session.instructorName}</option>}
        {instructors.data?.map((u) => <option key={u.id} value={u.id}>{u.name}</option>)}
      </SelectField>
      <ScopeChoice seriesId={session.seriesId} value={scope} onChange={setScope} />
      <p className="text-sm text-muted">{MAIL_NOTE}</p>
      <div className="flex gap-2">
        <Button type="submit" busy={update.isPending}>Change instructor</Button>
        <Button type="button" variant="secondary" onClick={() => onDone()}>Cancel</Button>
      </div>
    </form>
  );
}
