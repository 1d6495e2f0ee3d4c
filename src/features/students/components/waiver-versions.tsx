import { useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { toast } from 'sonner';
import type { z } from 'zod';
import { FilePlus2 } from 'lucide-react';
import { createWaiverVersionSchema, type CreateWaiverVersion } from '../../../../shared/schemas/students';
import { Button } from '../../../components/ui/button';
import { ConfirmDialog } from '../../../components/ui/confirm';
import { TextAreaField } from '../../../components/ui/field';
import { ErrorState, Loading } from '../../../components/ui/states';
import { formatInZone } from '../../../components/ui/zoned-time';
import { ApiError, errorMessage } from '../../../lib/api-client';
import { studentsQueries, useStudentMutations } from '../api';

type FormValues = z.input<typeof createWaiverVersionSchema>;

/** The owner's waiver text: the current version, earlier ones, and a new version published after a question. */
export function WaiverVersions({ timeZone }: { timeZone: string }) {
  const list = useQuery(studentsQueries.waivers());
  const [writing, setWriting] = useState(false);
  const current = list.data?.current ?? undefined;
  const earlier = (list.data?.versions ?? []).filter((v) => v.id !== current?.id);
  return (
    <section aria-labelledby="waiver-heading" className="max-w-3xl rounded-xl border border-line bg-white p-5">
      <h2 className="mb-1 text-lg font-semibold" id="waiver-heading">Waiver</h2>
      <p className="mb-4 text-sm text-muted">What students agree to before they take a class, online by typing their full name or on paper at the desk. A waiver holds for the months set in the policy; publishing a new version does not void waivers already signed.</p>
      {list.isPending ? <Loading label="Loading the waiver…" /> : list.isError ? <ErrorState error={list.error} retry={() => list.refetch()} /> : (
        <div className="space-y-4">
          {current ? (
            <section aria-labelledby="waiver-current">
              <h3 id="waiver-current" className="font-medium">Current: version {current.version}, published {formatInZone(current.createdAt, timeZone, 'day')}</h3>
              <div className="mt-2 max-h-64 overflow-y-auto whitespace-pre-wrap rounded-lg border border-line bg-canvas p-3 text-sm" data-testid="waiver-current-text" tabIndex={0} aria-label={`Waiver version ${current.version}`}>{current.text}</div>
            </section>
          ) : <p className="text-sm">No waiver text yet. Until one is published, students cannot sign and nobody can be checked in.</p>}
          {earlier.length ? (
            <details>
              <summary className="flex min-h-11 cursor-pointer items-center text-sm font-medium text-pine-700">Earlier versions ({earlier.length})</summary>
              <ul className="mt-2 space-y-3">
                {earlier.map((v) => (
                  <li key={v.id}>
                    <p className="text-sm font-medium">Version {v.version}, published {formatInZone(v.createdAt, timeZone, 'day')}</p>
                    <div className="mt-1 whitespace-pre-wrap rounded-lg border border-line bg-white p-3 text-sm text-muted">{v.text}</div>
                  </li>
                ))}
              </ul>
            </details>
          ) : null}
          {writing ? <NewVersion current={current?.text ?? ''} next={(current?.version ?? 0) + 1} onDone={() => setWriting(false)} /> : (
            <Button variant="secondary" onClick={() => setWriting(true)}><FilePlus2 className="size-4" aria-hidden /> Write a new version</Button>
          )}
        </div>
      )}
    </section>
  );
}

function NewVersion({ current, next, onDone }: { current: string; next: number; onDone: () => void }) {
  const { publishWaiver } = useStudentMutations();
  const [pending, setPending] = useState<CreateWaiverVersion | null>(null);
  const [askDiscard, setAskDiscard] = useState(false);
  const form = useForm<FormValues, unknown, CreateWaiverVersion>({ resolver: zodResolver(createWaiverVersionSchema), defaultValues: { text: current } });
  const e = form.formState.errors;
  return (
    <form onSubmit={form.handleSubmit((v) => setPending(v))} noValidate aria-label="New waiver version" className="space-y-3 border-t border-line pt-4">
      <TextAreaField label={`Text of version ${next}`} rows={10} error={e.text?.message} {...form.register('text')} />
      <div className="flex gap-2">
        <Button type="submit" busy={publishWaiver.isPending}>Publish version {next}</Button>
        <Button type="button" variant="secondary" onClick={() => (form.formState.isDirty ? setAskDiscard(true) : onDone())}>Cancel</Button>
      </div>
      <ConfirmDialog
        open={pending !== null}
        title={`Publish waiver version ${next}?`}
        confirmLabel="Publish"
        danger={false}
        busy={publishWaiver.isPending}
        onCancel={() => setPending(null)}
        onConfirm={() => {
          if (!pending) return;
          publishWaiver.mutate(pending, {
            onSuccess: (v) => { setPending(null); toast.success(`Waiver version ${v.version} published.`); onDone(); },
            onError: (err) => {
              setPending(null);
              if (err instanceof ApiError && err.fields.text) form.setError('text', { message: err.fields.text });
              toast.error(errorMessage(err));
            },
          });
        }}
      >
        From now on students sign version {next}, online or on paper. A version cannot be changed once published; waivers already signed stay valid until they expire.
      </ConfirmDialog>
      <ConfirmDialog open={askDiscard} title="Discard this new version?" confirmLabel="Discard what I typed" cancelLabel="Keep editing" onCancel={() => setAskDiscard(false)} onConfirm={() => { setAskDiscard(false); onDone(); }}>
        Nothing is published yet.
      </ConfirmDialog>
    </form>
  );
}
