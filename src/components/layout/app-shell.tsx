import { useState, type ReactNode } from 'react';
import { NavLink } from 'react-router-dom';
import { LogOut, Menu, X } from 'lucide-react';
import type { Sun } from 'lucide-react';

export interface ShellNavItem {
  to: string;
  label: string;
  Icon: typeof Sun;
}

export function Logo() {
  return (
    <span className="flex items-center gap-2 font-semibold text-white">
      <img src="/mark.svg" alt="" className="size-8" />
      <span className="text-lg tracking-wide">Loftwise</span>
    </span>
  );
}

/** The frame of every signed-in page: a side rail on wide screens, a top bar with a menu on phones. */
export function AppShell({ nav, person, onSignOut, children }: { nav: ShellNavItem[]; person: ReactNode; onSignOut: () => void; children: ReactNode }) {
  const [open, setOpen] = useState(false);
  const links = (
    <ul className="space-y-1">
      {nav.map(({ to, label, Icon }) => (
        <li key={to}>
          <NavLink
            to={to}
            onClick={() => setOpen(false)}
            className={({ isActive }) =>
              `flex min-h-11 items-center gap-3 rounded-lg px-3 py-2 text-sm font-medium ${isActive ? 'bg-white text-pine-800' : 'text-pine-50 hover:bg-pine-800'}`
            }
          >
            <Icon className="size-5" aria-hidden />
            {label}
          </NavLink>
        </li>
      ))}
    </ul>
  );
  const footer = (
    <div className="space-y-2 border-t border-pine-600 pt-3 text-sm text-pine-50">
      <div>{person}</div>
      <button onClick={onSignOut} className="flex min-h-11 w-full items-center gap-2 rounded-lg px-3 hover:bg-pine-800">
        <LogOut className="size-4" aria-hidden /> Sign out
      </button>
    </div>
  );
  return (
    <div className="min-h-screen md:flex">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:z-50 focus:rounded focus:bg-white focus:p-2">
        Skip to content
      </a>
      <aside className="no-print hidden w-60 shrink-0 flex-col justify-between bg-pine-700 p-4 md:flex">
        <nav aria-label="Main" className="space-y-6">
          <Logo />
          {links}
        </nav>
        {footer}
      </aside>
      {/* A banner landmark, so the phone's top bar is not content outside every landmark. */}
      <header className="no-print flex items-center justify-between bg-pine-700 px-4 py-2 md:hidden">
        <Logo />
        <button onClick={() => setOpen((o) => !o)} aria-expanded={open} aria-controls="phone-nav" className="flex size-11 items-center justify-center rounded-lg text-white" aria-label={open ? 'Close menu' : 'Open menu'}>
          {open ? <X aria-hidden /> : <Menu aria-hidden />}
        </button>
      </header>
      {open ? (
        <nav id="phone-nav" aria-label="Main" className="no-print space-y-4 bg-pine-700 px-4 pb-4 md:hidden">
          {links}
          {footer}
        </nav>
      ) : null}
      <main id="main" className="min-w-0 flex-1 p-4 md:p-8">
        {children}
      </main>
    </div>
  );
}
