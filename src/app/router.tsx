import { lazy, Suspense, type ComponentType } from 'react';
import { Navigate, useRoutes, type RouteObject } from 'react-router-dom';
import { SignedInLayout } from './signed-in-layout';
import { StudentLayout } from '../features/student-portal/student-pages';
import { Loading } from '../components/ui/states';
import { paths } from '../lib/paths';

// Every page loads on first visit, so sign-in does not carry Today's code nor Today the forms library.
const page = (load: () => Promise<{ default: ComponentType }>) => {
  const Page = lazy(load);
  return (
    <Suspense fallback={<Loading />}>
      <Page />
    </Suspense>
  );
};

// Declarative routing (useRoutes) rather than a data router: we load data with TanStack Query, and
// the data-router machinery would add to the JavaScript every page loads first.
export const routes: RouteObject[] = [
  { path: paths.signIn, element: page(() => import('../features/auth/sign-in-page').then((m) => ({ default: m.SignInPage }))) },
  { path: paths.checkEmail, element: page(() => import('../features/auth/check-email-page').then((m) => ({ default: m.CheckEmailPage }))) },
  // Students (PRODUCT.md §11): the public timetable for anyone; their own pages in their own frame.
  { path: paths.timetable, element: page(() => import('./routes/student/timetable-route')) },
  {
    element: <StudentLayout />,
    children: [
      { path: paths.myBookings, element: page(() => import('./routes/student/my-bookings-route')) },
      { path: paths.myWaiver, element: page(() => import('./routes/student/my-waiver-route')) },
      { path: paths.myAccount, element: page(() => import('./routes/student/my-account-route')) },
      { path: '/my/*', element: <Navigate to={paths.myBookings} replace /> },
    ],
  },
  {
    element: <SignedInLayout />,
    children: [
      { index: true, element: <Navigate to={paths.today} replace /> },
      { path: paths.today, element: page(() => import('./routes/today/today-route')) },
      { path: paths.schedule, element: page(() => import('./routes/schedule/schedule-route')) },
      { path: `${paths.rig}/*`, element: page(() => import('./routes/rig/rig-route')) },
      { path: paths.inspections, element: page(() => import('./routes/inspections/inspections-route')) },
      { path: `${paths.faults}/*`, element: page(() => import('./routes/faults/faults-route')) },
      { path: `${paths.students}/*`, element: page(() => import('./routes/students/students-route')) },
      { path: paths.classTypes, element: page(() => import('./routes/class-types/class-types-route')) },
      { path: paths.staff, element: page(() => import('./routes/staff/staff-route')) },
      { path: paths.settings, element: page(() => import('./routes/settings/settings-route')) },
      { path: paths.account, element: page(() => import('./routes/account/account-route')) },
      { path: paths.mailbox, element: page(() => import('./routes/mailbox/mailbox-route')) },
      { path: paths.audit, element: page(() => import('./routes/audit/audit-route')) },
      { path: '*', element: <p className="rounded-xl border border-line bg-white p-6">There is no page at this address. Use the menu to find your way.</p> },
    ],
  },
];

export function AppRoutes() {
  return useRoutes(routes);
}
