import type { GearEvent } from '../../../../shared/schemas/rig';
import { Card, EmptyState } from '../../../components/ui/states';
import { eventKindLabels, type StudioFormat } from '../format';

export function GearEvents({ events, fmt }: { events: GearEvent[]; fmt: StudioFormat }) {
  const sorted = [...events].sort((a, b) => b.recordedAt.localeCompare(a.recordedAt));
  return (
    <Card>
      <h2 className="mb-3 font-semibold">Events</h2>
      {sorted.length === 0 ? (
        <EmptyState title="No events recorded">Arrested falls, shock loads, drops and overloads are logged here.</EmptyState>
      ) : (
        <ol className="divide-y divide-line">
          {sorted.map((ev) => (
            <li key={ev.id} className="py-2 text-sm">
              <p><span className="font-semibold">{eventKindLabels[ev.kind]}</span> <span className="text-muted">· {fmt.when(ev.recordedAt)}{ev.recordedBy ? ` · ${ev.recordedBy}` : ''}</span></p>
              {ev.note ? <p className="whitespace-pre-line">{ev.note}</p> : null}
            </li>
          ))}
        </ol>
      )}
    </Card>
  );
}
