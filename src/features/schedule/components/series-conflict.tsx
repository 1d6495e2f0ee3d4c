import { Button } from '../../../components/ui/button';
import type { Conflict } from '../api';
import { ConflictView, OccurrenceList } from './conflict-view';

/**
 * A series some of whose classes cannot be booked: nothing is booked yet. Reception either books
 * the others or goes back and changes points (or the time).
 */
export function SeriesConflict({
  conflict,
  labelOf,
  timeZone,
  busy,
  onBookOthers,
  onBack,
}: {
  conflict: Conflict;
  labelOf: (pointId: number) => string | undefined;
  timeZone: string;
  busy: boolean;
  onBookOthers: () => void;
  onBack: () => void;
}) {
  const occurrences = conflict.occurrences ?? [];
  const total = conflict.total ?? occurrences.length;
  const bookable = conflict.bookable ?? total - occurrences.length;
  return (
    <div className="space-y-4">
      <ConflictView
        title={`${occurrences.length} of ${total} classes in this series cannot be booked. Nothing is booked yet.`}
        lines={[]}
      >
        <OccurrenceList occurrences={occurrences} labelOf={labelOf} timeZone={timeZone} />
      </ConflictView>
      <div className="flex flex-wrap gap-2">
        {bookable > 0 ? (
          <Button type="button" busy={busy} onClick={onBookOthers}>
            Book the other {bookable} {bookable === 1 ? 'class' : 'classes'}
          </Button>
        ) : null}
        <Button type="button" variant="secondary" onClick={onBack}>Go back and change points</Button>
      </div>
      {bookable === 0 ? <p className="text-sm text-muted">None of the classes can be booked as they are: change the points, the time or the instructor.</p> : null}
    </div>
  );
}
