import { useQuery } from '@tanstack/react-query';
import { Loading } from '../../../components/ui/states';
import { authQueries } from '../../../features/auth/api';
import { PortalShell } from '../../../features/student-portal/portal-shell';
import { TimetablePage } from '../../../features/student-portal/timetable-page';
import { studentPortalQueries } from '../../../features/student-portal/api';

/**
 * The public timetable: for anyone, signed in or not. Auth.js's session endpoint answers 200 either
 * way, so a visitor's page asks /api/me (which answers 401 signed out) only when there is a session.
 */
export default function TimetableRoute() {
  const session = useQuery({
    queryKey: [...authQueries.all, 'session'],
    queryFn: async () => {
      const res = await fetch('/auth/session', { credentials: 'same-origin' });
      const body = (await res.json().catch(() => null)) as { user?: unknown } | null;
      return Boolean(body?.user);
    },
    staleTime: 60_000,
  });
  const me = useQuery({ ...authQueries.me(), enabled: session.data === true });
  const studio = useQuery(studentPortalQueries.studio());
  if (session.isPending || (session.data && me.isPending)) return <Loading />;
  const who = session.data ? (me.data ?? null) : null;
  return (
    <PortalShell me={who} studioName={studio.data?.name}>
      <TimetablePage me={who} />
    </PortalShell>
  );
}
