import { useEffect, useId, useRef, useState, type FormEvent } from 'react';
import { useQuery } from '@tanstack/react-query';
import { Link } from 'react-router-dom';
import { toast } from 'sonner';
import { CheckCheck, TriangleAlert } from 'lucide-react';
import type { Point } from '../../../../shared/schemas/rig';
import { clearanceBodySchema, type ClearanceResult } from '../../../../shared/schemas/safety';
import type { InspectionResult } from '../../../../shared/schemas/vocabulary';
import { Button } from '../../../components/ui/button';
import { TextAreaField } from '../../../components/ui/field';
import { StatusBadge } from '../../../components/ui/status-badge';
import { formatInZone } from '../../../components/ui/zoned-time';
import { ErrorState, Loading } from '../../../components/ui/states';
import { ApiError, errorMessage } from '../../../lib/api-client';
import { paths } from '../../../lib/paths';
import { inspectionQueries, useClearance } from '../api';
import { ClearanceOutcome } from './clearance-outcome';
import { ResultChoice } from './result-choice';

/** A rigger's periodic inspection of a point, row by row from its load path (PRODUCT.md §3, §6.1). */
export function InspectionForm({ point, timeZone }: { point: Point; timeZone: string }) {
  const list = useQuery(inspectionQueries.checklist(point.id));
  const clear = useClearance(point.id);
  const [results, setResults] = useState<Record<string, InspectionResult>>({});
  const [notes, setNotes] = useState<Record<string, string>>({});
  const [overall, setOverall] = useState('');
  const [rowErrors, setRowErrors] = useState<Record<string, string>>({});
  const [formError, setFormError] = useState<string | null>(null);
  const [outcome, setOutcome] = useState<ClearanceResult | null>(null);
  const heading = useRef<HTMLHeadingElement>(null);
  const hid = useId();
  useEffect(() => heading.current?.focus(), [point.id]);

  const items = list.data?.items ?? [];
  const faulted = point.status.reasons.filter((r) => r.code === 'fault_open');
  const setResult = (key: string, r: InspectionResult) => {
    setResults((s) => ({ ...s, [key]: r }));
    setRowErrors((e) => ({ ...e, [key]: '' }));
  };

  const unanswered = items.filter((i) => !results[i.key]).length;
  const markRestPass = () => {
    setResults((s) => ({ ...Object.fromEntries(items.map((i) => [i.key, 'pass' as const])), ...s }));
    setRowErrors({});
  };

  const submit = (ev: FormEvent) => {
    ev.preventDefault();
    setFormError(null);
    const errs: Record<string, string> = {};
    for (const i of items) {
      if (!results[i.key]) errs[i.key] = 'Record a result for this row.';
      else if (results[i.key] === 'fail' && !(notes[i.key] ?? '').trim()) errs[i.key] = 'Say what failed: the note becomes the fault’s description.';
    }
    setRowErrors(errs);
    if (Object.keys(errs).length) return setFormError(`${Object.keys(errs).length} row${Object.keys(errs).length === 1 ? ' needs' : 's need'} attention. Nothing was recorded.`);
    const body = clearanceBodySchema.safeParse({
      items: items.map((i) => ({ key: i.key, result: results[i.key], note: (notes[i.key] ?? '').trim() || undefined })),
      notes: overall.trim() || undefined,
    });
    if (!body.success) return setFormError(body.error.issues[0]?.message ?? 'Check the form.');
    clear.mutate(body.data, {
      onSuccess: (r) => {
        setOutcome(r);
        // Only call it cleared when the rules agree now (PRODUCT.md §8).
        if (r.cleared && r.status.status !== 'blocked') toast.success(`${point.label} is cleared.`);
        else toast.warning(`${point.label} was inspected but is still blocked.`);
      },
      onError: (err) => {
        if (err instanceof ApiError && err.code === 'checklist_mismatch') list.refetch();
        if (err instanceof ApiError && err.status === 403) return setFormError('Only a rigger records inspections and clears points.');
        setFormError(errorMessage(err));
      },
    });
  };

  if (outcome) {
    return <ClearanceOutcome point={point} result={outcome} timeZone={timeZone} onAgain={() => { setOutcome(null); setResults({}); setNotes({}); setOverall(''); }} />;
  }

  return (
    <form onSubmit={submit} noValidate className="space-y-4" aria-labelledby={hid}>
      <div className="flex flex-wrap items-center justify-between gap-2">
        <h2 id={hid} ref={heading} tabIndex={-1} className="text-xl font-semibold">Inspect {point.label} <span className="text-base font-normal text-muted">· {point.roomName}</span></h2>
        <StatusBadge status={point.status.status} />
      </div>
      {point.status.reasons.length && !faulted.length ? (
        <ul className="list-disc space-y-0.5 pl-6 text-sm text-stop-700" aria-label="Why it is blocked now">{point.status.reasons.map((r, i) => <li key={i}>{r.message}</li>)}</ul>
      ) : point.status.clearedUntil && !faulted.length ? <p className="text-sm text-muted">Cleared now until {formatInZone(point.status.clearedUntil, timeZone)}.</p> : null}
      {faulted.length ? (
        <div className="rounded-lg border border-stop-700/40 bg-stop-50 p-3 text-sm text-stop-700">
          <p className="flex items-center gap-2 font-medium"><TriangleAlert className="size-4" aria-hidden /> This point has an open fault, so the inspection is recorded but cannot clear it.</p>
          <ul className="mt-1 list-disc pl-6">{faulted.map((r, i) => <li key={i}>{r.message}</li>)}</ul>
          <Link to={paths.faults} className="mt-1 inline-block font-medium underline">Resolve it on the Faults page first</Link>
        </div>
      ) : null}
      {list.isPending ? <Loading label="Building the checklist from the load path…" /> : list.isError ? <ErrorState error={list.error} retry={() => list.refetch()} /> : (
        <>
          <p className="text-sm text-muted">{items.length} rows: the structure, each link from the top down, then the standing items. Record each row as you look at it.</p>
          <ol className="space-y-3">
            {items.map((item, n) => {
              const err = rowErrors[item.key];
              const r = results[item.key];
              return (
                <li key={item.key} className={`space-y-2 rounded-lg border p-3 ${err ? 'border-stop-700' : r === 'fail' ? 'border-stop-700/50 bg-stop-50/40' : 'border-line'}`}>
                  <p id={`${hid}-${n}`} className="text-sm font-medium"><span className="text-muted">{n + 1}.</span> {item.label}</p>
                  {/* The note takes its own full-width line below the result until the form is wide, so a failed row's required note is never squeezed. */}
                  <div className="flex flex-col gap-2 xl:flex-row xl:items-center">
                    <ResultChoice name={`${hid}-r-${n}`} legend={`Result for row ${n + 1}: ${item.label}`} value={r} onChange={(v) => setResult(item.key, v)} invalid={!!err} describedBy={err ? `${hid}-e-${n}` : undefined} />
                    <div className="min-w-0 flex-1">
                      <label htmlFor={`${hid}-n-${n}`} className={r === 'fail' ? 'mb-1 block text-sm font-medium text-stop-700' : 'sr-only'}>{r === 'fail' ? 'What failed (required)' : `Note for row ${n + 1}`}</label>
                      {/* A failed row's note is the fault's description: a two-line box, so what is typed stays in view. */}
                      {r === 'fail' ? (
                        <textarea
                          id={`${hid}-n-${n}`}
                          rows={2}
                          value={notes[item.key] ?? ''}
                          onChange={(e) => setNotes((s) => ({ ...s, [item.key]: e.target.value }))}
                          placeholder="What failed (required)"
                          aria-invalid={err ? true : undefined}
                          className="block w-full min-w-0 rounded-lg border border-stop-700 px-3 py-2 text-sm"
                        />
                      ) : (
                        <input
                          id={`${hid}-n-${n}`}
                          value={notes[item.key] ?? ''}
                          onChange={(e) => setNotes((s) => ({ ...s, [item.key]: e.target.value }))}
                          placeholder={r === 'attention' ? 'What to watch' : 'Note (optional)'}
                          className="block min-h-11 w-full min-w-0 rounded-lg border border-line px-3 text-sm"
                        />
                      )}
                    </div>
                  </div>
                  {r === 'fail' ? <p className="text-xs text-stop-700">A fail opens a high-severity fault{item.gearId ? ' on this item' : ' on the point'} and the point stays blocked.</p> : null}
                  {err ? <p id={`${hid}-e-${n}`} role="alert" className="text-sm text-stop-700">{err}</p> : null}
                </li>
              );
            })}
          </ol>
          {/* After the rows, not above them: the rows are there to be looked at one by one. It fills only rows still without a result. */}
          {unanswered > 0 ? (
            <div className="flex flex-wrap items-center gap-3">
              <Button type="button" variant="secondary" onClick={markRestPass}>
                <CheckCheck className="size-4" aria-hidden /> {unanswered === items.length ? 'Mark all pass' : `Mark the other ${unanswered} pass`}
              </Button>
              <span className="text-xs text-muted">Only for rows you have looked at and found sound.</span>
            </div>
          ) : null}
          <TextAreaField label="Overall notes" hint="Anything else for the record: conditions, what was re-tensioned, what to watch next time." value={overall} onChange={(e) => setOverall(e.target.value)} />
          {formError ? <p role="alert" className="rounded-lg bg-stop-50 p-3 text-sm text-stop-700">{formError}</p> : null}
          <Button type="submit" busy={clear.isPending} className="min-h-12 text-base">Sign the inspection</Button>
          <p className="text-xs text-muted">Signing records the inspection under your name. It clears the point only when no row fails and no fault is open.</p>
        </>
      )}
    </form>
  );
}
