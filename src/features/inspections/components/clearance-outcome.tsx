import { useEffect, useRef } from 'react';
import { Link } from 'react-router-dom';
import { CircleCheck, OctagonX } from 'lucide-react';
import type { Point } from '../../../../shared/schemas/rig';
import type { ClearanceResult } from '../../../../shared/schemas/safety';
import { Button } from '../../../components/ui/button';
import { Caution } from '../../../components/ui/caution';
import { StatusBadge } from '../../../components/ui/status-badge';
import { formatInZone } from '../../../components/ui/zoned-time';
import { paths } from '../../../lib/paths';

/** What signing an inspection did: cleared until a stated date, or why not, with the faults it opened. */
export function ClearanceOutcome({ point, result, timeZone, onAgain }: { point: Point; result: ClearanceResult; timeZone: string; onAgain: () => void }) {
  // Never read "cleared" from the clearance alone: the status now is what the rules say (PRODUCT.md §8).
  const clearedNow = result.cleared && result.status.status !== 'blocked';
  const top = useRef<HTMLDivElement>(null);
  // The long form is gone: bring the answer into view and give it the focus.
  useEffect(() => {
    top.current?.scrollIntoView({ block: 'start' });
    top.current?.focus();
  }, []);
  return (
    <div ref={top} tabIndex={-1} role="status" className="scroll-mt-4 space-y-4">
      {clearedNow ? (
        <div className="rounded-xl border-2 border-ok-700/40 bg-ok-50 p-4">
          <p className="flex items-center gap-2 text-lg font-semibold text-ok-700"><CircleCheck className="size-6" aria-hidden /> {point.label} is cleared</p>
          <p className="mt-1 text-lg">Cleared until <strong>{formatInZone(result.clearedUntil, timeZone)}</strong> <span className="text-sm text-muted">({timeZone.replace(/_/g, ' ')})</span></p>
          <p className="mt-1 text-sm text-muted">The gear in its path has its own inspection renewed. Bookings on the point reopen.</p>
        </div>
      ) : (
        <div className="rounded-xl border-2 border-stop-700/40 bg-stop-50 p-4 text-stop-700">
          <p className="flex items-center gap-2 text-lg font-semibold"><OctagonX className="size-6" aria-hidden /> {point.label} is not cleared</p>
          <p className="mt-1 text-ink">The inspection is recorded{result.clearanceSigned ? ', but the point is still blocked:' : '. Why it stays blocked:'}</p>
          <ul className="mt-1 list-disc space-y-0.5 pl-6">
            {(result.reasons.length ? result.reasons : result.status.reasons).map((r, i) => <li key={`${r.code}-${i}`}>{r.message}</li>)}
          </ul>
          {result.faultIds.length ? (
            <p className="mt-2 text-ink">
              {result.faultIds.length === 1 ? 'A fault was' : `${result.faultIds.length} faults were`} opened ({result.faultIds.map((id) => `#${id}`).join(', ')}).{' '}
              <Link to={paths.faults} className="font-medium text-pine-700 underline">See the faults</Link>
            </p>
          ) : null}
        </div>
      )}
      <p className="flex items-center gap-2 text-sm">Status now: <StatusBadge status={result.status.status} /></p>
      <Caution />
      <Button variant="secondary" onClick={onAgain}>Inspect {point.label} again</Button>
    </div>
  );
}
