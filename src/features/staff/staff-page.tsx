import { useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { toast } from 'sonner';
import { UserPlus } from 'lucide-react';
import { createUserSchema, resetPasswordSchema, type CreateUser, type Me, type User } from '../../../shared/schemas/staff';
import { staffRoles, type StaffRole } from '../../../shared/schemas/vocabulary';
import { Button } from '../../components/ui/button';
import { SelectField, TextField } from '../../components/ui/field';
import { Card, EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { ConfirmDialog } from '../../components/ui/confirm';
import { ApiError, errorMessage } from '../../lib/api-client';
import { roleLabel } from '../../app/navigation';
import { staffQueries, useStaffMutations } from './api';

export function StaffPage({ me }: { me: Me }) {
  const list = useQuery(staffQueries.list());
  const canEdit = me.role === 'owner';
  const [adding, setAdding] = useState(false);
  return (
    <div className="max-w-5xl">
      <PageHeader
        title="Staff"
        actions={canEdit && !adding ? <Button onClick={() => setAdding(true)}><UserPlus className="size-4" aria-hidden /> Add a person</Button> : null}
      >
        {canEdit ? 'Accounts and roles. A change takes effect on the person’s next click.' : 'Who works at the studio. Only the owner changes accounts.'}
      </PageHeader>
      {adding ? <AddPerson onDone={() => setAdding(false)} /> : null}
      {list.isPending ? <Loading /> : list.isError ? <ErrorState error={list.error} retry={() => list.refetch()} /> : list.data.length === 0 ? (
        <EmptyState title="No staff yet" />
      ) : (
        <Card className="overflow-x-auto p-0">
          <table className="w-full text-left text-sm">
            <thead className="border-b border-line bg-pine-50 text-xs uppercase tracking-wide text-muted">
              <tr>
                <th scope="col" className="px-4 py-3">Name</th>
                <th scope="col" className="px-4 py-3">E-mail</th>
                <th scope="col" className="px-4 py-3">Role</th>
                <th scope="col" className="px-4 py-3">Account</th>
                {canEdit ? <th scope="col" className="px-4 py-3"><span className="sr-only">Actions</span></th> : null}
              </tr>
            </thead>
            <tbody>
              {list.data.map((u) => <StaffRow key={u.id} user={u} canEdit={canEdit} isMe={u.id === me.id} />)}
            </tbody>
          </table>
        </Card>
      )}
    </div>
  );
}

function StaffRow({ user, canEdit, isMe }: { user: User; canEdit: boolean; isMe: boolean }) {
  const { update, resetPassword } = useStaffMutations();
  const [confirmOff, setConfirmOff] = useState(false);
  const [pw, setPw] = useState<string | null>(null);
  const [pwError, setPwError] = useState<string | null>(null);
  const setRole = (role: StaffRole) =>
    update.mutate({ id: user.id, role }, { onSuccess: () => toast.success(`${user.name} is now ${roleLabel[role].toLowerCase()}. They are signed out everywhere and sign in again to continue.`), onError: (e) => toast.error(errorMessage(e)) });
  return (
    <tr className="border-b border-line last:border-0">
      <td className="px-4 py-3 font-medium">{user.name}{isMe ? <span className="ml-2 text-xs text-muted">(you)</span> : null}</td>
      <td className="px-4 py-3">{user.email}</td>
      <td className="px-4 py-3">
        {canEdit ? (
          <label className="sr-only" htmlFor={`role-${user.id}`}>Role of {user.name}</label>
        ) : null}
        {canEdit ? (
          <select id={`role-${user.id}`} value={user.role} onChange={(e) => setRole(e.target.value as StaffRole)} className="min-h-11 rounded-lg border border-line bg-white px-2">
            {staffRoles.map((r) => <option key={r} value={r}>{roleLabel[r]}</option>)}
          </select>
        ) : roleLabel[user.role]}
      </td>
      <td className="px-4 py-3">{user.active ? 'Active' : <span className="text-stop-700">Deactivated</span>}</td>
      {canEdit ? (
        <td className="space-x-2 whitespace-nowrap px-4 py-3 text-right">
          {pw !== null ? (
            <form
              className="inline-flex flex-wrap items-start justify-end gap-2"
              noValidate
              onSubmit={(e) => {
                e.preventDefault();
                // The field's message beside the field, in the same words the server would use.
                const checked = resetPasswordSchema.safeParse({ password: pw });
                if (!checked.success) return setPwError(checked.error.issues[0]?.message ?? 'Check this value');
                setPwError(null);
                resetPassword.mutate({ id: user.id, password: pw }, {
                  onSuccess: () => { toast.success(`New password set for ${user.name}. They are signed out everywhere.`); setPw(null); },
                  onError: (err) => (err instanceof ApiError && err.fields.password ? setPwError(err.fields.password) : toast.error(errorMessage(err))),
                });
              }}
            >
              <span className="inline-flex flex-col items-start text-left">
                <label className="sr-only" htmlFor={`pw-${user.id}`}>New password for {user.name}</label>
                <input
                  id={`pw-${user.id}`}
                  type="password"
                  autoComplete="new-password"
                  value={pw}
                  onChange={(e) => { setPw(e.target.value); setPwError(null); }}
                  placeholder="New password"
                  aria-invalid={pwError ? true : undefined}
                  aria-describedby={pwError ? `pw-${user.id}-error` : undefined}
                  className="min-h-11 rounded-lg border border-line px-2 aria-[invalid=true]:border-stop-700"
                />
                {pwError ? <span id={`pw-${user.id}-error`} role="alert" className="mt-1 text-sm text-stop-700">{pwError}</span> : null}
              </span>
              <Button type="submit" busy={resetPassword.isPending}>Save</Button>
              <Button variant="ghost" type="button" onClick={() => { setPw(null); setPwError(null); }}>Cancel</Button>
            </form>
          ) : (
            <Button variant="ghost" onClick={() => setPw('')}>Reset password</Button>
          )}
          {user.active ? (
            <Button variant="secondary" disabled={isMe} onClick={() => setConfirmOff(true)}>Deactivate</Button>
          ) : (
            <Button variant="secondary" onClick={() => update.mutate({ id: user.id, active: true }, { onError: (e) => toast.error(errorMessage(e)) })}>Reactivate</Button>
          )}
          <ConfirmDialog
            open={confirmOff}
            title={`Deactivate ${user.name}?`}
            confirmLabel="Deactivate"
            busy={update.isPending}
            onCancel={() => setConfirmOff(false)}
            onConfirm={() =>
              update.mutate({ id: user.id, active: false }, {
                onSuccess: () => { setConfirmOff(false); toast.success(`${user.name} can no longer sign in.`, { action: { label: 'Undo', onClick: () => update.mutate({ id: user.id, active: true }) } }); },
                onError: (e) => { setConfirmOff(false); toast.error(errorMessage(e)); },
              })
            }
          >
            Their access ends at once, even where they are signed in. Their records stay. You can reactivate the account later.
          </ConfirmDialog>
        </td>
      ) : null}
    </tr>
  );
}

function AddPerson({ onDone }: { onDone: () => void }) {
  const { create } = useStaffMutations();
  const form = useForm<CreateUser>({ resolver: zodResolver(createUserSchema), defaultValues: { email: '', name: '', role: 'instructor', password: '' } });
  const submit = form.handleSubmit((values) =>
    create.mutate(values, {
      onSuccess: (u) => { toast.success(`${u.name} can now sign in.`); onDone(); },
      onError: (err) => {
        if (err instanceof ApiError) for (const [k, v] of Object.entries(err.fields)) form.setError(k as keyof CreateUser, { message: v });
        toast.error(errorMessage(err));
      },
    }),
  );
  const e = form.formState.errors;
  return (
    <Card className="mb-6">
      <h2 className="mb-4 font-semibold">Add a person</h2>
      <form onSubmit={submit} noValidate className="grid gap-4 sm:grid-cols-2">
        <TextField label="Name" autoComplete="off" error={e.name?.message} {...form.register('name')} />
        <TextField label="E-mail" type="email" autoComplete="off" error={e.email?.message} {...form.register('email')} />
        <SelectField label="Role" error={e.role?.message} {...form.register('role')}>
          {staffRoles.map((r) => <option key={r} value={r}>{roleLabel[r]}</option>)}
        </SelectField>
        <TextField label="First password" type="password" autoComplete="new-password" hint="At least 10 characters. Tell them to keep it private." error={e.password?.message} {...form.register('password')} />
        <div className="flex gap-2 sm:col-span-2">
          <Button type="submit" busy={create.isPending}>Add</Button>
          <Button type="button" variant="secondary" onClick={onDone}>Cancel</Button>
        </div>
      </form>
    </Card>
  );
}
