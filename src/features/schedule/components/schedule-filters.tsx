import { useId } from 'react';
import type { UseQueryResult } from '@tanstack/react-query';
import { CircleAlert } from 'lucide-react';
import type { Instructor } from '../../../../shared/schemas/staff';
import { SelectField } from '../../../components/ui/field';
import { Button } from '../../../components/ui/button';
import { errorMessage } from '../../../lib/api-client';
import { sessionStates, stateLook, type SessionState } from '../session-state';

export interface ScheduleFilter {
  roomId?: number;
  instructorId?: number;
  state?: SessionState;
}

const num = (v: string) => (v ? Number(v) : undefined);

/** Room and instructor narrow what is fetched; state narrows what is shown. */
export function ScheduleFilters({
  value,
  onChange,
  rooms,
  instructors,
}: {
  value: ScheduleFilter;
  onChange: (f: ScheduleFilter) => void;
  rooms: { id: number; name: string }[];
  /** The active instructors as queried, so the filter can say it is loading or failed. */
  instructors: Pick<UseQueryResult<Instructor[]>, 'data' | 'isPending' | 'isError' | 'error' | 'refetch'>;
}) {
  const any = value.roomId !== undefined || value.instructorId !== undefined || value.state !== undefined;
  const list = instructors.data ?? [];
  // A chosen instructor deactivated since keeps an option, so the field never shows "All" while filtering.
  const unlisted = value.instructorId !== undefined && instructors.data !== undefined && !list.some((i) => i.id === value.instructorId);
  const errorId = useId();
  return (
    <form role="search" aria-label="Filter the schedule" className="grid items-end gap-3 sm:grid-cols-2 lg:grid-cols-[1fr_1fr_1fr_auto]" onSubmit={(e) => e.preventDefault()}>
      <SelectField label="Room" value={value.roomId ?? ''} onChange={(e) => onChange({ ...value, roomId: num(e.target.value) })}>
        <option value="">All rooms</option>
        {rooms.map((r) => <option key={r.id} value={r.id}>{r.name}</option>)}
      </SelectField>
      <SelectField
        label="Instructor"
        value={value.instructorId ?? ''}
        aria-busy={instructors.isPending || undefined}
        aria-describedby={instructors.isError ? errorId : undefined}
        onChange={(e) => onChange({ ...value, instructorId: num(e.target.value) })}
      >
        <option value="">All instructors</option>
        {instructors.isPending ? <option value="loading" disabled>Loading instructors…</option> : null}
        {unlisted ? <option value={value.instructorId}>An instructor no longer listed</option> : null}
        {list.map((i) => <option key={i.id} value={i.id}>{i.name}</option>)}
      </SelectField>
      <SelectField label="State" value={value.state ?? ''} onChange={(e) => onChange({ ...value, state: (e.target.value || undefined) as SessionState | undefined })}>
        <option value="">Every state</option>
        {sessionStates.map((s) => <option key={s} value={s}>{stateLook[s].label}</option>)}
      </SelectField>
      <Button type="button" variant="ghost" disabled={!any} onClick={() => onChange({})}>Clear filters</Button>
      {instructors.isError ? (
        // Below the whole row, so the fields stay aligned; the instructor field points to it.
        <div id={errorId} role="alert" className="flex flex-wrap items-center gap-x-3 gap-y-1 text-sm text-stop-700 sm:col-span-2 lg:col-span-4">
          <CircleAlert className="size-4 shrink-0" aria-hidden />
          <span>The instructor list did not load: {errorMessage(instructors.error)}</span>
          <Button type="button" variant="secondary" onClick={() => void instructors.refetch()}>Try again</Button>
        </div>
      ) : null}
    </form>
  );
}
