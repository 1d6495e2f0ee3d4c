import { useMemo, useState } from 'react';
import { Link, useSearchParams } from 'react-router-dom';
import { useQuery } from '@tanstack/react-query';
import { toast } from 'sonner';
import { ChevronLeft, ChevronRight, Users } from 'lucide-react';
import type { Me } from '../../../shared/schemas/staff';
import type { PublicClass } from '../../../shared/schemas/my';
import { Button } from '../../components/ui/button';
import { ConfirmDialog } from '../../components/ui/confirm';
import { EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { formatInZone } from '../../components/ui/zoned-time';
import { errorMessage } from '../../lib/api-client';
import { paths } from '../../lib/paths';
import { studentPortalQueries, useBookMyself } from './api';

const DAY = 86_400_000;

/** The week shown: from this hour on (the hour keeps the query stable while the page is open), `week` weeks ahead. */
function rangeFor(week: number) {
  const hour = Math.floor(Date.now() / 3_600_000) * 3_600_000;
  const from = new Date(hour + week * 7 * DAY);
  return { from: from.toISOString(), to: new Date(from.getTime() + 7 * DAY).toISOString() };
}

const placesText = (n: number) => (n === 0 ? 'Full: join the waitlist' : n === 1 ? '1 place left' : `${n} places left`);

/**
 * The public timetable (PRODUCT.md §11): upcoming classes with the places left, for anyone. A
 * signed-in student books from here; anyone else is led to sign in first.
 */
export function TimetablePage({ me }: { me: Me | null }) {
  const [params, setParams] = useSearchParams();
  const week = Math.min(4, Math.max(0, Number(params.get('week')) || 0));
  const { from, to } = useMemo(() => rangeFor(week), [week]);
  const studio = useQuery(studentPortalQueries.studio());
  const classes = useQuery(studentPortalQueries.timetable(from, to));
  const book = useBookMyself();
  const [asking, setAsking] = useState<PublicClass | null>(null);
  const tz = studio.data?.timeZone ?? 'UTC';
  const student = me?.role === 'student';

  const days = useMemo(() => {
    const groups = new Map<string, PublicClass[]>();
    for (const c of classes.data ?? []) {
      const day = formatInZone(c.startsAt, tz, 'weekday');
      groups.set(day, [...(groups.get(day) ?? []), c]);
    }
    return [...groups.entries()];
  }, [classes.data, tz]);

  const confirmBooking = () => {
    if (!asking) return;
    book.mutate(asking.sessionId, {
      onSuccess: (r) => {
        setAsking(null);
        const waiver = r.warnings?.some((w) => w.code === 'waiver_missing');
        toast.success(r.status === 'waitlisted' ? `You are on the waitlist${r.position ? ` (number ${r.position})` : ''}. We will e-mail you if a place frees up.` : `Booked: ${asking.className}.`, {
          description: waiver ? 'Please sign the waiver before class: you cannot be checked in without it.' : undefined,
        });
      },
      onError: (e) => toast.error(errorMessage(e)),
    });
  };

  return (
    <div>
      <PageHeader title="Timetable">Classes in the coming days, with the places left.</PageHeader>
      <div className="mb-4 flex items-center justify-between gap-2">
        <Button variant="secondary" disabled={week === 0} onClick={() => setParams(week - 1 ? { week: String(week - 1) } : {})} aria-label="Earlier week">
          <ChevronLeft className="size-4" aria-hidden /> Earlier
        </Button>
        <span className="text-sm text-muted">
          {formatInZone(from, tz, 'day')} – {formatInZone(new Date(Date.parse(to) - 1).toISOString(), tz, 'day')}
        </span>
        <Button variant="secondary" disabled={week >= 4} onClick={() => setParams({ week: String(week + 1) })} aria-label="Later week">
          Later <ChevronRight className="size-4" aria-hidden />
        </Button>
      </div>
      {classes.isPending || studio.isPending ? (
        <Loading label="Loading the timetable…" />
      ) : classes.isError ? (
        <ErrorState error={classes.error} retry={() => classes.refetch()} />
      ) : days.length === 0 ? (
        <EmptyState title="No classes this week">Try the next week.</EmptyState>
      ) : (
        <div className="space-y-6">
          {days.map(([day, list]) => (
            <section key={day} aria-label={day}>
              <h2 className="mb-2 font-semibold">{day}</h2>
              <ul className="space-y-2">
                {list.map((c) => (
                  <li key={c.sessionId} className="flex items-center justify-between gap-3 rounded-xl border border-line bg-white p-4" data-testid="timetable-class">
                    <div className="min-w-0">
                      <p className="font-medium">{c.className}</p>
                      <p className="text-sm text-muted">
                        {formatInZone(c.startsAt, tz, 'time')}–{formatInZone(c.endsAt, tz, 'time')} · <span className="capitalize">{c.apparatus}</span>
                      </p>
                      <p className={`mt-1 flex items-center gap-1 text-sm ${c.placesLeft === 0 ? 'text-warn-700' : 'text-ok-700'}`}>
                        <Users className="size-4" aria-hidden /> {placesText(c.placesLeft)}
                      </p>
                    </div>
                    {student ? (
                      <Button onClick={() => setAsking(c)} aria-label={`Book ${c.className} at ${formatInZone(c.startsAt, tz, 'dateTime')}`}>
                        {c.placesLeft === 0 ? 'Waitlist' : 'Book'}
                      </Button>
                    ) : me ? null : (
                      <Link to={paths.signIn} state={{ from: `${paths.timetable}${week ? `?week=${week}` : ''}` }} className="inline-flex min-h-11 items-center rounded-lg bg-pine-700 px-4 text-sm font-medium text-white hover:bg-pine-800" aria-label={`Book ${c.className}: sign in first`}>
                        Book
                      </Link>
                    )}
                  </li>
                ))}
              </ul>
            </section>
          ))}
        </div>
      )}
      <ConfirmDialog
        open={asking !== null}
        title={asking?.placesLeft === 0 ? 'Join the waitlist?' : 'Book this class?'}
        confirmLabel={asking?.placesLeft === 0 ? 'Join the waitlist' : 'Book my place'}
        danger={false}
        busy={book.isPending}
        onConfirm={confirmBooking}
        onCancel={() => (book.isPending ? undefined : setAsking(null))}
      >
        {asking ? (
          <p>
            {asking.className}, {formatInZone(asking.startsAt, tz, 'dateTime')}.
            {asking.placesLeft === 0 ? ' The class is full: you will be e-mailed if a place frees up.' : ''}
          </p>
        ) : null}
      </ConfirmDialog>
    </div>
  );
}
