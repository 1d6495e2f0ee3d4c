import { useState } from 'react';
import { Link } from 'react-router-dom';
import { CircleCheck, FileText, OctagonX, Wrench } from 'lucide-react';
import type { Fault } from '../../../../shared/schemas/safety';
import { Button } from '../../../components/ui/button';
import { formatInZone } from '../../../components/ui/zoned-time';
import { paths } from '../../../lib/paths';
import { faultSubject, resolutionText } from '../labels';
import { SeverityBadge } from './severity-badge';
import { ResolveFault, type FaultHolder } from './resolve-fault';

export function FaultState({ status }: { status: Fault['status'] }) {
  return status === 'open' ? (
    <span className="inline-flex items-center gap-1.5 rounded-full border border-stop-700/40 bg-stop-50 px-2.5 py-0.5 text-sm font-medium text-stop-700"><OctagonX className="size-4" aria-hidden /> Open: blocks</span>
  ) : (
    <span className="inline-flex items-center gap-1.5 rounded-full border border-ok-700/30 bg-ok-50 px-2.5 py-0.5 text-sm font-medium text-ok-700"><CircleCheck className="size-4" aria-hidden /> Resolved</span>
  );
}

/** What a fault is about, linked to the point or gear page. */
export function FaultSubjectLink({ fault }: { fault: Fault }) {
  const to = fault.gearId !== null ? paths.gearItem(fault.gearId) : fault.pointId !== null ? paths.point(fault.pointId) : null;
  const text = faultSubject(fault);
  return to ? <Link to={to} className="font-semibold text-pine-700 underline-offset-2 hover:underline">{text}</Link> : <span className="font-semibold">{text}</span>;
}

export function FaultPhotos({ photos }: { photos: Fault['photos'] }) {
  if (!photos.length) return null;
  return (
    <ul className="flex flex-wrap gap-2" aria-label="Photos">
      {photos.map((p) => {
        const pdf = /\.pdf$/i.test(p.originalName);
        return (
          <li key={p.id}>
            <a href={p.url} target="_blank" rel="noreferrer" className="block size-20 overflow-hidden rounded-lg border border-line bg-canvas" title={`Open ${p.originalName}`}>
              {pdf ? (
                <span className="flex size-full flex-col items-center justify-center gap-1 text-xs text-muted"><FileText className="size-6" aria-hidden />PDF</span>
              ) : (
                <img src={p.url} alt={`Photo: ${p.originalName}`} loading="lazy" className="size-full object-cover" />
              )}
              <span className="sr-only">Open {p.originalName} in a new tab</span>
            </a>
          </li>
        );
      })}
    </ul>
  );
}

export function FaultCard({ fault, timeZone, canResolve, onResolved }: { fault: Fault; timeZone: string; canResolve: boolean; onResolved?: (f: Fault, holder: FaultHolder) => void }) {
  const [resolving, setResolving] = useState(false);
  return (
    <li className={`space-y-3 rounded-xl border bg-white p-4 ${fault.status === 'open' ? 'border-stop-700/40' : 'border-line'}`} data-testid={`fault-${fault.id}`}>
      <div className="flex flex-wrap items-center gap-2">
        <FaultState status={fault.status} />
        <SeverityBadge severity={fault.severity} />
        <span className="text-sm text-muted">Fault #{fault.id}</span>
      </div>
      <div>
        <FaultSubjectLink fault={fault} />
        <p className="mt-1 whitespace-pre-line">{fault.description}</p>
        <p className="mt-1 text-sm text-muted">
          Reported by {fault.reportedBy ?? 'someone no longer on the staff list'} on {formatInZone(fault.reportedAt, timeZone)}
        </p>
      </div>
      <FaultPhotos photos={fault.photos} />
      {fault.status === 'resolved' ? (
        <div className="rounded-lg bg-canvas p-3 text-sm">
          <p className="font-medium">{fault.resolution ? resolutionText[fault.resolution].label : 'Resolved'}{fault.resolvedBy ? ` by ${fault.resolvedBy}` : ''}{fault.resolvedAt ? `, ${formatInZone(fault.resolvedAt, timeZone)}` : ''}</p>
          {fault.resolutionNote ? <p className="mt-1 whitespace-pre-line">{fault.resolutionNote}</p> : null}
        </div>
      ) : null}
      {fault.status === 'open' && canResolve ? (
        resolving ? (
          <ResolveFault fault={fault} onCancel={() => setResolving(false)} onResolved={(f, holder) => { setResolving(false); onResolved?.(f, holder); }} />
        ) : (
          <Button variant="secondary" onClick={() => setResolving(true)}><Wrench className="size-4" aria-hidden /> Resolve<span className="sr-only"> fault #{fault.id}</span></Button>
        )
      ) : null}
    </li>
  );
}

/** PRODUCT.md §4.1: a resolved fault never reopens a point by itself. */
export function AfterResolve({ fault, holder, onDismiss }: { fault: Fault; holder: FaultHolder; onDismiss?: () => void }) {
  return (
    <div role="status" className="flex items-start justify-between gap-3 rounded-xl border border-warn-700/30 bg-warn-50 p-4 text-ink">
      <div className="space-y-1">
        <p className="font-medium">Fault #{fault.id} is resolved ({fault.resolution ? resolutionText[fault.resolution].label.toLowerCase() : 'resolved'}).</p>
        {holder.pointId !== null ? (
          <p>
            Point {holder.pointLabel} stays blocked: it now waits for a rigger’s clearance.{' '}
            <Link to={paths.inspectPoint(holder.pointId)} className="font-medium text-pine-700 underline">Inspect and clear {holder.pointLabel}</Link>
          </p>
        ) : (
          <p>The item is not in any load path. Inspect it before it is hung again.</p>
        )}
      </div>
      {onDismiss ? <Button variant="ghost" onClick={onDismiss}>Dismiss</Button> : null}
    </div>
  );
}
