import { Ban, CircleCheck, ShieldAlert } from 'lucide-react';
import type { GearStatus } from '../../../../shared/schemas/vocabulary';
import { gearStatusLabels } from '../format';

// Word + icon + colour, never colour alone.
const look: Record<GearStatus, { Icon: typeof Ban; cls: string }> = {
  in_service: { Icon: CircleCheck, cls: 'bg-ok-50 text-ok-700 border-ok-700/30' },
  quarantined: { Icon: ShieldAlert, cls: 'bg-warn-50 text-warn-700 border-warn-700/30' },
  retired: { Icon: Ban, cls: 'bg-stop-50 text-stop-700 border-stop-700/30' },
};

export function GearStatusBadge({ status }: { status: GearStatus }) {
  const { Icon, cls } = look[status];
  return (
    <span className={`inline-flex items-center gap-1.5 whitespace-nowrap rounded-full border px-2.5 py-0.5 text-sm font-medium ${cls}`}>
      <Icon className="size-4" aria-hidden />
      {gearStatusLabels[status]}
    </span>
  );
}
