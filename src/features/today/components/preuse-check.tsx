import { useEffect, useId, useRef, useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { toast } from 'sonner';
import { Check, OctagonX, X } from 'lucide-react';
import { Button } from '../../../components/ui/button';
import { ErrorState, Loading } from '../../../components/ui/states';
import { ApiError, errorMessage } from '../../../lib/api-client';
import { todayQueries, usePreuseCheck, type PreuseResult } from '../api';

type Mark = 'unticked' | 'ok' | 'fail' | 'na';

/**
 * PRODUCT.md §4.5: the short pre-use list for one point, ticked with a thumb. Every item starts
 * unticked; a problem needs a short note and opens a fault at once.
 */
export function PreuseCheck({ pointId, label, sessionId, onClose, onDone }: { pointId: number; label: string; sessionId?: number; onClose: () => void; onDone: (r: PreuseResult) => void }) {
  const list = useQuery(todayQueries.preuseList(pointId));
  const save = usePreuseCheck(pointId);
  const [marks, setMarks] = useState<Record<string, Mark>>({});
  const [notes, setNotes] = useState<Record<string, string>>({});
  const [problems, setProblems] = useState<Record<string, string>>({});
  const [formError, setFormError] = useState<string | null>(null);
  const heading = useRef<HTMLHeadingElement>(null);
  const hid = useId();
  useEffect(() => heading.current?.focus(), []);

  const items = list.data?.items ?? [];
  const failed = items.filter((i) => marks[i.key] === 'fail');
  const set = (key: string, mark: Mark) => {
    setMarks((m) => ({ ...m, [key]: m[key] === mark ? 'unticked' : mark }));
    setProblems((p) => ({ ...p, [key]: '' }));
    setFormError(null);
  };

  const submit = () => {
    const errs: Record<string, string> = {};
    for (const i of items) {
      const m = marks[i.key] ?? 'unticked';
      if (m === 'unticked') errs[i.key] = `Check this item, then tap Good${i.notApplicable ? ', Not applicable' : ''} or Problem.`;
      if (m === 'fail' && (notes[i.key] ?? '').trim().length < 3) errs[i.key] = 'Say in a few words what is wrong.';
    }
    setProblems(errs);
    if (Object.keys(errs).length) {
      setFormError(`${Object.keys(errs).length} item${Object.keys(errs).length === 1 ? ' needs' : 's need'} your attention before the check can be recorded.`);
      return;
    }
    save.mutate(
      { sessionId, items: items.map((i) => ({ key: i.key, result: marks[i.key] === 'fail' ? 'fail' : marks[i.key] === 'na' ? 'not_applicable' : 'pass', note: marks[i.key] === 'fail' ? notes[i.key].trim() : undefined })) },
      {
        onSuccess: (r) => {
          if (r.passed) toast.success(`Pre-use check recorded for ${label}.`);
          else toast.error(`${label} is now blocked: ${r.faultIds.length === 1 ? 'a fault was' : `${r.faultIds.length} faults were`} opened. Do not use it until a rigger clears it.`, { duration: 10_000 });
          onDone(r);
        },
        onError: (err) => setFormError(err instanceof ApiError && err.status === 403 ? 'Only instructors and riggers record pre-use checks.' : errorMessage(err)),
      },
    );
  };

  return (
    <section aria-labelledby={hid} className="mt-4 space-y-3 rounded-xl border-2 border-pine-600 bg-pine-50 p-3">
      <div className="flex items-start justify-between gap-2">
        <h3 id={hid} ref={heading} tabIndex={-1} className="text-lg font-semibold">Pre-use check: {label}</h3>
        <button type="button" onClick={onClose} className="flex size-12 shrink-0 items-center justify-center rounded-lg text-ink hover:bg-white" aria-label="Close the pre-use check">
          <X aria-hidden />
        </button>
      </div>
      {list.isPending ? <Loading label="Loading the checklist…" /> : list.isError ? <ErrorState error={list.error} retry={() => list.refetch()} /> : (
        <>
          <p className="text-sm text-muted">Look at each item on the point itself, then tap Good or Problem{items.some((i) => i.notApplicable) ? ' (or Not applicable where offered)' : ''}.</p>
          <ol className="space-y-3">
            {items.map((item) => {
              const mark = marks[item.key] ?? 'unticked';
              const problem = problems[item.key];
              return (
                <li key={item.key} className={`rounded-lg border bg-white p-3 ${mark === 'fail' ? 'border-stop-700' : mark === 'ok' || mark === 'na' ? 'border-ok-700' : 'border-line'}`}>
                  <p id={`${hid}-${item.key}`} className="font-medium">{item.label}</p>
                  <div role="group" aria-labelledby={`${hid}-${item.key}`} className={`mt-2 grid gap-2 ${item.notApplicable ? 'grid-cols-3' : 'grid-cols-2'}`}>
                    <button
                      type="button"
                      aria-pressed={mark === 'ok'}
                      onClick={() => set(item.key, 'ok')}
                      className={`flex min-h-12 items-center justify-center gap-2 rounded-lg border-2 px-3 font-medium ${mark === 'ok' ? 'border-ok-700 bg-ok-700 text-white' : 'border-line bg-white text-ink'}`}
                    >
                      <Check className="size-5" aria-hidden /> Good
                    </button>
                    {item.notApplicable ? (
                      <button
                        type="button"
                        aria-pressed={mark === 'na'}
                        onClick={() => set(item.key, 'na')}
                        className={`flex min-h-12 items-center justify-center gap-1 rounded-lg border-2 px-2 text-sm font-medium leading-tight ${mark === 'na' ? 'border-pine-700 bg-pine-700 text-white' : 'border-line bg-white text-ink'}`}
                      >
                        Not applicable
                      </button>
                    ) : null}
                    <button
                      type="button"
                      aria-pressed={mark === 'fail'}
                      onClick={() => set(item.key, 'fail')}
                      className={`flex min-h-12 items-center justify-center gap-2 rounded-lg border-2 px-3 font-medium ${mark === 'fail' ? 'border-stop-700 bg-stop-700 text-white' : 'border-line bg-white text-ink'}`}
                    >
                      <OctagonX className="size-5" aria-hidden /> Problem
                    </button>
                  </div>
                  {mark === 'fail' ? (
                    <div className="mt-3 space-y-1">
                      <label htmlFor={`${hid}-${item.key}-note`} className="block text-sm font-medium">What is wrong?</label>
                      <textarea
                        id={`${hid}-${item.key}-note`}
                        rows={2}
                        value={notes[item.key] ?? ''}
                        onChange={(e) => setNotes((n) => ({ ...n, [item.key]: e.target.value }))}
                        aria-invalid={problem ? true : undefined}
                        aria-describedby={`${hid}-${item.key}-warn`}
                        className="block w-full rounded-lg border border-line px-3 py-2 aria-[invalid=true]:border-stop-700"
                      />
                      <p id={`${hid}-${item.key}-warn`} className="text-sm text-stop-700">This opens a fault and blocks the point until a rigger clears it.</p>
                    </div>
                  ) : null}
                  {problem ? <p role="alert" className="mt-2 text-sm font-medium text-stop-700">{problem}</p> : null}
                </li>
              );
            })}
          </ol>
          {formError ? <p role="alert" className="rounded-lg bg-stop-50 p-3 text-sm text-stop-700">{formError}</p> : null}
          <div className="grid gap-2 sm:grid-cols-2">
            <Button className="min-h-12 text-base" variant={failed.length ? 'danger' : 'primary'} busy={save.isPending} onClick={submit}>
              {failed.length ? <><OctagonX className="size-5" aria-hidden /> Record and report {failed.length === 1 ? 'the problem' : `${failed.length} problems`}</> : <><Check className="size-5" aria-hidden /> All good: record the check</>}
            </Button>
            <Button className="min-h-12 text-base" variant="secondary" onClick={onClose}>Cancel</Button>
          </div>
        </>
      )}
    </section>
  );
}
