import { CircleAlert, OctagonAlert, TriangleAlert } from 'lucide-react';
import type { Severity } from '../../../../shared/schemas/vocabulary';
import { severityText } from '../labels';

// Word + icon + colour; the word says "severity" so it is never read as the point's status.
const look: Record<Severity, { Icon: typeof CircleAlert; cls: string }> = {
  low: { Icon: CircleAlert, cls: 'border-line bg-white text-ink' },
  medium: { Icon: TriangleAlert, cls: 'border-warn-700/40 bg-warn-50 text-warn-700' },
  high: { Icon: OctagonAlert, cls: 'border-stop-700/40 bg-stop-50 text-stop-700' },
};

export function SeverityBadge({ severity }: { severity: Severity }) {
  const { Icon, cls } = look[severity];
  return (
    <span className={`inline-flex items-center gap-1.5 rounded-full border px-2.5 py-0.5 text-sm font-medium ${cls}`}>
      <Icon className="size-4" aria-hidden />
      {severityText[severity].label} severity
    </span>
  );
}
