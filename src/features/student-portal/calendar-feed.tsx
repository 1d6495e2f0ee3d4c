import { useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { toast } from 'sonner';
import { CalendarPlus } from 'lucide-react';
import { Button } from '../../components/ui/button';
import { ConfirmDialog } from '../../components/ui/confirm';
import { Card, ErrorState, Loading } from '../../components/ui/states';
import { errorMessage } from '../../lib/api-client';
import { studentPortalQueries, useRenewFeed, useRevokeFeed } from './api';

/**
 * A private calendar feed (`/ical/<token>.ics`) for instructors and students. Only a hash of the
 * link is kept, so the link is shown once, when made; making a new one turns the old one off.
 */
export function CalendarFeedCard({ what }: { what: string }) {
  const state = useQuery(studentPortalQueries.feed());
  const renew = useRenewFeed();
  const revoke = useRevokeFeed();
  const [url, setUrl] = useState<string | null>(null);
  const [asking, setAsking] = useState<'renew' | 'revoke' | null>(null);

  const make = () =>
    renew.mutate(undefined, {
      onSuccess: (r) => {
        setUrl(r.url);
        setAsking(null);
        toast.success('Your calendar link is ready.');
      },
      onError: (e) => toast.error(errorMessage(e)),
    });
  const turnOff = () =>
    revoke.mutate(undefined, {
      onSuccess: () => {
        setUrl(null);
        setAsking(null);
        toast.success('Your calendar link is turned off.');
      },
      onError: (e) => toast.error(errorMessage(e)),
    });

  return (
    <Card className="space-y-3">
      <h2 className="flex items-center gap-2 font-semibold">
        <CalendarPlus className="size-5" aria-hidden /> Calendar link
      </h2>
      <p className="text-sm text-muted">Add {what} to your phone’s calendar. Keep the link private: anyone with it can read the calendar.</p>
      {state.isPending ? (
        <Loading />
      ) : state.isError ? (
        <ErrorState error={state.error} retry={() => state.refetch()} />
      ) : (
        <>
          {url ? (
            <div className="space-y-1">
              <label htmlFor="feed-url" className="block text-sm font-medium">Your calendar link (shown once: copy it now)</label>
              <input id="feed-url" readOnly value={url} onFocus={(e) => e.currentTarget.select()} className="block min-h-11 w-full rounded-lg border border-line bg-canvas px-3 text-sm" data-testid="feed-url" />
            </div>
          ) : state.data.active ? (
            <p className="text-sm">A calendar link is on. To see it again, make a new one (the old one stops working).</p>
          ) : (
            <p className="text-sm">No calendar link yet.</p>
          )}
          <div className="flex flex-wrap gap-2">
            <Button onClick={() => (state.data.active ? setAsking('renew') : make())} busy={renew.isPending}>
              {state.data.active ? 'Make a new link' : 'Make my calendar link'}
            </Button>
            {state.data.active ? (
              <Button variant="secondary" onClick={() => setAsking('revoke')} busy={revoke.isPending}>
                Turn the link off
              </Button>
            ) : null}
          </div>
        </>
      )}
      <ConfirmDialog
        open={asking !== null}
        title={asking === 'revoke' ? 'Turn the calendar link off?' : 'Make a new calendar link?'}
        confirmLabel={asking === 'revoke' ? 'Turn it off' : 'Make a new link'}
        busy={renew.isPending || revoke.isPending}
        onConfirm={asking === 'revoke' ? turnOff : make}
        onCancel={() => setAsking(null)}
      >
        <p>The current link stops working at once: calendars using it stop updating.</p>
      </ConfirmDialog>
    </Card>
  );
}
