import { useState } from 'react';
import type { UseFormReturn } from 'react-hook-form';
import { X } from 'lucide-react';
import { ChoiceGroup } from '../../../components/ui/choice-group';
import { TextField } from '../../../components/ui/field';
import { Button } from '../../../components/ui/button';
import type { BookingForm } from '../booking-form';
import { weekdays, type WeekdayCode } from '../recurrence';
import { dayWithYear, longDay } from '../format';
import { instantFromWall, weekdayIndex } from '../zone';

/** Repeat: none, or weekly on chosen days until a date or for a number of classes, with days left out. */
export function RepeatFields({ form, timeZone, preview }: { form: UseFormReturn<BookingForm>; timeZone: string; preview: { starts: Date[]; error?: string } | null }) {
  const { watch, setValue, register, formState } = form;
  const e = formState.errors;
  const repeat = watch('repeat');
  const days = watch('days');
  const ends = watch('ends');
  const skipDays = watch('skipDays');
  const [skip, setSkip] = useState('');
  const toggleDay = (code: WeekdayCode, on: boolean) => setValue('days', on ? [...days, code] : days.filter((d) => d !== code), { shouldValidate: formState.isSubmitted });
  const addSkip = () => {
    if (!/^\d{4}-\d{2}-\d{2}$/.test(skip) || skipDays.includes(skip)) return;
    setValue('skipDays', [...skipDays, skip].sort());
    setSkip('');
  };
  const dayName = (d: string) => {
    const at = instantFromWall(d, '12:00', timeZone);
    return at ? longDay(at.toISOString(), timeZone) : d;
  };
  return (
    <div className="space-y-4">
      <ChoiceGroup
        legend="Repeat"
        value={repeat}
        options={[{ value: 'none', label: 'Does not repeat' }, { value: 'weekly', label: 'Weekly' }]}
        onChange={(v) => {
          setValue('repeat', v);
          // Start from the first day's weekday unless several days were already chosen.
          const wd = weekdayIndex(form.getValues('date'));
          if (v === 'weekly' && days.length <= 1 && wd !== null) setValue('days', [weekdays[wd].code]);
        }}
      />
      {repeat === 'weekly' ? (
        <div className="space-y-4 rounded-xl border border-line bg-white p-4">
          <fieldset className="space-y-1" aria-describedby={e.days ? 'repeat-days-error' : undefined}>
            <legend className="text-sm font-medium">On these days</legend>
            <div className="flex flex-wrap gap-1.5">
              {weekdays.map((w) => (
                <label
                  key={w.code}
                  className={`flex min-h-11 min-w-11 cursor-pointer items-center justify-center rounded-lg border px-2 text-sm font-medium has-[:focus-visible]:outline has-[:focus-visible]:outline-3 has-[:focus-visible]:outline-brass-500 ${
                    days.includes(w.code) ? 'border-pine-700 bg-pine-700 text-white' : 'border-line bg-white text-ink hover:bg-pine-50'
                  }`}
                >
                  <input type="checkbox" className="sr-only" checked={days.includes(w.code)} onChange={(ev) => toggleDay(w.code, ev.target.checked)} />
                  <span aria-hidden>{w.short}</span>
                  <span className="sr-only">{w.long}</span>
                </label>
              ))}
            </div>
            {e.days ? <p id="repeat-days-error" role="alert" className="text-sm text-stop-700">{e.days.message}</p> : null}
          </fieldset>
          <ChoiceGroup
            legend="Ends"
            value={ends}
            options={[{ value: 'until', label: 'On a date' }, { value: 'count', label: 'After a number of classes' }]}
            onChange={(v) => setValue('ends', v)}
          />
          <div className="grid gap-3 sm:grid-cols-2">
            {ends === 'until' ? (
              <TextField label="Last day" type="date" error={e.until?.message} {...register('until')} />
            ) : (
              <TextField label="Number of classes" type="number" inputMode="numeric" min={1} error={e.count?.message} {...register('count', { valueAsNumber: true })} />
            )}
          </div>
          <div className="space-y-2">
            <div className="flex flex-wrap items-end gap-2">
              <TextField
                label="Leave out a date"
                type="date"
                value={skip}
                aria-describedby="skip-hint"
                onChange={(ev) => setSkip(ev.target.value)}
                onKeyDown={(ev) => {
                  if (ev.key === 'Enter') {
                    ev.preventDefault();
                    addSkip();
                  }
                }}
              />
              <Button type="button" variant="secondary" onClick={addSkip} disabled={!skip}>Leave out</Button>
            </div>
            <p id="skip-hint" className="text-xs text-muted">A holiday or a studio closure: no class that day.</p>
            {skipDays.length ? (
              <ul className="flex flex-wrap gap-2" aria-label="Dates left out">
                {skipDays.map((d) => (
                  <li key={d} className="inline-flex items-center gap-1 rounded-full border border-line bg-canvas pl-3 text-sm">
                    {dayName(d)}
                    <button type="button" className="flex size-11 items-center justify-center rounded-full hover:bg-pine-50" aria-label={`Put ${dayName(d)} back`} onClick={() => setValue('skipDays', skipDays.filter((x) => x !== d))}>
                      <X className="size-4" aria-hidden />
                    </button>
                  </li>
                ))}
              </ul>
            ) : null}
          </div>
          {form.watch('ends') === 'count' && !(Number(form.watch('count')) >= 1) ? (
            <p role="alert" className="text-sm text-stop-700">Enter how many classes: at least one.</p>
          ) : (
            <SeriesPreview preview={preview} timeZone={timeZone} />
          )}
        </div>
      ) : null}
    </div>
  );
}

function SeriesPreview({ preview, timeZone }: { preview: { starts: Date[]; error?: string } | null; timeZone: string }) {
  if (!preview) return <p className="text-sm text-muted">Pick the day, time and repeat days to see the classes.</p>;
  if (preview.error) return <p role="alert" className="text-sm text-stop-700">{preview.error}</p>;
  const n = preview.starts.length;
  if (n === 0) return <p role="alert" className="text-sm text-stop-700">These choices give no classes. Check the days and the last day.</p>;
  const first = preview.starts[0].toISOString();
  const last = preview.starts[n - 1].toISOString();
  return (
    <div className="text-sm" aria-live="polite">
      <p>
        <span className="font-medium">{n} {n === 1 ? 'class' : 'classes'}</span>, from {dayWithYear(first, timeZone)} to {dayWithYear(last, timeZone)}.
      </p>
      <details className="mt-1">
        <summary className="flex min-h-11 cursor-pointer items-center text-pine-700">Show every date</summary>
        <ol className="mt-1 columns-2 text-muted sm:columns-3">
          {preview.starts.map((d) => <li key={d.toISOString()}>{dayWithYear(d.toISOString(), timeZone)}</li>)}
        </ol>
      </details>
    </div>
  );
}
