import { useState } from 'react';
import { Link } from 'react-router-dom';
import { useQuery } from '@tanstack/react-query';
import { toast } from 'sonner';
import { CalendarCheck, CircleSlash, Clock3, MapPin } from 'lucide-react';
import type { MyBooking } from '../../../shared/schemas/my';
import { Button } from '../../components/ui/button';
import { ConfirmDialog } from '../../components/ui/confirm';
import { EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { formatInZone } from '../../components/ui/zoned-time';
import { errorMessage } from '../../lib/api-client';
import { paths } from '../../lib/paths';
import { studentPortalQueries, useCancelMyBooking } from './api';

const statusWord: Record<MyBooking['status'], string> = { booked: 'Booked', waitlisted: 'Waitlist', cancelled: 'Cancelled', attended: 'Attended', no_show: 'Missed' };

function StatusBadge({ b }: { b: MyBooking }) {
  const cancelled = b.sessionCancelled || b.status === 'cancelled';
  const Icon = cancelled ? CircleSlash : b.status === 'waitlisted' ? Clock3 : CalendarCheck;
  const tone = cancelled ? 'bg-stop-50 text-stop-700' : b.status === 'waitlisted' ? 'bg-warn-50 text-warn-700' : 'bg-ok-50 text-ok-700';
  const word = b.sessionCancelled ? 'Class cancelled' : b.status === 'waitlisted' && b.position ? `Waitlist, number ${b.position}` : statusWord[b.status];
  return (
    <span className={`inline-flex items-center gap-1 rounded-full px-2 py-0.5 text-xs font-semibold ${tone}`}>
      <Icon className="size-3.5" aria-hidden /> {word}
    </span>
  );
}

/** The student's own bookings: upcoming first (cancel up to the studio's cut-off), then past ones. */
export function MyBookingsPage() {
  const bookings = useQuery(studentPortalQueries.bookings());
  const studio = useQuery(studentPortalQueries.studio());
  const profile = useQuery(studentPortalQueries.profile());
  const cancel = useCancelMyBooking();
  const [asking, setAsking] = useState<MyBooking | null>(null);
  const tz = studio.data?.timeZone ?? 'UTC';
  const now = Date.now();

  if (bookings.isPending || studio.isPending) return <Loading label="Loading your bookings…" />;
  if (bookings.isError) return <ErrorState error={bookings.error} retry={() => bookings.refetch()} />;
  const upcoming = bookings.data.filter((b) => Date.parse(b.endsAt) > now && b.status !== 'cancelled').sort((a, b) => a.startsAt.localeCompare(b.startsAt));
  const past = bookings.data.filter((b) => !upcoming.includes(b));

  const confirmCancel = () => {
    if (!asking) return;
    cancel.mutate(asking.id, {
      onSuccess: () => {
        toast.success(`Cancelled: ${asking.className}.`);
        setAsking(null);
      },
      onError: (e) => {
        toast.error(errorMessage(e));
        setAsking(null);
      },
    });
  };

  const row = (b: MyBooking) => (
    <li key={b.id} className="rounded-xl border border-line bg-white p-4" data-testid="my-booking">
      <div className="flex flex-wrap items-start justify-between gap-2">
        <div>
          <p className="font-medium">{b.className}</p>
          <p className="text-sm text-muted">{formatInZone(b.startsAt, tz, 'dateTime')}–{formatInZone(b.endsAt, tz, 'time')}</p>
          <p className="mt-1 flex items-center gap-1 text-sm text-muted">
            <MapPin className="size-4" aria-hidden /> {b.roomName}{b.pointLabel ? ` · point ${b.pointLabel}` : ''}
          </p>
        </div>
        <StatusBadge b={b} />
      </div>
      {upcoming.includes(b) ? (
        b.canCancel ? (
          <div className="mt-3 flex items-center justify-between gap-2">
            <span className="text-xs text-muted">Cancel online until {formatInZone(b.cancelBefore, tz, 'dateTime')}</span>
            <Button variant="secondary" onClick={() => setAsking(b)} aria-label={`Cancel ${b.className} on ${formatInZone(b.startsAt, tz, 'dateTime')}`}>Cancel</Button>
          </div>
        ) : !b.sessionCancelled ? (
          <p className="mt-3 text-xs text-muted">Too close to class to cancel online: please contact the studio.</p>
        ) : null
      ) : null}
    </li>
  );

  return (
    <div>
      <PageHeader title="My bookings">
        {profile.data && !profile.data.waiverValid ? (
          <span className="text-warn-700">
            You have no valid waiver yet. <Link to={paths.myWaiver} className="underline">Sign the waiver</Link> before your class.
          </span>
        ) : (
          'Your places in classes.'
        )}
      </PageHeader>
      {upcoming.length === 0 ? (
        <EmptyState title="No upcoming bookings">
          <Link to={paths.timetable} className="text-pine-700 underline">Find a class on the timetable</Link>
        </EmptyState>
      ) : (
        <ul className="space-y-2">{upcoming.map(row)}</ul>
      )}
      {past.length ? (
        <section className="mt-8">
          <h2 className="mb-2 font-semibold">Past and cancelled</h2>
          <ul className="space-y-2">{past.map(row)}</ul>
        </section>
      ) : null}
      <ConfirmDialog open={asking !== null} title="Cancel this booking?" confirmLabel="Cancel my place" cancelLabel="Keep it" busy={cancel.isPending} onConfirm={confirmCancel} onCancel={() => (cancel.isPending ? undefined : setAsking(null))}>
        {asking ? <p>{asking.className}, {formatInZone(asking.startsAt, tz, 'dateTime')}. Your place goes to the next person waiting.</p> : null}
      </ConfirmDialog>
    </div>
  );
}
