import { CircleCheck, Clock, OctagonX } from 'lucide-react';
import type { PointStatusWord } from '../../../shared/schemas/vocabulary';

// Status is always word + icon + colour, never colour alone (PRODUCT.md §9).
const look: Record<PointStatusWord, { label: string; Icon: typeof CircleCheck; cls: string }> = {
  cleared: { label: 'Cleared', Icon: CircleCheck, cls: 'bg-ok-50 text-ok-700 border-ok-700/30' },
  expiring: { label: 'Expiring', Icon: Clock, cls: 'bg-warn-50 text-warn-700 border-warn-700/30' },
  blocked: { label: 'Blocked', Icon: OctagonX, cls: 'bg-stop-50 text-stop-700 border-stop-700/30' },
};

export function StatusBadge({ status, large = false }: { status: PointStatusWord; large?: boolean }) {
  const { label, Icon, cls } = look[status];
  return (
    <span className={`inline-flex items-center gap-1.5 rounded-full border font-medium ${cls} ${large ? 'px-3 py-1.5 text-base' : 'px-2.5 py-0.5 text-sm'}`}>
      <Icon className={large ? 'size-5' : 'size-4'} aria-hidden />
      {label}
    </span>
  );
}
