import type { ReactNode } from 'react';
import { Link, NavLink, useNavigate } from 'react-router-dom';
import { useQueryClient } from '@tanstack/react-query';
import { CalendarDays, FileSignature, LogIn, LogOut, Ticket, UserRound } from 'lucide-react';
import type { Me } from '../../../shared/schemas/staff';
import { authQueries, signOut } from '../auth/api';
import { paths } from '../../lib/paths';

const studentNav = [
  { to: paths.timetable, label: 'Timetable', Icon: CalendarDays },
  { to: paths.myBookings, label: 'My bookings', Icon: Ticket },
  { to: paths.myWaiver, label: 'Waiver', Icon: FileSignature },
  { to: paths.myAccount, label: 'Account', Icon: UserRound },
];

/**
 * The frame of the student's pages and the public timetable: made for a phone first (a top bar and
 * a row of large tabs), with no staff navigation at all.
 */
export function PortalShell({ me, studioName, children }: { me: Me | null; studioName?: string; children: ReactNode }) {
  const qc = useQueryClient();
  const navigate = useNavigate();
  const onSignOut = async () => {
    await signOut();
    qc.clear();
    qc.setQueryData(authQueries.me().queryKey, null);
    navigate(paths.timetable, { replace: true });
  };
  const student = me?.role === 'student';
  return (
    <div className="min-h-screen">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:z-50 focus:rounded focus:bg-white focus:p-2">
        Skip to content
      </a>
      <header className="flex items-center justify-between gap-2 bg-pine-700 px-4 py-2">
        <span className="flex min-w-0 items-center gap-2 font-semibold text-white">
          <img src="/mark.svg" alt="" className="size-8" />
          <span className="truncate">{studioName ?? 'Loftwise'}</span>
        </span>
        {student ? (
          <button onClick={onSignOut} className="flex min-h-11 items-center gap-2 rounded-lg px-3 text-sm text-white hover:bg-pine-800">
            <LogOut className="size-4" aria-hidden /> Sign out
          </button>
        ) : me ? (
          <Link to={paths.today} className="flex min-h-11 items-center rounded-lg px-3 text-sm text-white underline">Back to Loftwise</Link>
        ) : (
          <Link to={paths.signIn} state={{ from: paths.myBookings }} className="flex min-h-11 items-center gap-2 rounded-lg px-3 text-sm text-white hover:bg-pine-800">
            <LogIn className="size-4" aria-hidden /> Sign in
          </Link>
        )}
      </header>
      {student ? (
        <nav aria-label="Your pages" className="border-b border-line bg-white">
          <ul className="mx-auto grid max-w-2xl grid-cols-4">
            {studentNav.map(({ to, label, Icon }) => (
              <li key={to}>
                <NavLink
                  to={to}
                  className={({ isActive }) => `flex min-h-14 flex-col items-center justify-center gap-0.5 px-1 text-xs font-medium ${isActive ? 'border-b-4 border-pine-700 text-pine-800' : 'text-muted hover:bg-pine-50'}`}
                >
                  <Icon className="size-5" aria-hidden />
                  {label}
                </NavLink>
              </li>
            ))}
          </ul>
        </nav>
      ) : null}
      <main id="main" className="mx-auto max-w-2xl p-4">
        {children}
      </main>
    </div>
  );
}
