import { useState } from 'react';
import { ArrowDownToLine, CircleCheck, Repeat2 } from 'lucide-react';
import type { ChangeoverWire } from '../../../../shared/schemas/sessions';
import { Button } from '../../../components/ui/button';
import { errorMessage } from '../../../lib/api-client';
import { useMountApparatus } from '../../rig/api';

/**
 * The apparatus to change before a class (PRODUCT.md §4.7), e.g. "Mount hoop HP-0102 on LS-3
 * before 18:30", each with a Mount button for the instructor or rigger who does it.
 */
export function Changeovers({ changeovers, canMount, className }: { changeovers: ChangeoverWire[]; canMount: boolean; className: string }) {
  if (!changeovers.length) return null;
  return (
    <section className="mt-3 rounded-lg border border-warn-700/40 bg-warn-50 p-3" aria-label={`Changeovers for ${className}`}>
      <p className="flex items-center gap-2 font-semibold text-ink"><Repeat2 className="size-5" aria-hidden /> Changeover before class</p>
      <ul className="mt-2 space-y-2">
        {changeovers.map((c) => <ChangeoverLine key={`${c.pointId}-${c.gearId}`} changeover={c} canMount={canMount} />)}
      </ul>
    </section>
  );
}

function ChangeoverLine({ changeover: c, canMount }: { changeover: ChangeoverWire; canMount: boolean }) {
  const mount = useMountApparatus();
  const [error, setError] = useState<string | null>(null);
  return (
    <li className="flex flex-wrap items-center gap-3">
      <span className="min-w-0 flex-1">
        {c.message}
        {c.mountedSerial ? <span className="block text-sm text-muted">Take down {c.mountedSerial} first.</span> : null}
      </span>
      {canMount ? (
        <Button type="button" variant="secondary" busy={mount.isPending} className="min-h-12"
          aria-label={`Mount ${c.kind} ${c.serial} on ${c.pointLabel}`}
          onClick={() => { setError(null); mount.mutate({ pointId: c.pointId, gearId: c.gearId }, { onError: (err) => setError(errorMessage(err)) }); }}>
          <ArrowDownToLine className="size-4" aria-hidden /> Mount
        </Button>
      ) : null}
      {mount.isSuccess ? <p role="status" className="flex w-full items-center gap-1 text-sm text-ok-700"><CircleCheck className="size-4" aria-hidden /> Mounted.</p> : null}
      {error ? <p role="alert" className="w-full text-sm font-medium text-stop-700">{error}</p> : null}
    </li>
  );
}
