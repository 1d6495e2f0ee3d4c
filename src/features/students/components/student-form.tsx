import { useEffect, useState } from 'react';
import type { z } from 'zod';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { useNavigate } from 'react-router-dom';
import { toast } from 'sonner';
import { Button } from '../../../components/ui/button';
import { ConfirmDialog } from '../../../components/ui/confirm';
import { useWarnBeforeUnload } from '../../../lib/use-warn-before-unload';
import { TextField } from '../../../components/ui/field';
import { Sheet } from '../../../components/ui/sheet';
import { ApiError, errorMessage } from '../../../lib/api-client';
import { paths } from '../../../lib/paths';
import { createStudentSchema, type CreateStudent } from '../../../../shared/schemas/students';
import { useStudentMutations, type Student } from '../api';

const FIELDS = ['name', 'email', 'phone', 'emergencyName', 'emergencyPhone'] as const;
const blank: CreateStudentForm = { name: '', email: '', phone: '', emergencyName: '', emergencyPhone: '' };
type CreateStudentForm = z.input<typeof createStudentSchema>;

const toForm = (s: Student): CreateStudentForm => ({ name: s.name, email: s.email, phone: s.phone ?? '', emergencyName: s.emergencyName ?? '', emergencyPhone: s.emergencyPhone ?? '' });

/**
 * Add a student, or edit one (`student`). Checked with the shared schema as the server checks it;
 * the server's field messages land beside their fields; closing with typed data asks first.
 */
export function StudentFormSheet({ open, student, onClose }: { open: boolean; student?: Student; onClose: () => void }) {
  const [askDiscard, setAskDiscard] = useState(false);
  const [dirty, setDirty] = useState(false);
  const close = () => (dirty ? setAskDiscard(true) : onClose());
  return (
    <>
      <Sheet open={open} title={student ? `Edit ${student.name}` : 'Add a student'} onClose={close} closeOnBackdrop={false}>
        {open ? <StudentForm key={student?.id ?? 'new'} student={student} onDone={onClose} onCancel={close} onDirty={setDirty} /> : null}
      </Sheet>
      <ConfirmDialog
        open={askDiscard}
        title={student ? 'Discard these changes?' : 'Discard this student?'}
        confirmLabel="Discard what I typed"
        cancelLabel="Keep editing"
        onCancel={() => setAskDiscard(false)}
        onConfirm={() => { setAskDiscard(false); setDirty(false); onClose(); }}
      >
        {student ? 'Nothing is saved yet. Closing the form throws away your changes.' : 'Nothing is saved yet. Closing the form throws away what you typed.'}
      </ConfirmDialog>
    </>
  );
}

function StudentForm({ student, onDone, onCancel, onDirty }: { student?: Student; onDone: () => void; onCancel: () => void; onDirty: (d: boolean) => void }) {
  const { create, update } = useStudentMutations();
  const navigate = useNavigate();
  const running = create.isPending || update.isPending;
  const form = useForm<CreateStudentForm, unknown, CreateStudent>({ resolver: zodResolver(createStudentSchema), defaultValues: student ? toForm(student) : blank });
  const isDirty = form.formState.isDirty;
  useEffect(() => onDirty(isDirty), [isDirty, onDirty]);
  // A reload or closing the tab with typed data asks too.
  useWarnBeforeUnload(isDirty);
  const onError = (err: unknown) => {
    if (err instanceof ApiError) {
      for (const [k, v] of Object.entries(err.fields)) if ((FIELDS as readonly string[]).includes(k)) form.setError(k as (typeof FIELDS)[number], { message: v });
    }
    toast.error(errorMessage(err));
  };
  const submit = form.handleSubmit((values) => {
    if (student)
      update.mutate({ id: student.id, ...values }, {
        onSuccess: (s) => { onDirty(false); toast.success(`Saved ${s.name}.`); onDone(); },
        onError,
      });
    else
      create.mutate(values, {
        onSuccess: (s) => { onDirty(false); toast.success(`Added ${s.name}.`); onDone(); navigate(paths.student(s.id)); },
        onError,
      });
  });
  const e = form.formState.errors;
  return (
    <form onSubmit={submit} noValidate aria-label={student ? 'Edit student' : 'Add a student'} className="space-y-4">
      <TextField label="Full name" autoComplete="off" error={e.name?.message} {...form.register('name')} />
      <TextField label="E-mail" type="email" autoComplete="off" hint="Booking confirmations and waitlist offers go here." error={e.email?.message} {...form.register('email')} />
      <TextField label="Phone" type="tel" autoComplete="off" hint="Optional." error={e.phone?.message} {...form.register('phone')} />
      <fieldset className="space-y-4 rounded-xl border border-line p-4">
        <legend className="px-1 text-sm font-semibold">Emergency contact (optional)</legend>
        <TextField label="Emergency contact name" autoComplete="off" error={e.emergencyName?.message} {...form.register('emergencyName')} />
        <TextField label="Emergency contact phone" type="tel" autoComplete="off" error={e.emergencyPhone?.message} {...form.register('emergencyPhone')} />
      </fieldset>
      <div className="flex gap-2">
        <Button type="submit" busy={running}>{student ? 'Save' : 'Add student'}</Button>
        <Button type="button" variant="secondary" onClick={onCancel}>Cancel</Button>
      </div>
    </form>
  );
}
