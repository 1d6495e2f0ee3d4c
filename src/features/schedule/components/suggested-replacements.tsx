import { useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { toast } from 'sonner';
import { ArrowLeftRight, CalendarClock } from 'lucide-react';
import { Button } from '../../../components/ui/button';
import { ErrorState, Loading } from '../../../components/ui/states';
import { errorMessage } from '../../../lib/api-client';
import { conflictOf, scheduleQueries, useScheduleMutations, type Alternative, type Session } from '../api';
import { conflictLines, ConflictView } from './conflict-view';
import { MAIL_NOTE } from './scope-choice';

/**
 * Free, allowed, passing points to replace the at-risk ones, best first (same room first).
 * One click swaps a point in for the first at-risk point; the server re-checks it.
 */
export function SuggestedReplacements({ session, onSwapped }: { session: Session; onSwapped: (message: string) => void }) {
  const alts = useQuery(scheduleQueries.alternatives(session.id));
  const { swapPoints } = useScheduleMutations();
  const [refusal, setRefusal] = useState<string[] | null>(null);
  const risky = [...new Set(session.riskReasons.map((r) => r.pointId))].filter((id) => session.pointIds.includes(id));
  const labelOf = (id: number) => session.points.find((p) => p.pointId === id)?.label ?? alts.data?.find((a) => a.pointId === id)?.label;
  if (risky.length === 0) return null;

  const swap = (replacements: Alternative[]) => {
    const map = new Map(risky.slice(0, replacements.length).map((id, i) => [id, replacements[i].pointId]));
    const pointIds = session.pointIds.map((id) => map.get(id) ?? id);
    setRefusal(null);
    // mutateAsync, not mutate's callbacks: a swap that makes the class calm unmounts this panel when the
    // schedule is re-read, and React Query skips mutate's callbacks once their component is gone.
    swapPoints.mutateAsync({ id: session.id, pointIds }).then(
      (s) => {
        const what = [...map.entries()].map(([from, to]) => `${labelOf(from)} → ${labelOf(to)}`).join(', ');
        const text = `Swapped ${what}. ${s.atRisk ? 'The class is still at risk.' : 'The class is all clear.'} ${MAIL_NOTE}`;
        toast.success(text);
        onSwapped(text);
      },
      (err: unknown) => {
        const c = conflictOf(err);
        if (c) setRefusal(conflictLines(c, labelOf));
        else toast.error(errorMessage(err));
      },
    );
  };

  const sameRoom = alts.data?.filter((a) => a.sameRoom) ?? [];
  const elsewhere = alts.data?.filter((a) => !a.sameRoom) ?? [];
  return (
    <section aria-labelledby="replacements" className="space-y-3 rounded-xl border border-pine-600/40 bg-pine-50 p-4">
      <h3 id="replacements" className="font-semibold">Suggested replacements</h3>
      <p className="text-sm text-muted">
        For {risky.map((id) => `point ${labelOf(id)}`).join(' and ')}. Free at this time, allowed for the apparatus and passing the load check; same room first. {MAIL_NOTE}
      </p>
      {refusal ? <ConflictView title="Not swapped: the point cannot take this class now." lines={refusal} /> : null}
      {alts.isPending ? <Loading label="Finding free points…" /> : alts.isError ? <ErrorState error={alts.error} retry={() => alts.refetch()} /> : alts.data.length === 0 ? (
        <p className="rounded-lg bg-white p-3 text-sm">No point is free for this class at this time. Move the class to another time, or cancel it.</p>
      ) : (
        <>
          {risky.length > 1 && sameRoom.length >= risky.length ? (
            <Button type="button" busy={swapPoints.isPending} onClick={() => swap(sameRoom.slice(0, risky.length))}>
              <ArrowLeftRight className="size-4" aria-hidden /> Swap in {sameRoom.slice(0, risky.length).map((a) => a.label).join(' and ')}
            </Button>
          ) : null}
          {sameRoom.length ? (
            <ul className="divide-y divide-line overflow-hidden rounded-lg border border-line bg-white">
              {sameRoom.map((a) => (
                <li key={a.pointId} className="flex flex-wrap items-center justify-between gap-3 px-3 py-2">
                  <span>
                    <span className="font-medium">Point {a.label}</span>
                    <span className="text-sm text-muted"> · {a.roomName}</span>
                    {a.warnings.map((w) => (
                      <span key={w.code + w.message} className="flex items-center gap-1 text-sm text-warn-700"><CalendarClock className="size-4 shrink-0" aria-hidden />{w.message}</span>
                    ))}
                  </span>
                  <Button type="button" variant="secondary" disabled={swapPoints.isPending} onClick={() => swap([a])} aria-label={`Swap in point ${a.label} for point ${labelOf(risky[0])}`}>
                    <ArrowLeftRight className="size-4" aria-hidden /> Swap in
                  </Button>
                </li>
              ))}
            </ul>
          ) : (
            <p className="rounded-lg bg-white p-3 text-sm">No point in this class’s room is free. Those below hang in other rooms.</p>
          )}
          {elsewhere.length ? (
            <div className="text-sm">
              <p className="font-medium">Free in other rooms</p>
              <p className="text-muted">A class keeps its room, so these cannot be swapped in here: book the class in that room instead, or move it.</p>
              <ul className="mt-1 list-disc pl-5">
                {elsewhere.map((a) => <li key={a.pointId}>Point {a.label} · {a.roomName}{a.warnings.length ? ` · ${a.warnings.map((w) => w.message).join('; ')}` : ''}</li>)}
              </ul>
            </div>
          ) : null}
        </>
      )}
    </section>
  );
}
