import { Link } from 'react-router-dom';
import { ChevronRight, OctagonX } from 'lucide-react';
import type { Point } from '../../../../shared/schemas/rig';
import { StatusBadge } from '../../../components/ui/status-badge';
import { paths } from '../../../lib/paths';
import { apparatusLabel, structureLabels, type StudioFormat } from '../format';

/** When the clearance runs out, or why there is none, in words. */
export function clearanceWords(point: Point, fmt: StudioFormat): string {
  if (point.status.clearedUntil) {
    return point.status.status === 'blocked' ? `Clearance would run to ${fmt.when(point.status.clearedUntil)}` : `Cleared until ${fmt.when(point.status.clearedUntil)}`;
  }
  if (point.clearanceVoidedAt) return `Clearance voided ${fmt.when(point.clearanceVoidedAt)}`;
  return point.lastClearedAt ? 'No clearance in force' : 'Never cleared';
}

/** One point in the register: label, status word and icon, every reason, and the clearance date. */
export function PointSummary({ point, fmt }: { point: Point; fmt: StudioFormat }) {
  return (
    <li className="border-b border-line last:border-0">
      <Link to={paths.point(point.id)} className="grid min-h-11 gap-x-4 gap-y-1 px-4 py-3 hover:bg-pine-50 sm:grid-cols-[8rem_9rem_1fr_auto] sm:items-center">
        <span className="text-lg font-semibold text-ink">{point.label}</span>
        <span><StatusBadge status={point.status.status} /></span>
        <span className="min-w-0 text-sm">
          {/* Every reason, each on its line: a rule violation must not hide behind "awaits clearance". */}
          {point.status.reasons.map((r, i) => (
            <span key={`${r.code}-${i}`} className="flex items-start gap-1.5 text-ink"><OctagonX className="mt-0.5 size-3.5 shrink-0 text-stop-700" aria-hidden />{r.message}</span>
          ))}
          <span className="block text-muted">{clearanceWords(point, fmt)}</span>
          <span className="block text-xs text-muted">
            {structureLabels[point.structure]} · {point.apparatus.length ? point.apparatus.map(apparatusLabel).join(', ') : 'no apparatus allowed yet'}
            {point.inService ? '' : ' · out of service'}
          </span>
        </span>
        <ChevronRight className="hidden size-5 text-muted sm:block" aria-hidden />
      </Link>
    </li>
  );
}
