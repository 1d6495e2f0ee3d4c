import { Link, Navigate, Outlet, useLocation, useNavigate } from 'react-router-dom';
import { useQueryClient } from '@tanstack/react-query';
import { AppShell } from '../components/layout/app-shell';
import { ErrorState, Loading } from '../components/ui/states';
import { authQueries, signOut, useMe } from '../features/auth/api';
import { navFor, roleLabel } from './navigation';
import { paths } from '../lib/paths';

export function SignedInLayout() {
  const me = useMe();
  const location = useLocation();
  const navigate = useNavigate();
  const qc = useQueryClient();
  if (me.isPending) return <Loading />;
  if (me.isError) return <div className="p-6"><ErrorState error={me.error} retry={() => me.refetch()} /></div>;
  if (!me.data) return <Navigate to={paths.signIn} replace state={{ from: location.pathname + location.search }} />;
  const user = me.data;
  // Students never reach a staff page: their own pages live under /my (PRODUCT.md §11).
  if (user.role === 'student') return <Navigate to={paths.myBookings} replace />;
  const onSignOut = async () => {
    await signOut();
    qc.clear();
    qc.setQueryData(authQueries.me().queryKey, null);
    navigate(paths.signIn, { replace: true });
  };
  return (
    <AppShell
      nav={navFor(user.role)}
      onSignOut={onSignOut}
      person={
        <div className="px-3" data-testid="signed-in-as">
          <div className="font-medium text-white">{user.name}</div>
          <div className="text-xs text-pine-100">{roleLabel[user.role]}</div>
          <Link to={paths.account} className="mt-1 inline-block text-xs text-white underline">Your account</Link>
        </div>
      }
    >
      <Outlet context={user} />
    </AppShell>
  );
}
