import { CircleAlert } from 'lucide-react';
import type { ReactNode } from 'react';
import type { Conflict, ConflictOccurrence } from '../api';
import { clock, shortDay } from '../format';

type LabelOf = (pointId: number) => string | undefined;

/** Lines of a refusal in words: each point's reasons (named by label), then the session-wide ones. */
export function conflictLines(c: Pick<Conflict, 'points' | 'reasons'>, labelOf: LabelOf): string[] {
  const lines: string[] = [];
  for (const p of c.points) {
    const label = labelOf(p.pointId);
    // The server's reasons name their point; a label is put in front only where one does not.
    for (const r of p.reasons) lines.push(!label || r.message.toLowerCase().includes(label.toLowerCase()) ? r.message : `${label}: ${r.message}`);
  }
  for (const r of c.reasons) lines.push(r.message);
  return [...new Set(lines)];
}

const dayOf = (o: ConflictOccurrence, timeZone: string) => `${shortDay(o.startsAt, timeZone)}, ${clock(o.startsAt, timeZone)}`;

/** A refusal's lines, for a notice or a toast: per class, by day, when several classes were refused. */
export function refusalLines(c: Conflict, labelOf: LabelOf, timeZone: string): string[] {
  if (!c.occurrences?.length) return conflictLines(c, labelOf);
  return c.occurrences.flatMap((o) => conflictLines(o, labelOf).map((l) => `${dayOf(o, timeZone)}: ${l}`));
}

/** "2 of 5 classes …": how many classes of a series change were refused, or null for a single class. */
export function refusedCount(c: Conflict): string | null {
  const n = c.occurrences?.length;
  if (!n) return null;
  const total = c.total ?? n;
  return `${n} of ${total} ${total === 1 ? 'class' : 'classes'}`;
}

/** Each refused class of a series by day, with its reasons. */
export function OccurrenceList({ occurrences, labelOf, timeZone }: { occurrences: ConflictOccurrence[]; labelOf: LabelOf; timeZone: string }) {
  return (
    <ol className="space-y-3">
      {occurrences.map((o) => (
        <li key={o.startsAt} className="rounded-lg bg-white p-3 text-ink">
          <p className="font-medium">{dayOf(o, timeZone)}</p>
          <ul className="mt-1 list-disc space-y-0.5 pl-5 text-sm text-stop-700">
            {conflictLines(o, labelOf).map((l) => <li key={l}>{l}</li>)}
          </ul>
        </li>
      ))}
    </ol>
  );
}

/**
 * A refused change shown in place: the points' reasons for one class, or for a change to "this and
 * the following" every class that cannot take it. Nothing was changed either way.
 */
export function RefusalView({
  title,
  seriesTitle = (count) => `Not changed: ${count} cannot take the change. Nothing was changed.`,
  conflict,
  labelOf,
  timeZone,
}: {
  title: string;
  /** The title when several classes of a series were refused, given "2 of 5 classes". */
  seriesTitle?: (count: string) => string;
  conflict: Conflict;
  labelOf: LabelOf;
  timeZone: string;
}) {
  const count = refusedCount(conflict);
  if (!count || !conflict.occurrences) return <ConflictView title={title} lines={conflictLines(conflict, labelOf)} />;
  return (
    <ConflictView title={seriesTitle(count)} lines={[]}>
      <OccurrenceList occurrences={conflict.occurrences} labelOf={labelOf} timeZone={timeZone} />
    </ConflictView>
  );
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
