import { Navigate, Outlet, useLocation } from 'react-router-dom';
import { useQuery } from '@tanstack/react-query';
import { ErrorState, Loading } from '../../components/ui/states';
import { useMe } from '../auth/api';
import { paths } from '../../lib/paths';
import { PortalShell } from './portal-shell';
import { studentPortalQueries } from './api';

/** The student's own pages: signed in as a student, or sent to sign in; staff go back to their pages. */
export function StudentLayout() {
  const me = useMe();
  const location = useLocation();
  const studio = useQuery(studentPortalQueries.studio());
  if (me.isPending) return <Loading />;
  if (me.isError) return <div className="p-6"><ErrorState error={me.error} retry={() => me.refetch()} /></div>;
  if (!me.data) return <Navigate to={paths.signIn} replace state={{ from: location.pathname + location.search }} />;
  if (me.data.role !== 'student') return <Navigate to={paths.today} replace />;
  return (
    <PortalShell me={me.data} studioName={studio.data?.name}>
      <Outlet context={me.data} />
    </PortalShell>
  );
}
