import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import type { z } from 'zod';
import { toast } from 'sonner';
import { cancelSessionSchema } from '../../../../shared/schemas/sessions';
import { Button } from '../../../components/ui/button';
import { TextAreaField } from '../../../components/ui/field';
import { ConfirmDialog } from '../../../components/ui/confirm';
import { ApiError, errorMessage } from '../../../lib/api-client';
import { useScheduleMutations, type Session } from '../api';
import { whenShort } from '../format';
import { MAIL_NOTE, ScopeChoice, type Scope } from './scope-choice';

type CancelInput = z.input<typeof cancelSessionSchema>;
type CancelOutput = z.output<typeof cancelSessionSchema>;

/** Cancel with a reason, after a confirmation. The class stays on the calendar, marked. */
export function CancelSessionForm({ session, timeZone, onDone }: { session: Session; timeZone: string; onDone: (message?: string) => void }) {
  const { cancel } = useScheduleMutations();
  const [scope, setScope] = useState<Scope>('this');
  const [confirming, setConfirming] = useState<CancelOutput | null>(null);
  const form = useForm<CancelInput, unknown, CancelOutput>({ resolver: zodResolver(cancelSessionSchema), defaultValues: { reason: '', scope: 'this' } });
  const e = form.formState.errors;
  const confirm = () => {
    if (!confirming) return;
    // mutateAsync, not mutate's callbacks: once the class reads as cancelled this form is unmounted, and
    // React Query skips mutate's callbacks once their component is gone (the desk would see no confirmation).
    cancel.mutateAsync({ id: session.id, reason: confirming.reason, scope }).then(
      () => {
        setConfirming(null);
        const text = `Cancelled${scope === 'following' ? ', with the following classes' : ''}. ${MAIL_NOTE}`;
        toast.success(`${session.className} on ${whenShort(session.startsAt, session.endsAt, timeZone)}: ${text}`);
        onDone(text);
      },
      (err: unknown) => {
        setConfirming(null);
        if (err instanceof ApiError && err.fields.reason) form.setError('reason', { message: err.fields.reason });
        toast.error(errorMessage(err));
      },
    );
  };
  return (
    <>
    <form onSubmit={form.handleSubmit((v) => setConfirming(v))} noValidate className="space-y-4" aria-labelledby="cancel-title">
      <h3 id="cancel-title" className="font-semibold">Cancel the class</h3>
      <TextAreaField label="Reason" hint="The instructor reads this in the e-mail, e.g. “Instructor unwell” or “Rig closed for repair”." error={e.reason?.message} {...form.register('reason')} />
      <ScopeChoice seriesId={session.seriesId} value={scope} onChange={setScope} />
      <p className="text-sm text-muted">The class stays on the calendar, marked cancelled, and its points are freed. {MAIL_NOTE}</p>
      <div className="flex gap-2">
        <Button type="submit" variant="danger">Cancel class…</Button>
        <Button type="button" variant="secondary" onClick={() => onDone()}>Keep the class</Button>
      </div>
    </form>
      {/* Outside the form: the dialog's buttons would otherwise submit it. */}
      <ConfirmDialog
        open={confirming !== null}
        title={`Cancel ${session.className}?`}
        confirmLabel={scope === 'following' ? 'Cancel this and the following' : 'Cancel this class'}
        cancelLabel="Keep it"
        busy={cancel.isPending}
        onCancel={() => setConfirming(null)}
        onConfirm={confirm}
      >
        {whenShort(session.startsAt, session.endsAt, timeZone)} in {session.roomName}{scope === 'following' ? ', and every later class of the series' : ''}. Reason: “{confirming?.reason}”. {MAIL_NOTE} This cannot be undone here.
      </ConfirmDialog>
    </>
  );
}
