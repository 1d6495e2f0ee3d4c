import type { ReactNode } from 'react';
import { CircleAlert, Construction, Inbox } from 'lucide-react';
import { errorMessage } from '../../lib/api-client';
import { Button } from './button';

export function Loading({ label = 'Loading…' }: { label?: string }) {
  return (
    <div role="status" className="flex items-center gap-3 p-6 text-muted">
      <span className="size-5 animate-spin rounded-full border-2 border-pine-600 border-t-transparent" aria-hidden />
      {label}
    </div>
  );
}

export function ErrorState({ error, retry }: { error: unknown; retry?: () => void }) {
  return (
    <div role="alert" className="flex items-start gap-3 rounded-xl border border-stop-700/30 bg-stop-50 p-4 text-stop-700">
      <CircleAlert className="mt-0.5 size-5 shrink-0" aria-hidden />
      <div className="space-y-2">
        <p>{errorMessage(error)}</p>
        {retry ? (
          <Button variant="secondary" onClick={retry}>
            Try again
          </Button>
        ) : null}
      </div>
    </div>
  );
}

export function EmptyState({ title, children }: { title: string; children?: ReactNode }) {
  return (
    <div className="flex flex-col items-center gap-2 rounded-xl border border-dashed border-line bg-white p-8 text-center">
      <Inbox className="size-8 text-muted" aria-hidden />
      <p className="font-medium">{title}</p>
      {children ? <div className="text-sm text-muted">{children}</div> : null}
    </div>
  );
}

/** For a page a later piece of work builds; it says so plainly instead of pretending. */
export function ComingLater({ what, children }: { what: string; children?: ReactNode }) {
  return (
    <div className="flex items-start gap-3 rounded-xl border border-line bg-white p-6">
      <Construction className="mt-0.5 size-6 shrink-0 text-brass-500" aria-hidden />
      <div className="space-y-1">
        <p className="font-medium">{what} is not built yet.</p>
        <p className="text-sm text-muted">{children ?? 'This page is a placeholder until its part of Loftwise lands.'}</p>
      </div>
    </div>
  );
}

export function PageHeader({ title, children, actions }: { title: string; children?: ReactNode; actions?: ReactNode }) {
  return (
    <header className="mb-6 flex flex-wrap items-end justify-between gap-4">
      <div>
        <h1 className="text-2xl font-semibold text-ink">{title}</h1>
        {children ? <p className="mt-1 text-muted">{children}</p> : null}
      </div>
      {actions ? <div className="no-print flex flex-wrap gap-2">{actions}</div> : null}
    </header>
  );
}

export function Card({ children, className = '' }: { children: ReactNode; className?: string }) {
  return <section className={`rounded-xl border border-line bg-white p-5 ${className}`}>{children}</section>;
}
