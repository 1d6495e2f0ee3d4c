import { useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { toast } from 'sonner';
import { Archive, ArchiveRestore, CheckCircle2, Pencil, Plus } from 'lucide-react';
import { z } from 'zod';
import { classTypeName, type ClassType } from '../../../shared/schemas/class-types';
import { Button } from '../../components/ui/button';
import { TextField } from '../../components/ui/field';
import { Card, EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { ConfirmDialog } from '../../components/ui/confirm';
import { ApiError, errorMessage } from '../../lib/api-client';
import { scheduleQueries, useScheduleMutations } from './api';
import { apparatusLabel } from './format';
import { ClassTypeForm } from './components/class-type-form';

/**
 * The desk's list of class types: add, rename, retire and bring back. A retired type is kept (its
 * classes already on the calendar show its name) but is not offered for a new booking.
 */
export function ClassTypesPage() {
  const list = useQuery(scheduleQueries.classTypes());
  const [adding, setAdding] = useState(false);
  const active = list.data?.filter((c) => c.active).sort(byName) ?? [];
  const retired = list.data?.filter((c) => !c.active).sort(byName) ?? [];
  return (
    <div className="max-w-5xl">
      <PageHeader title="Class types" actions={!adding ? <Button onClick={() => setAdding(true)}><Plus className="size-4" aria-hidden /> Add a class type</Button> : null}>
        What can be booked on the schedule. Retire a type you no longer teach: its classes already booked keep it, and you can bring it back.
      </PageHeader>
      {adding ? (
        <div className="mb-6">
          <ClassTypeForm onCreated={() => setAdding(false)} onCancel={() => setAdding(false)} />
        </div>
      ) : null}
      {list.isPending ? <Loading /> : list.isError ? <ErrorState error={list.error} retry={() => list.refetch()} /> : list.data.length === 0 ? (
        <EmptyState title="No class types yet">Add one to start booking classes.</EmptyState>
      ) : (
        <>
          <TypeTable title="In use" types={active} empty="Every class type is retired: bring one back or add one to book classes." />
          {retired.length ? <TypeTable title="Retired" types={retired} empty="" /> : null}
        </>
      )}
    </div>
  );
}

const byName = (a: ClassType, b: ClassType) => a.name.localeCompare(b.name);

function TypeTable({ title, types, empty }: { title: string; types: ClassType[]; empty: string }) {
  const headingId = `class-types-${title.toLowerCase().replace(/\W+/g, '-')}`;
  return (
    <section aria-labelledby={headingId} className="mb-8">
      <h2 id={headingId} className="mb-3 text-lg font-semibold">{title}</h2>
      {types.length === 0 ? <p className="text-sm text-muted">{empty}</p> : (
        <Card className="overflow-x-auto p-0">
          <table className="w-full text-left text-sm">
            <thead className="border-b border-line bg-pine-50 text-xs uppercase tracking-wide text-muted">
              <tr>
                <th scope="col" className="px-4 py-3">Name</th>
                <th scope="col" className="px-4 py-3">Apparatus</th>
                <th scope="col" className="px-4 py-3">Length</th>
                <th scope="col" className="px-4 py-3">Places</th>
                <th scope="col" className="px-4 py-3">Per point</th>
                <th scope="col" className="px-4 py-3">Status</th>
                <th scope="col" className="px-4 py-3"><span className="sr-only">Actions</span></th>
              </tr>
            </thead>
            <tbody>{types.map((c) => <TypeRow key={c.id} type={c} />)}</tbody>
          </table>
        </Card>
      )}
    </section>
  );
}

const renameSchema = z.object({ name: classTypeName });

function TypeRow({ type }: { type: ClassType }) {
  const { updateClassType } = useScheduleMutations();
  const [renaming, setRenaming] = useState(false);
  const [askRetire, setAskRetire] = useState(false);
  const setActive = (active: boolean, then?: () => void) =>
    updateClassType.mutate(
      { id: type.id, active },
      {
        onSuccess: () => {
          then?.();
          if (active) toast.success(`“${type.name}” can be booked again.`);
          else toast.success(`“${type.name}” is retired: it is no longer offered for new bookings.`, { action: { label: 'Undo', onClick: () => updateClassType.mutate({ id: type.id, active: true }) } });
        },
        onError: (e) => { then?.(); toast.error(errorMessage(e)); },
      },
    );
  return (
    <tr className="border-b border-line align-middle last:border-0">
      <td className="px-4 py-3 font-medium">
        {renaming ? <RenameForm type={type} onDone={() => setRenaming(false)} /> : type.name}
      </td>
      <td className="px-4 py-3">{apparatusLabel(type.apparatus)}</td>
      <td className="px-4 py-3 whitespace-nowrap">{type.durationMinutes} min</td>
      <td className="px-4 py-3">{type.capacity}</td>
      <td className="px-4 py-3">{type.performersPerPoint}</td>
      <td className="px-4 py-3 whitespace-nowrap">
        {type.active ? (
          <span className="inline-flex items-center gap-1 text-pine-700"><CheckCircle2 className="size-4" aria-hidden /> In use</span>
        ) : (
          <span className="inline-flex items-center gap-1 text-muted"><Archive className="size-4" aria-hidden /> Retired</span>
        )}
      </td>
      <td className="space-x-2 whitespace-nowrap px-4 py-3 text-right">
        {!renaming ? (
          <Button variant="ghost" aria-label={`Rename ${type.name}`} onClick={() => setRenaming(true)}><Pencil className="size-4" aria-hidden /> Rename</Button>
        ) : null}
        {type.active ? (
          <Button variant="secondary" aria-label={`Retire ${type.name}`} disabled={updateClassType.isPending} onClick={() => setAskRetire(true)}><Archive className="size-4" aria-hidden /> Retire</Button>
        ) : (
          <Button variant="secondary" aria-label={`Bring back ${type.name}`} busy={updateClassType.isPending} onClick={() => setActive(true)}><ArchiveRestore className="size-4" aria-hidden /> Bring back</Button>
        )}
        <ConfirmDialog
          open={askRetire}
          title={`Retire “${type.name}”?`}
          confirmLabel="Retire"
          busy={updateClassType.isPending}
          onCancel={() => setAskRetire(false)}
          onConfirm={() => setActive(false, () => setAskRetire(false))}
        >
          It is no longer offered for new bookings. Its classes already on the calendar stay booked and keep its name. You can bring it back at any time.
        </ConfirmDialog>
      </td>
    </tr>
  );
}

function RenameForm({ type, onDone }: { type: ClassType; onDone: () => void }) {
  const { updateClassType } = useScheduleMutations();
  const form = useForm<{ name: string }>({ resolver: zodResolver(renameSchema), defaultValues: { name: type.name } });
  const submit = form.handleSubmit(({ name }) => {
    if (name === type.name) return onDone();
    updateClassType.mutate(
      { id: type.id, name },
      {
        onSuccess: (c) => { toast.success(`Renamed to “${c.name}”. Its classes show the new name.`); onDone(); },
        onError: (err) => {
          if (err instanceof ApiError && err.fields.name) form.setError('name', { message: err.fields.name });
          else toast.error(errorMessage(err));
        },
      },
    );
  });
  return (
    <form onSubmit={submit} noValidate className="flex flex-wrap items-start gap-2" onKeyDown={(e) => { if (e.key === 'Escape' && !form.formState.isDirty) onDone(); }}>
      <div className="min-w-48 flex-1">
        <TextField label={`New name for ${type.name}`} autoComplete="off" autoFocus error={form.formState.errors.name?.message} {...form.register('name')} />
      </div>
      <div className="flex gap-2 pt-6">
        <Button type="submit" busy={updateClassType.isPending}>Save</Button>
        <Button type="button" variant="ghost" onClick={onDone}>Cancel</Button>
      </div>
    </form>
  );
}
