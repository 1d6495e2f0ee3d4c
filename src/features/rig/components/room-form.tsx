import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { toast } from 'sonner';
import { createRoomSchema, type CreateRoom } from '../../../../shared/schemas/rig';
import { Button } from '../../../components/ui/button';
import { TextField } from '../../../components/ui/field';
import { Card } from '../../../components/ui/states';
import { errorMessage } from '../../../lib/api-client';
import { useRigMutations } from '../api';
import { applyServerErrors } from '../form-helpers';

export function RoomForm({ onDone }: { onDone: () => void }) {
  const { createRoom } = useRigMutations();
  const form = useForm<CreateRoom>({ resolver: zodResolver(createRoomSchema), defaultValues: { name: '' } });
  const submit = form.handleSubmit((body) =>
    createRoom.mutate(body, {
      onSuccess: (room) => { toast.success(`Room ${room.name} added.`); onDone(); },
      onError: (err) => { applyServerErrors(form.setError, err); toast.error(errorMessage(err)); },
    }),
  );
  return (
    <Card className="mb-6">
      <h2 className="mb-4 font-semibold">Add a room</h2>
      <form onSubmit={submit} noValidate className="flex flex-wrap items-start gap-3" aria-label="Add a room">
        <div className="min-w-64 flex-1">
          <TextField label="Room name" autoComplete="off" hint="e.g. Main hall, Studio 2" error={form.formState.errors.name?.message} {...form.register('name')} />
        </div>
        <div className="flex gap-2 pt-6">
          <Button type="submit" busy={createRoom.isPending}>Add room</Button>
          <Button type="button" variant="secondary" onClick={onDone}>Cancel</Button>
        </div>
      </form>
    </Card>
  );
}
