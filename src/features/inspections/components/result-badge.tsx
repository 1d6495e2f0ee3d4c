import { CircleCheck, Eye, OctagonX } from 'lucide-react';
import type { InspectionResult } from '../../../../shared/schemas/vocabulary';
import { resultText } from '../labels';

const look: Record<InspectionResult, { Icon: typeof CircleCheck; cls: string }> = {
  pass: { Icon: CircleCheck, cls: 'border-ok-700/30 bg-ok-50 text-ok-700' },
  attention: { Icon: Eye, cls: 'border-warn-700/30 bg-warn-50 text-warn-700' },
  fail: { Icon: OctagonX, cls: 'border-stop-700/30 bg-stop-50 text-stop-700' },
};

/** An inspection result by word and icon, never colour alone. */
export function ResultBadge({ result }: { result: InspectionResult }) {
  const { Icon, cls } = look[result];
  return (
    <span className={`inline-flex items-center gap-1 whitespace-nowrap rounded-full border px-2 py-0.5 text-xs font-medium ${cls}`}>
      <Icon className="size-3.5" aria-hidden />
      {resultText[result].label}
    </span>
  );
}
