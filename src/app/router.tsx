import { lazy, Suspense, type ComponentType } from 'react';
import { createBrowserRouter, Navigate } from 'react-router-dom';
import { SignInPage } from '../features/auth/sign-in-page';
import { SignedInLayout } from './signed-in-layout';
import { Loading } from '../components/ui/states';
import TodayRoute from './routes/today/today-route';
import { paths } from '../lib/paths';

// Today and sign-in load at once (instructors on phones); the rest load on first visit.
const page = (load: () => Promise<{ default: ComponentType }>) => {
  const Page = lazy(load);
  return (
    <Suspense fallback={<Loading />}>
      <Page />
    </Suspense>
  );
};

export const router = createBrowserRouter([
  { path: paths.signIn, element: <SignInPage /> },
  {
    element: <SignedInLayout />,
    children: [
      { index: true, element: <Navigate to={paths.today} replace /> },
      { path: paths.today, element: <TodayRoute /> },
      { path: paths.schedule, element: page(() => import('./routes/schedule/schedule-route')) },
      { path: `${paths.rig}/*`, element: page(() => import('./routes/rig/rig-route')) },
      { path: paths.inspections, element: page(() => import('./routes/inspections/inspections-route')) },
      { path: `${paths.faults}/*`, element: page(() => import('./routes/faults/faults-route')) },
      { path: paths.staff, element: page(() => import('./routes/staff/staff-route')) },
      { path: paths.settings, element: page(() => import('./routes/settings/settings-route')) },
      { path: paths.mailbox, element: page(() => import('./routes/mailbox/mailbox-route')) },
      { path: '*', element: <p className="rounded-xl border border-line bg-white p-6">There is no page at this address. Use the menu to find your way.</p> },
    ],
  },
]);
