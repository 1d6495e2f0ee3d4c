import { CircleCheck, Info, OctagonX } from 'lucide-react';
import type { Point } from '../../../../shared/schemas/rig';
import { Caution } from '../../../components/ui/caution';
import { Card } from '../../../components/ui/states';
import { StatusBadge } from '../../../components/ui/status-badge';
import type { StudioFormat } from '../format';
import type { SaveOutcome } from './load-path-editor';
import { clearanceWords } from './point-summary';

const SAVED_WORDS: Record<SaveOutcome, string> = {
  voided: 'The load path was saved and the change voided the clearance. The point stays blocked until a rigger inspects and clears it.',
  kept: 'The load path was saved. Only the mounted apparatus changed, so the clearance still stands.',
  no_clearance: 'The load path was saved. The point had no clearance in force to void; it needs a rigger’s inspection and clearance before use.',
  unchanged: 'The path was the same as the saved one, so nothing changed.',
};

/** The point's status now, every reason that blocks or warns, and its clearance dates. */
export function PointStatusPanel({ point, fmt, saved }: { point: Point; fmt: StudioFormat; saved: SaveOutcome | null }) {
  const { status } = point;
  return (
    <Card className="space-y-3" >
      <h2 className="sr-only">Status</h2>
      <div className="flex flex-wrap items-center gap-3">
        <StatusBadge status={status.status} large />
        <span className="font-medium">{clearanceWords(point, fmt)}</span>
      </div>
      {saved ? (
        <p role="status" className={`flex items-start gap-2 rounded-lg px-3 py-2 text-sm ${saved === 'voided' ? 'bg-stop-50 text-stop-700' : 'bg-ok-50 text-ok-700'}`}>
          {saved === 'voided' ? <OctagonX className="mt-0.5 size-4 shrink-0" aria-hidden /> : <CircleCheck className="mt-0.5 size-4 shrink-0" aria-hidden />}
          {SAVED_WORDS[saved]}
        </p>
      ) : null}
      {status.reasons.length > 0 ? (
        <div>
          <h3 className="text-sm font-semibold">{status.status === 'blocked' ? 'Why it is blocked' : 'To know'}</h3>
          <ul className="mt-1 space-y-1 text-sm">
            {status.reasons.map((r, i) => (
              <li key={`${r.code}-${i}`} className="flex items-start gap-2">
                {status.status === 'blocked' ? <OctagonX className="mt-0.5 size-4 shrink-0 text-stop-700" aria-hidden /> : <Info className="mt-0.5 size-4 shrink-0 text-warn-700" aria-hidden />}
                <span>{r.message}</span>
              </li>
            ))}
          </ul>
        </div>
      ) : (
        <p className="text-sm text-muted">Nothing blocks this point now.</p>
      )}
      <dl className="grid gap-x-6 gap-y-1 text-sm sm:grid-cols-2">
        <div><dt className="inline text-muted">Last cleared: </dt><dd className="inline">{fmt.when(point.lastClearedAt, 'never')}</dd></div>
        <div><dt className="inline text-muted">Cleared until: </dt><dd className="inline">{fmt.when(status.clearedUntil, 'no clearance in force')}</dd></div>
        {point.clearanceVoidedAt ? <div><dt className="inline text-muted">Clearance voided: </dt><dd className="inline">{fmt.when(point.clearanceVoidedAt)}</dd></div> : null}
      </dl>
      <Caution />
    </Card>
  );
}
