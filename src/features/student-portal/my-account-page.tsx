import { useQuery } from '@tanstack/react-query';
import { Card, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { studentPortalQueries } from './api';
import { CalendarFeedCard } from './calendar-feed';

/** The student's account: their details as the studio keeps them, and their calendar link. */
export function MyAccountPage() {
  const profile = useQuery(studentPortalQueries.profile());
  if (profile.isPending) return <Loading />;
  if (profile.isError) return <ErrorState error={profile.error} retry={() => profile.refetch()} />;
  const p = profile.data;
  return (
    <div className="space-y-4">
      <PageHeader title="Your account">{p.name}</PageHeader>
      <Card>
        <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-2 text-sm">
          <dt className="text-muted">E-mail</dt>
          <dd className="break-all">{p.email}</dd>
          <dt className="text-muted">Phone</dt>
          <dd>{p.phone ?? '—'}</dd>
          <dt className="text-muted">Emergency contact</dt>
          <dd>{p.emergencyName ? `${p.emergencyName}${p.emergencyPhone ? `, ${p.emergencyPhone}` : ''}` : '—'}</dd>
          <dt className="text-muted">Cancelling</dt>
          <dd>Online up to {p.cancelCutoffHours} hours before class</dd>
        </dl>
        <p className="mt-3 text-xs text-muted">To change these details, ask at the desk.</p>
      </Card>
      <CalendarFeedCard what="your bookings" />
    </div>
  );
}
