import { useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { toast } from 'sonner';
import type { z } from 'zod';
import { FileSignature } from 'lucide-react';
import { paperWaiverSchema, type PaperWaiver } from '../../../../shared/schemas/students';
import { Button } from '../../../components/ui/button';
import { TextField } from '../../../components/ui/field';
import { ConfirmDialog } from '../../../components/ui/confirm';
import { useWarnBeforeUnload } from '../../../lib/use-warn-before-unload';
import { ApiError, errorMessage } from '../../../lib/api-client';
import { studentsQueries, useStudentMutations, type Student } from '../api';

type FormValues = z.input<typeof paperWaiverSchema>;
const todayIn = (timeZone: string) => new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(new Date());

/** The desk records a waiver the student signed on paper: the name as signed, the day, the current text. */
export function PaperWaiverForm({ student, timeZone }: { student: Student; timeZone: string }) {
  const [open, setOpen] = useState(false);
  const [askDiscard, setAskDiscard] = useState(false);
  const waivers = useQuery({ ...studentsQueries.waivers(), enabled: open });
  const current = waivers.data?.current ?? undefined;
  const { recordWaiver } = useStudentMutations();
  const form = useForm<FormValues, unknown, PaperWaiver>({ resolver: zodResolver(paperWaiverSchema), defaultValues: { fullName: student.name, signedOn: todayIn(timeZone) } });
  const e = form.formState.errors;
  const dirty = open && form.formState.isDirty;
  useWarnBeforeUnload(dirty);
  const close = () => { form.reset(); setOpen(false); };
  if (!open)
    return (
      <Button variant="secondary" className="mt-3" onClick={() => setOpen(true)}>
        <FileSignature className="size-4" aria-hidden /> Record a paper waiver
      </Button>
    );
  const submit = form.handleSubmit((v) =>
    recordWaiver.mutate({ id: student.id, ...v, version: current?.version }, {
      onSuccess: (a) => { toast.success(`Recorded ${student.name}’s paper waiver (version ${a.version}).`); form.reset(); setOpen(false); },
      onError: (err) => {
        if (err instanceof ApiError) for (const [k, m] of Object.entries(err.fields)) if (k === 'fullName' || k === 'signedOn') form.setError(k, { message: m });
        toast.error(errorMessage(err));
      },
    }),
  );
  return (
    <>
      <form onSubmit={submit} noValidate aria-label="Record a paper waiver" className="mt-4 space-y-3 border-t border-line pt-4">
        <p className="text-sm text-muted">
          {waivers.isPending ? 'Loading the current waiver…' : waivers.isError ? errorMessage(waivers.error) : current ? <>Records that {student.name} signed version {current.version} of the waiver on paper. Keep the paper copy.</> : 'The owner has not published a waiver text yet, so none can be recorded.'}
        </p>
        <TextField label="Full name as signed" autoComplete="off" error={e.fullName?.message} {...form.register('fullName')} />
        <TextField label="Signed on" type="date" max={todayIn(timeZone)} error={e.signedOn?.message} {...form.register('signedOn')} />
        <div className="flex gap-2">
          <Button type="submit" busy={recordWaiver.isPending} disabled={!current}>Record waiver</Button>
          <Button type="button" variant="secondary" onClick={() => (dirty ? setAskDiscard(true) : close())}>Cancel</Button>
        </div>
      </form>
      {/* Outside the form: its buttons must never submit it. */}
      <ConfirmDialog
          open={askDiscard}
          title="Discard this paper waiver?"
          confirmLabel="Discard what I typed"
          cancelLabel="Keep editing"
          onCancel={() => setAskDiscard(false)}
          onConfirm={() => { setAskDiscard(false); close(); }}
        >
          Nothing is recorded yet. Cancelling throws away the name and date you changed.
        </ConfirmDialog>
    </>
  );
}
