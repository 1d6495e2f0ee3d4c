import { CircleAlert } from 'lucide-react';
import type { ReactNode } from 'react';
import type { Conflict } from '../api';

/** Lines of a refusal in words: each point's reasons (named by label), then the session-wide ones. */
export function conflictLines(c: Pick<Conflict, 'points' | 'reasons'>, labelOf: (pointId: number) => string | undefined): string[] {
  const lines: string[] = [];
  for (const p of c.points) {
    const label = labelOf(p.pointId) ?? `point #${p.pointId}`;
    for (const r of p.reasons) lines.push(r.message.toLowerCase().includes(label.toLowerCase()) ? r.message : `${label}: ${r.message}`);
  }
  for (const r of c.reasons) lines.push(r.message);
  return [...new Set(lines)];
}

/** A refusal shown in place, in words. */
export function ConflictView({ title, lines, children }: { title: string; lines: string[]; children?: ReactNode }) {
  return (
    <div role="alert" className="rounded-xl border border-stop-700/30 bg-stop-50 p-4 text-stop-700">
      <p className="flex items-center gap-2 font-medium">
        <CircleAlert className="size-5 shrink-0" aria-hidden /> {title}
      </p>
      {lines.length ? (
        <ul className="mt-2 list-disc space-y-1 pl-9 text-sm">
          {lines.map((l) => <li key={l}>{l}</li>)}
        </ul>
      ) : null}
      {children ? <div className="mt-3">{children}</div> : null}
    </div>
  );
}
