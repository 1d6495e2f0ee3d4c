import { useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { toast } from 'sonner';
import { ArrowLeftRight, CalendarClock, DoorOpen, Unlink } from 'lucide-react';
import { Button } from '../../../components/ui/button';
import { ConfirmDialog } from '../../../components/ui/confirm';
import { ErrorState, Loading } from '../../../components/ui/states';
import { errorMessage } from '../../../lib/api-client';
import { conflictOf, scheduleQueries, useScheduleMutations, type Alternative, type Session } from '../api';
import { conflictLines, ConflictView } from './conflict-view';
import { MAIL_NOTE, ScopeChoice, type Scope } from './scope-choice';

/** A move of the whole class to another room, on free points there. */
interface RoomMove {
  roomId: number;
  roomName: string;
  points: Alternative[];
}

/**
 * A class moves to another room whole (each point belongs to one room), so it needs a point there
 * for each of its own: a one-point class may take one of the best free points of each room, a larger one the best
 * free points of each room, as many as it has (fewer where the room has fewer; the desk is told).
 */
/** A one-point class is offered at most this many points per other room, best first, to keep the list short. */
const CHOICES_PER_ROOM = 3;

function roomMoves(elsewhere: Alternative[], points: number): RoomMove[] {
  if (points <= 1) {
    const offered = new Map<number, number>();
    return elsewhere
      .filter((a) => {
        const n = offered.get(a.roomId) ?? 0;
        offered.set(a.roomId, n + 1);
        return n < CHOICES_PER_ROOM;
      })
      .map((a) => ({ roomId: a.roomId, roomName: a.roomName, points: [a] }));
  }
  const byRoom = new Map<number, RoomMove>();
  for (const a of elsewhere) {
    const m = byRoom.get(a.roomId) ?? { roomId: a.roomId, roomName: a.roomName, points: [] };
    if (m.points.length < points) m.points.push(a);
    byRoom.set(a.roomId, m);
  }
  return [...byRoom.values()];
}

const pointsText = (points: Alternative[]) => `${points.length === 1 ? 'point' : 'points'} ${points.map((a) => a.label).join(' and ')}`;

/**
 * Free, allowed, passing points to replace the at-risk ones, best first (same room first).
 * One click swaps a point of the same room in for the first at-risk point; a point in another room
 * moves the class to that room, after a confirmation. The server re-checks either.
 */
export function SuggestedReplacements({ session, onSwapped, onMove }: { session: Session; onSwapped: (message: string) => void; onMove: () => void }) {
  const alts = useQuery(scheduleQueries.alternatives(session.id));
  const { swapPoints } = useScheduleMutations();
  const [refusal, setRefusal] = useState<{ title: string; lines: string[] } | null>(null);
  const [confirming, setConfirming] = useState<RoomMove | null>(null);
  const [scope, setScope] = useState<Scope>('this');
  const following = session.seriesId !== null && scope === 'following' ? ', for this and the following classes' : '';
  const risky = [...new Set(session.riskReasons.map((r) => r.pointId))].filter((id) => session.pointIds.includes(id));
  const labelOf = (id: number) => session.points.find((p) => p.pointId === id)?.label ?? alts.data?.find((a) => a.pointId === id)?.label;
  if (risky.length === 0) return null;

  /** Cancel just the blocked points' part of the class: it keeps its other points (and fewer places). */
  const free = () => {
    const keep = session.pointIds.filter((id) => !risky.includes(id));
    setRefusal(null);
    swapPoints.mutateAsync({ id: session.id, pointIds: keep, scope }).then(
      (s) => {
        const text = `Freed ${risky.map((id) => `point ${labelOf(id)}`).join(' and ')}${following}: the class keeps ${s.points.map((p) => p.label).join(', ')} (${s.places} of ${s.capacity} places usable). ${s.atRisk ? 'The class is still at risk.' : 'The class is all clear.'} ${MAIL_NOTE}`;
        toast.success(text);
        onSwapped(text);
      },
      (err: unknown) => {
        const c = conflictOf(err);
        if (c) setRefusal({ title: 'Not freed: the class cannot keep its other points now.', lines: conflictLines(c, labelOf) });
        else toast.error(errorMessage(err));
      },
    );
  };
  const others = session.pointIds.filter((id) => !risky.includes(id));

  const swap = (replacements: Alternative[]) => {
    const map = new Map(risky.slice(0, replacements.length).map((id, i) => [id, replacements[i].pointId]));
    const pointIds = session.pointIds.map((id) => map.get(id) ?? id);
    setRefusal(null);
    // mutateAsync, not mutate's callbacks: a swap that makes the class calm unmounts this panel when the
    // schedule is re-read, and React Query skips mutate's callbacks once their component is gone.
    swapPoints.mutateAsync({ id: session.id, pointIds, scope }).then(
      (s) => {
        const what = [...map.entries()].map(([from, to]) => `${labelOf(from)} → ${labelOf(to)}`).join(', ');
        const text = `Swapped ${what}${following}. ${s.atRisk ? 'The class is still at risk.' : 'The class is all clear.'} ${MAIL_NOTE}`;
        toast.success(text);
        onSwapped(text);
      },
      (err: unknown) => {
        const c = conflictOf(err);
        if (c) setRefusal({ title: c.occurrences?.length ? `Not swapped: ${c.occurrences.length} of the following classes cannot take the point. Nothing was changed.` : 'Not swapped: the point cannot take this class now.', lines: conflictLines(c, labelOf) });
        else toast.error(errorMessage(err));
      },
    );
  };

  const moveRoom = (m: RoomMove) => {
    setRefusal(null);
    // mutateAsync, as for a swap: a move that makes the class calm unmounts this panel.
    swapPoints.mutateAsync({ id: session.id, pointIds: m.points.map((a) => a.pointId), roomId: m.roomId, scope }).then(
      (s) => {
        setConfirming(null);
        const text = `Moved to ${s.roomName} on ${pointsText(m.points)}${following}. ${s.atRisk ? 'The class is still at risk.' : 'The class is all clear.'} ${MAIL_NOTE}`;
        toast.success(text);
        onSwapped(text);
      },
      (err: unknown) => {
        setConfirming(null);
        const c = conflictOf(err);
        if (c) setRefusal({ title: `Not moved to ${m.roomName}: the class cannot run there now.`, lines: conflictLines(c, labelOf) });
        else toast.error(errorMessage(err));
      },
    );
  };

  const sameRoom = alts.data?.filter((a) => a.sameRoom) ?? [];
  const elsewhere = alts.data?.filter((a) => !a.sameRoom) ?? [];
  const moves = roomMoves(elsewhere, session.pointIds.length);
  const freed = session.points.map((p) => p.label).join(', ');
  return (
    <section aria-labelledby="replacements" className="space-y-3 rounded-xl border border-pine-600/40 bg-pine-50 p-4">
      <h3 id="replacements" className="font-semibold">Suggested replacements</h3>
      <p className="text-sm text-muted">
        For {risky.map((id) => `point ${labelOf(id)}`).join(' and ')}. Free at this time, allowed for the apparatus and passing the load check; same room first. {MAIL_NOTE}
      </p>
      <ScopeChoice seriesId={session.seriesId} value={scope} onChange={setScope} legend="Swap for" />
      {refusal ? <ConflictView title={refusal.title} lines={refusal.lines} /> : null}
      {alts.isPending ? <Loading label="Finding free points…" /> : alts.isError ? <ErrorState error={alts.error} retry={() => alts.refetch()} /> : alts.data.length === 0 ? (
        <div className="space-y-3 rounded-lg bg-white p-3 text-sm">
          <p>No point is free for this class at this time. What works:</p>
          <div className="flex flex-wrap gap-2">
            {others.length ? (
              <Button type="button" variant="secondary" busy={swapPoints.isPending} onClick={free}>
                <Unlink className="size-4" aria-hidden /> Free {risky.map((id) => `point ${labelOf(id)}`).join(' and ')}, keep {others.map((id) => labelOf(id)).join(', ')}
              </Button>
            ) : null}
            <Button type="button" variant="secondary" onClick={onMove}>
              <CalendarClock className="size-4" aria-hidden /> Move to another time with a free point
            </Button>
          </div>
          <p className="text-muted">{others.length ? 'Freeing cancels only that point’s part of the class; it runs on the others, with fewer places.' : 'Its only point is blocked: moving picks a point free at the new time.'} Or cancel the class below.</p>
        </div>
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
          {moves.length ? (
            <div className="space-y-2 text-sm">
              <p className="font-medium" id="other-rooms">Free in other rooms</p>
              <p className="text-muted">Taking one of these moves the whole class to that room, on {session.pointIds.length === 1 ? 'that point' : 'those points'}; you confirm first.</p>
              <ul aria-labelledby="other-rooms" className="divide-y divide-line overflow-hidden rounded-lg border border-line bg-white">
                {moves.map((m) => (
                  <li key={`${m.roomId}:${m.points.map((a) => a.pointId).join(',')}`} className="flex flex-wrap items-center justify-between gap-3 px-3 py-2">
                    <span>
                      <span className="font-medium">{m.points.length === 1 ? 'Point' : 'Points'} {m.points.map((a) => a.label).join(' and ')}</span>
                      <span className="text-muted"> · {m.roomName}</span>
                      {m.points.flatMap((a) => a.warnings).map((w) => (
                        <span key={w.code + w.message} className="flex items-center gap-1 text-warn-700"><CalendarClock className="size-4 shrink-0" aria-hidden />{w.message}</span>
                      ))}
                    </span>
                    <Button type="button" variant="secondary" disabled={swapPoints.isPending} onClick={() => { setRefusal(null); setConfirming(m); }}>
                      <DoorOpen className="size-4" aria-hidden /> Move to {m.roomName} on {m.points.map((a) => a.label).join(' and ')}
                    </Button>
                  </li>
                ))}
              </ul>
            </div>
          ) : null}
        </>
      )}
      <ConfirmDialog
        open={confirming !== null}
        title={confirming ? `Move ${session.className} to ${confirming.roomName}?` : 'Move the class to another room?'}
        confirmLabel={confirming ? `Move to ${confirming.roomName}` : 'Move'}
        cancelLabel="Keep the room"
        danger={false}
        busy={swapPoints.isPending}
        onCancel={() => setConfirming(null)}
        onConfirm={() => { if (confirming) moveRoom(confirming); }}
      >
        {confirming ? (
          <>
            The class changes room: from {session.roomName} to {confirming.roomName}, on {pointsText(confirming.points)}, at the same time. Its points in {session.roomName} ({freed}) are freed.
            {confirming.points.length < session.pointIds.length
              ? ` ${confirming.roomName} has only ${confirming.points.length} free ${confirming.points.length === 1 ? 'point' : 'points'} for it, so the class will have at most ${confirming.points.length} ${confirming.points.length === 1 ? 'place' : 'places'}.`
              : ''}{' '}
            {MAIL_NOTE}
          </>
        ) : null}
      </ConfirmDialog>
    </section>
  );
}
