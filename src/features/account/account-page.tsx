import { useQuery } from '@tanstack/react-query';
import { toast } from 'sonner';
import type { Me } from '../../../shared/schemas/staff';
import { Card, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { errorMessage } from '../../lib/api-client';
import { accountQueries, useSavePreferences } from './api';

export function AccountPage({ me, roleName }: { me: Me; roleName: string }) {
  const prefs = useQuery(accountQueries.preferences());
  const save = useSavePreferences();
  return (
    <div className="max-w-2xl">
      <PageHeader title="Your account">{me.name} · {me.email} · {roleName}</PageHeader>
      <Card className="space-y-3">
        <h2 className="font-semibold">E-mail</h2>
        {prefs.isPending ? <Loading /> : prefs.isError ? <ErrorState error={prefs.error} retry={() => prefs.refetch()} /> : (
          <label className="flex min-h-11 items-start gap-3">
            <input
              type="checkbox"
              className="mt-1 size-5"
              checked={!prefs.data.digestOptOut}
              disabled={save.isPending}
              onChange={(e) => save.mutate({ digestOptOut: !e.target.checked }, { onSuccess: (d) => toast.success(d.digestOptOut ? 'You will no longer get the daily rig digest.' : 'You will get the daily rig digest.'), onError: (err) => toast.error(errorMessage(err)) })}
            />
            <span>
              <span className="block font-medium">Daily rig digest</span>
              <span className="block text-sm text-muted">Each morning for riggers: points expiring soon, classes booked past a clearance, gear near the end of its service life.</span>
            </span>
          </label>
        )}
        <p className="text-sm text-muted">Safety e-mail cannot be turned off: class reminders, at-risk alerts and changes to your classes always reach you.</p>
      </Card>
    </div>
  );
}
