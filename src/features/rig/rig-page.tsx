import { useState } from 'react';
import { Link } from 'react-router-dom';
import { useQuery } from '@tanstack/react-query';
import { Boxes, Plus, Printer } from 'lucide-react';
import type { Point, Room } from '../../../shared/schemas/rig';
import { Button } from '../../components/ui/button';
import { Caution } from '../../components/ui/caution';
import { Card, EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { paths } from '../../lib/paths';
import { rigQueries } from './api';
import { useRigAccess } from './access';
import { byUrgency, type StudioFormat } from './format';
import { useStudioFormat } from './use-studio-format';
import { PointForm } from './components/point-form';
import { PointSummary } from './components/point-summary';
import { RoomForm } from './components/room-form';

const linkButton = 'inline-flex min-h-11 items-center gap-2 rounded-lg border border-line bg-white px-4 py-2 text-sm font-medium text-ink hover:bg-pine-50';

export function RigPage() {
  const { canEdit } = useRigAccess();
  const rooms = useQuery(rigQueries.rooms());
  const points = useQuery(rigQueries.points());
  const { studio, fmt } = useStudioFormat();
  const [addingRoom, setAddingRoom] = useState(false);

  const failed = rooms.error ?? points.error ?? studio.error;
  return (
    <div className="max-w-5xl">
      <PageHeader
        title="Rig"
        actions={
          <>
            <Link to={paths.gear} className={linkButton}><Boxes className="size-4" aria-hidden /> Gear</Link>
            <Link to={paths.labels} className={linkButton}><Printer className="size-4" aria-hidden /> Labels</Link>
            {canEdit && !addingRoom ? <Button onClick={() => setAddingRoom(true)}><Plus className="size-4" aria-hidden /> Add a room</Button> : null}
          </>
        }
      >
        Every room and rigging point, the most urgent first.
      </PageHeader>
      {addingRoom ? <RoomForm onDone={() => setAddingRoom(false)} /> : null}
      {failed ? (
        <ErrorState error={failed} retry={() => { void rooms.refetch(); void points.refetch(); void studio.refetch(); }} />
      ) : !rooms.data || !points.data || !fmt ? (
        <Loading label="Loading the rig register…" />
      ) : rooms.data.length === 0 ? (
        <EmptyState title="No rooms yet">{canEdit ? 'Add the first room, then its rigging points.' : 'A rigger adds rooms and points here.'}</EmptyState>
      ) : (
        <div className="space-y-6">
          <Tally points={points.data} />
          <Caution />
          {rooms.data.map((room) => (
            <RoomSection key={room.id} room={room} rooms={rooms.data} points={points.data.filter((p) => p.roomId === room.id)} fmt={fmt} canEdit={canEdit} />
          ))}
        </div>
      )}
    </div>
  );
}

function Tally({ points }: { points: Point[] }) {
  const count = (s: Point['status']['status']) => points.filter((p) => p.status.status === s).length;
  return (
    <p className="text-sm text-muted" aria-live="polite">
      {points.length} {points.length === 1 ? 'point' : 'points'}: {count('blocked')} blocked, {count('expiring')} expiring soon, {count('cleared')} cleared.
    </p>
  );
}

function RoomSection({ room, rooms, points, fmt, canEdit }: { room: Room; rooms: Room[]; points: Point[]; fmt: StudioFormat; canEdit: boolean }) {
  const [adding, setAdding] = useState(false);
  const sorted = [...points].sort(byUrgency);
  const headingId = `room-${room.id}`;
  return (
    <section aria-labelledby={headingId}>
      <div className="mb-2 flex flex-wrap items-center justify-between gap-2">
        <h2 id={headingId} className="text-lg font-semibold">{room.name}</h2>
        {canEdit && !adding ? (
          <Button variant="secondary" onClick={() => setAdding(true)} aria-label={`Add a point in ${room.name}`}>
            <Plus className="size-4" aria-hidden /> Add a point
          </Button>
        ) : null}
      </div>
      {adding ? <PointForm rooms={rooms} roomId={room.id} onDone={() => setAdding(false)} /> : null}
      {sorted.length === 0 ? (
        <EmptyState title={`No points in ${room.name} yet`}>{canEdit ? 'Add a point, then enter its load path from the structure down.' : null}</EmptyState>
      ) : (
        <Card className="p-0!">
          <ul aria-label={`Points in ${room.name}`}>
            {sorted.map((p) => <PointSummary key={p.id} point={p} fmt={fmt} />)}
          </ul>
        </Card>
      )}
    </section>
  );
}
