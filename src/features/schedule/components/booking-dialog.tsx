import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import type { ClassType } from '../../../../shared/schemas/class-types';
import { useForm } from 'react-hook-form';
import { useQuery } from '@tanstack/react-query';
import { zodResolver } from '@hookform/resolvers/zod';
import { toast } from 'sonner';
import { Plus } from 'lucide-react';
import { Sheet } from '../../../components/ui/sheet';
import { Button } from '../../../components/ui/button';
import { SelectField, TextField } from '../../../components/ui/field';
import { ApiError, errorMessage } from '../../../lib/api-client';
import { conflictOf, useScheduleMutations, type Availability, type Conflict, type CreatedSessions } from '../api';
import { bookingBody, bookingFormSchema, firstTimes, newRequestKey, rruleOf, type BookingForm } from '../booking-form';
import { previewSeries, weekdays } from '../recurrence';
import { apparatusLabel, whenShort, zoneAbbrev } from '../format';
import { addMinutes, minutesOf, weekdayIndex } from '../zone';
import { staffQueries } from '../../staff/api';
import { useClassTypes, useRooms } from '../use-schedule-lists';
import { ClassTypeForm } from './class-type-form';
import { PointPicker } from './point-picker';
import { RepeatFields } from './repeat-fields';
import { SeriesConflict } from './series-conflict';
import { conflictLines, ConflictView } from './conflict-view';

export interface BookingPrefill {
  date: string;
  start: string;
  end?: string;
}

/** Server field names → the dialog's fields. */
const fieldFor: Record<string, keyof BookingForm> = { classTypeId: 'classTypeId', instructorId: 'instructorId', roomId: 'roomId', startsAt: 'start', endsAt: 'end', pointIds: 'pointIds', rrule: 'days', skipDays: 'skipDays' };

/**
 * `onClose` is a request: the page asks before discarding what was typed (`onDirty` tells it
 * whether anything was).
 */
export function BookingDialog({ prefill, timeZone, onClose, onBooked, onDirty }: { prefill: BookingPrefill | null; timeZone: string; onClose: () => void; onBooked: (s: CreatedSessions) => void; onDirty: (dirty: boolean) => void }) {
  // While a series' refusal is shown, its own two choices replace the Book button.
  const [choosing, setChoosing] = useState(false);
  const { book } = useScheduleMutations();
  return (
    <Sheet open={prefill !== null} wide closeOnBackdrop={false} onClose={onClose} title="Book a class" description={`Day and times in the studio’s zone: ${timeZone} (${zoneAbbrev(new Date().toISOString(), timeZone)}).`}
      footer={
        <>
          <Button type="button" variant="secondary" onClick={onClose}>Close</Button>
          {choosing ? null : <Button type="submit" form="booking-form" busy={book.isPending}>{book.isPending ? 'Booking…' : 'Book'}</Button>}
        </>
      }
    >
      {prefill ? <BookingBody prefill={prefill} timeZone={timeZone} book={book} onBooked={onBooked} onChoosing={setChoosing} onDirty={onDirty} /> : null}
    </Sheet>
  );
}

function BookingBody({ prefill, timeZone, book, onBooked, onChoosing, onDirty }: { prefill: BookingPrefill; timeZone: string; book: ReturnType<typeof useScheduleMutations>['book']; onBooked: (s: CreatedSessions) => void; onChoosing: (on: boolean) => void; onDirty: (dirty: boolean) => void }) {
  const classTypes = useClassTypes();
  const rooms = useRooms();
  const instructors = useQuery(staffQueries.instructors());
  // One key per opening of the dialog: a repeat of this booking (a double click, a retry after a
  // lost answer) is answered with the first one by the server instead of booking twice.
  const [requestKey] = useState(newRequestKey);
  // Set before the first await, so a second click in the same instant sends nothing.
  const inFlight = useRef(false);
  const [addingType, setAddingType] = useState(false);
  const [series, setSeriesState] = useState<Conflict | null>(null);
  const setSeries = (c: Conflict | null) => {
    setSeriesState(c);
    onChoosing(c !== null);
  };
  const [refusal, setRefusal] = useState<string[] | null>(null);
  const labels = useRef(new Map<number, string>());
  const weekday = weekdays[weekdayIndex(prefill.date) ?? 0].code;
  const form = useForm<BookingForm>({
    resolver: zodResolver(bookingFormSchema),
    defaultValues: {
      classTypeId: '', instructorId: '', roomId: '', date: prefill.date, start: prefill.start, end: prefill.end ?? addMinutes(prefill.start, 60),
      repeat: 'none', days: [weekday], ends: 'count', until: '', count: 10, skipDays: [], pointIds: [],
    },
  });
  const { register, watch, setValue, getValues, formState } = form;
  const e = formState.errors;
  const v = watch();
  const dirty = formState.isDirty || v.pointIds.length > 0;
  useEffect(() => onDirty(dirty), [dirty, onDirty]);
  useEffect(() => () => onDirty(false), [onDirty]);
  const duration = useRef((minutesOf(v.end) ?? 0) - (minutesOf(v.start) ?? 0) || 60);

  // A class type added here is selected once its option is in the list (a select cannot pick a missing option).
  const [createdType, setCreatedType] = useState<ClassType | null>(null);
  useEffect(() => {
    if (!createdType || !classTypes.data?.some((c) => c.id === createdType.id)) return;
    setValue('classTypeId', String(createdType.id), { shouldValidate: formState.isSubmitted });
    duration.current = createdType.durationMinutes;
    setValue('end', addMinutes(getValues('start'), createdType.durationMinutes));
    setCreatedType(null);
  }, [createdType, classTypes.data, setValue, getValues, formState.isSubmitted]);
  const classType = classTypes.data?.find((c) => String(c.id) === v.classTypeId);
  const rule = rruleOf(v, timeZone);
  const first = firstTimes(v, timeZone);
  const preview = useMemo(() => (rule && first ? previewSeries(rule, first.startsAt, timeZone, v.skipDays) : null), [rule, first?.startsAt.getTime(), timeZone, v.skipDays.join()]); // eslint-disable-line react-hooks/exhaustive-deps
  // Availability covers every class of a series, not only the first.
  const firstStart = v.repeat === 'weekly' ? preview?.starts[0] : first?.startsAt;
  const query = classType && v.roomId && first && firstStart
    ? {
        roomId: Number(v.roomId),
        classTypeId: classType.id,
        startsAt: firstStart.toISOString(),
        endsAt: new Date(firstStart.getTime() + first.endsAt.getTime() - first.startsAt.getTime()).toISOString(),
        instructorId: v.instructorId ? Number(v.instructorId) : undefined,
        ...(rule && v.repeat === 'weekly' ? { rrule: rule, skipDays: v.skipDays.length ? v.skipDays.join(',') : undefined } : {}),
      }
    : null;

  const onLoaded = useCallback((a: Availability) => {
    for (const p of a.points) labels.current.set(p.pointId, p.label);
    const ok = new Set(a.points.filter((p) => p.bookable).map((p) => p.pointId));
    const ticked = getValues('pointIds');
    if (ticked.some((id) => !ok.has(id))) setValue('pointIds', ticked.filter((id) => ok.has(id)));
  }, [getValues, setValue]);

  const send = (values: BookingForm, bookAvailable = false) => {
    const built = bookingBody(values, timeZone, bookAvailable, requestKey);
    if (!built.ok) {
      inFlight.current = false;
      return toast.error(built.message);
    }
    inFlight.current = true;
    setRefusal(null);
    book.mutate(built.body, {
      onSettled: () => {
        inFlight.current = false;
      },
      onSuccess: (created) => {
        setSeries(null);
        onBooked(created);
      },
      onError: (err) => {
        const c = conflictOf(err);
        if (c?.occurrences) return setSeries(c);
        setSeries(null);
        if (c) return setRefusal(conflictLines(c, (id) => labels.current.get(id)));
        if (err instanceof ApiError) for (const [k, msg] of Object.entries(err.fields)) if (fieldFor[k]) form.setError(fieldFor[k], { message: msg });
        toast.error(errorMessage(err));
      },
    });
  };

  return (
    <>
      {series ? (
        <SeriesConflict conflict={series} labelOf={(id) => labels.current.get(id)} timeZone={timeZone} busy={book.isPending} onBookOthers={() => { if (!inFlight.current) send(getValues(), true); }} onBack={() => setSeries(null)} />
      ) : null}
      <form
        id="booking-form"
        hidden={series !== null}
        noValidate
        onSubmit={(ev) => {
          if (inFlight.current) return ev.preventDefault();
          inFlight.current = true;
          void form.handleSubmit((values) => send(values), () => { inFlight.current = false; })(ev);
        }}
        className="grid gap-6 lg:grid-cols-[minmax(0,1fr)_minmax(0,1fr)]">
        <div className="space-y-4">
          {refusal ? <ConflictView title="Not booked: some points cannot take this class at that time." lines={refusal} /> : null}
          <div className="flex items-end gap-2">
            <div className="flex-1">
              <SelectField
                label="Class type"
                error={e.classTypeId?.message}
                hint={classType ? `${apparatusLabel(classType.apparatus)} · ${classType.durationMinutes} min · ${classType.capacity} places · ${classType.performersPerPoint} per point` : classTypes.isError ? errorMessage(classTypes.error) : undefined}
                {...register('classTypeId', {
                  onChange: (ev) => {
                    const ct = classTypes.data?.find((c) => String(c.id) === ev.target.value);
                    if (ct) {
                      duration.current = ct.durationMinutes;
                      setValue('end', addMinutes(getValues('start'), ct.durationMinutes));
                    }
                  },
                })}
              >
                <option value="">{classTypes.isPending ? 'Loading…' : 'Pick a class type'}</option>
                {classTypes.data?.map((c) => <option key={c.id} value={c.id}>{c.name}</option>)}
              </SelectField>
            </div>
            {!addingType ? (
              <Button type="button" variant="secondary" onClick={() => setAddingType(true)} className={e.classTypeId || classType ? 'mb-5' : ''}>
                <Plus className="size-4" aria-hidden /> New class type
              </Button>
            ) : null}
          </div>
          {addingType ? (
            <ClassTypeForm
              onCancel={() => setAddingType(false)}
              onCreated={(c) => {
                setAddingType(false);
                setCreatedType(c);
              }}
            />
          ) : null}
          <SelectField label="Instructor" error={e.instructorId?.message} hint={instructors.isError ? errorMessage(instructors.error) : undefined} {...register('instructorId')}>
            <option value="">{instructors.isPending ? 'Loading…' : 'Pick an instructor'}</option>
            {instructors.data?.map((u) => <option key={u.id} value={u.id}>{u.name}</option>)}
          </SelectField>
          <SelectField label="Room" error={e.roomId?.message} hint={rooms.isError ? errorMessage(rooms.error) : undefined} {...register('roomId')}>
            <option value="">{rooms.isPending ? 'Loading…' : 'Pick a room'}</option>
            {rooms.data?.map((r) => <option key={r.id} value={r.id}>{r.name}</option>)}
          </SelectField>
          {/* The day on a line of its own: a third of the column cut the date off ("12/05/202"). */}
          <div className="grid grid-cols-2 gap-3">
            <div className="col-span-2">
              <TextField
                label={v.repeat === 'weekly' ? 'First day' : 'Day'}
                type="date"
                error={e.date?.message}
                {...register('date', {
                  onChange: (ev) => {
                    // A weekly class on one day follows the first day's weekday.
                    const wd = weekdayIndex(ev.target.value);
                    if (getValues('days').length === 1 && wd !== null) setValue('days', [weekdays[wd].code]);
                  },
                })}
              />
            </div>
            <TextField
              label="Starts"
              type="time"
              step={300}
              error={e.start?.message}
              {...register('start', { onChange: (ev) => setValue('end', addMinutes(ev.target.value, duration.current)) })}
            />
            <TextField
              label="Ends"
              type="time"
              step={300}
              error={e.end?.message}
              {...register('end', {
                onChange: (ev) => {
                  const d = (minutesOf(ev.target.value) ?? 0) - (minutesOf(getValues('start')) ?? 0);
                  if (d > 0) duration.current = d;
                },
              })}
            />
          </div>
          <RepeatFields form={form} timeZone={timeZone} preview={preview} />
        </div>
        <div className="space-y-3">
          <PointPicker
            query={query}
            value={v.pointIds}
            onChange={(ids) => setValue('pointIds', ids, { shouldValidate: formState.isSubmitted })}
            onLoaded={onLoaded}
            error={e.pointIds?.message}
            note={firstStart && first ? `For ${whenShort(firstStart.toISOString(), new Date(firstStart.getTime() + first.endsAt.getTime() - first.startsAt.getTime()).toISOString(), timeZone)}${v.repeat === 'weekly' && preview ? ` and every class after it (${preview.starts.length} in all)` : ''}.` : undefined}
          />
          {classType && v.pointIds.length > classType.capacity ? (
            <p className="text-sm text-warn-700">More points ticked than the class has places ({classType.capacity}): places stay at {classType.capacity}.</p>
          ) : null}
          <p className="text-xs text-muted">Booking sends the instructor no e-mail now; their reminders follow before each class.</p>
        </div>
      </form>
    </>
  );
}
