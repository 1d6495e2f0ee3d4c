import { useState } from 'react';
import { toast } from 'sonner';
import { Button } from '../../../components/ui/button';
import { errorMessage } from '../../../lib/api-client';
import { conflictOf, useScheduleMutations, type Session } from '../api';
import { PointPicker } from './point-picker';
import { conflictLines, ConflictView } from './conflict-view';
import { MAIL_NOTE } from './scope-choice';

/** Replace the booked points: the room's points at the class's time, this class's own booking left out. */
export function ChangePointsForm({ session, onDone }: { session: Session; onDone: (message?: string) => void }) {
  const { swapPoints } = useScheduleMutations();
  const [pointIds, setPointIds] = useState(session.pointIds);
  const [error, setError] = useState<string | undefined>();
  const [refusal, setRefusal] = useState<string[] | null>(null);
  const [labels] = useState(() => new Map(session.points.map((p) => [p.pointId, p.label])));
  const query = { roomId: session.roomId, classTypeId: session.classTypeId, startsAt: session.startsAt, endsAt: session.endsAt, instructorId: session.instructorId, excludeSessionId: session.id };
  const same = pointIds.length === session.pointIds.length && pointIds.every((id) => session.pointIds.includes(id));
  const submit = (ev: React.FormEvent) => {
    ev.preventDefault();
    if (pointIds.length === 0) return setError('Tick at least one point');
    if (same) return setError('Tick a different set of points');
    setError(undefined);
    setRefusal(null);
    swapPoints.mutate(
      { id: session.id, pointIds },
      {
        onSuccess: (s) => {
          const text = `Points changed to ${s.points.map((p) => p.label).join(', ')}. ${MAIL_NOTE}`;
          toast.success(text);
          onDone(text);
        },
        onError: (err) => {
          const c = conflictOf(err);
          if (c) return setRefusal(conflictLines(c, (id) => labels.get(id)));
          toast.error(errorMessage(err));
        },
      },
    );
  };
  return (
    <form onSubmit={submit} noValidate className="space-y-4" aria-labelledby="points-title">
      <h3 id="points-title" className="font-semibold">Change points</h3>
      {refusal ? <ConflictView title="Not changed: some points cannot take this class now." lines={refusal} /> : null}
      <PointPicker
        query={query}
        value={pointIds}
        onChange={(ids) => { setPointIds(ids); setError(undefined); }}
        onLoaded={(a) => a.points.forEach((p) => labels.set(p.pointId, p.label))}
        error={error}
        note="Every point of the class’s room at its time. Untick a blocked point to free it."
      />
      <p className="text-sm text-muted">{MAIL_NOTE}</p>
      <div className="flex gap-2">
        <Button type="submit" busy={swapPoints.isPending}>Save points</Button>
        <Button type="button" variant="secondary" onClick={() => onDone()}>Cancel</Button>
      </div>
    </form>
  );
}
