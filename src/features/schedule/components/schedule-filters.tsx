import { SelectField } from '../../../components/ui/field';
import { Button } from '../../../components/ui/button';
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
  instructors: { id: number; name: string }[];
}) {
  const any = value.roomId !== undefined || value.instructorId !== undefined || value.state !== undefined;
  return (
    <form role="search" aria-label="Filter the schedule" className="grid items-end gap-3 sm:grid-cols-2 lg:grid-cols-[1fr_1fr_1fr_auto]" onSubmit={(e) => e.preventDefault()}>
      <SelectField label="Room" value={value.roomId ?? ''} onChange={(e) => onChange({ ...value, roomId: num(e.target.value) })}>
        <option value="">All rooms</option>
        {rooms.map((r) => <option key={r.id} value={r.id}>{r.name}</option>)}
      </SelectField>
      <SelectField label="Instructor" value={value.instructorId ?? ''} onChange={(e) => onChange({ ...value, instructorId: num(e.target.value) })}>
        <option value="">All instructors</option>
        {instructors.map((i) => <option key={i.id} value={i.id}>{i.name}</option>)}
      </SelectField>
      <SelectField label="State" value={value.state ?? ''} onChange={(e) => onChange({ ...value, state: (e.target.value || undefined) as SessionState | undefined })}>
        <option value="">Every state</option>
        {sessionStates.map((s) => <option key={s} value={s}>{stateLook[s].label}</option>)}
      </SelectField>
      <Button type="button" variant="ghost" disabled={!any} onClick={() => onChange({})}>Clear filters</Button>
    </form>
  );
}
