import { useState } from 'react';
import { toast } from 'sonner';
import { Button } from '../../../components/ui/button';
import { errorMessage } from '../../../lib/api-client';
import { conflictOf, useScheduleMutations, type Conflict, type Session } from '../api';
import { PointPicker } from './point-picker';
import { RefusalView } from './conflict-view';
import { MAIL_NOTE, ScopeChoice, type Scope } from './scope-choice';

/** Replace the booked points: the room's points at the class's time, this class's own booking left out. */
export function ChangePointsForm({ session, timeZone, onDone }: { session: Session; timeZone: string; onDone: (message?: string) => void }) {
  const { swapPoints } = useScheduleMutations();
  const [pointIds, setPointIds] = useState(session.pointIds);
  const [scope, setScope] = useState<Scope>('this');
  const [error, setError] = useState<string | undefined>();
  const [refusal, setRefusal] = useState<Conflict | null>(null);
  const [labels] = useState(() => new Map(session.points.map((p) => [p.pointId, p.label])));
  const query = { roomId: session.roomId, classTypeId: session.classTypeId, startsAt: session.startsAt, endsAt: session.endsAt, instructorId: session.instructorId, excludeSessionId: session.id };
  const same = pointIds.length === session.pointIds.length && pointIds.every((id) => session.pointIds.includes(id));
  const submit = (ev: React.FormEvent) => {
    ev.preventDefault();
    if (pointIds.length === 0) return setError('Tick at least one point');
    if (same && scope === 'this') return setError('Tick a different set of points');
    setError(undefined);
    setRefusal(null);
    swapPoints.mutate(
      { id: session.id, pointIds, scope },
      {
        onSuccess: (s) => {
          const text = `Points changed to ${s.points.map((p) => p.label).join(', ')}${scope === 'following' ? ', for this and the following classes' : ''}. ${MAIL_NOTE}`;
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
    <form onSubmit={submit} noValidate className="space-y-4" aria-labelledby="points-title">
      <h3 id="points-title" className="font-semibold">Change points</h3>
      {refusal ? (
        <RefusalView title="Not changed: some points cannot take this class now." seriesTitle={(n) => `Not changed: ${n} cannot take these points. Nothing was changed.`} conflict={refusal} labelOf={(id) => labels.get(id)} timeZone={timeZone} />
      ) : null}
      <PointPicker
        query={query}
        value={pointIds}
        onChange={(ids) => { setPointIds(ids); setError(undefined); }}
        onLoaded={(a) => a.points.forEach((p) => labels.set(p.pointId, p.label))}
        error={error}
        note="Every point of the class’s room at its time. Untick a blocked point to free it."
      />
      <ScopeChoice seriesId={session.seriesId} value={scope} onChange={setScope} />
      {session.seriesId && scope === 'following' ? <p className="text-xs text-muted">Each following class of the series takes these points; if any of them cannot, nothing is changed and each such class is listed.</p> : null}
      <p className="text-sm text-muted">{MAIL_NOTE}</p>
      <div className="flex gap-2">
        <Button type="submit" busy={swapPoints.isPending}>Save points</Button>
        <Button type="button" variant="secondary" onClick={() => onDone()}>Cancel</Button>
      </div>
    </form>
  );
}
