import { useQuery } from '@tanstack/react-query';
import { Loading } from '../../../components/ui/states';
import { useMe } from '../../../features/auth/api';
import { PortalShell } from '../../../features/student-portal/portal-shell';
import { TimetablePage } from '../../../features/student-portal/timetable-page';
import { studentPortalQueries } from '../../../features/student-portal/api';

/** The public timetable: for anyone, signed in or not. */
export default function TimetableRoute() {
  const me = useMe();
  const studio = useQuery(studentPortalQueries.studio());
  if (me.isPending) return <Loading />;
  const who = me.data ?? null;
  return (
    <PortalShell me={who} studioName={studio.data?.name}>
      <TimetablePage me={who} />
    </PortalShell>
  );
}
