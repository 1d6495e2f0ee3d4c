import { stateLook, type SessionState } from '../session-state';

/** A session's state as word + icon + colour. */
export function SessionStateBadge({ state, className = '' }: { state: SessionState; className?: string }) {
  const { label, Icon, badge } = stateLook[state];
  return (
    <span className={`inline-flex items-center gap-1.5 rounded-full border px-2.5 py-0.5 text-sm font-medium ${badge} ${className}`}>
      <Icon className="size-4 shrink-0" aria-hidden />
      {label}
    </span>
  );
}
