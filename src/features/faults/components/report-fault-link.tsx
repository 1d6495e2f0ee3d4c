import { Link } from 'react-router-dom';
import { TriangleAlert } from 'lucide-react';
import { paths } from '../../../lib/paths';

/**
 * "Report a fault" for a point or a gear item page: one large link to the fault form with the
 * item filled in. Anyone signed in may report (PRODUCT.md §2).
 */
export function ReportFaultLink({ pointId, gearId, className = '' }: { pointId?: number; gearId?: number; className?: string }) {
  return (
    <Link
      to={paths.reportFault(gearId !== undefined ? { gearId } : { pointId })}
      className={`inline-flex min-h-12 items-center justify-center gap-2 rounded-lg border-2 border-stop-700 bg-white px-4 py-2 text-base font-medium text-stop-700 hover:bg-stop-50 ${className}`}
    >
      <TriangleAlert className="size-5" aria-hidden />
      Report a fault
    </Link>
  );
}
