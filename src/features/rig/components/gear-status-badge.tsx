import { Ban, CalendarX, CircleCheck, ClipboardX, Hourglass, ShieldAlert } from 'lucide-react';
import { gearStandingAt, gearStandingWords, type GearStanding, type GearStandingInput } from '../../../../shared/clearance/gear-standing';

// Word + icon + colour, never colour alone. Green only when nothing stands in the item's way.
const look: Record<GearStanding, { Icon: typeof Ban; cls: string }> = {
  in_service: { Icon: CircleCheck, cls: 'bg-ok-50 text-ok-700 border-ok-700/30' },
  quarantined: { Icon: ShieldAlert, cls: 'bg-warn-50 text-warn-700 border-warn-700/30' },
  retired: { Icon: Ban, cls: 'bg-stop-50 text-stop-700 border-stop-700/30' },
  past_service_life: { Icon: Hourglass, cls: 'bg-stop-50 text-stop-700 border-stop-700/30' },
  never_inspected: { Icon: ClipboardX, cls: 'bg-warn-50 text-warn-700 border-warn-700/30' },
  inspection_lapsed: { Icon: CalendarX, cls: 'bg-warn-50 text-warn-700 border-warn-700/30' },
};

/** The item's standing now: its recorded status, or what its dates say of an item recorded as in service. */
export function GearStatusBadge({ gear, at = new Date(), wrap = false }: { gear: GearStandingInput; at?: Date; /** In a narrow table cell the words may take two lines. */ wrap?: boolean }) {
  const standing = gearStandingAt(gear, at);
  const { Icon, cls } = look[standing];
  return (
    <span className={`inline-flex items-center gap-1.5 rounded-full border px-2.5 py-0.5 text-sm font-medium ${wrap ? '' : 'whitespace-nowrap'} ${cls}`} data-standing={standing}>
      <Icon className="size-4 shrink-0" aria-hidden />
      {gearStandingWords[standing]}
    </span>
  );
}

/** Whether the rigger's own inspection of the item is what it needs now (a new, quarantined or lapsed item). */
export function gearNeedsInspection(gear: GearStandingInput, at = new Date()): boolean {
  const s = gearStandingAt(gear, at);
  return s === 'quarantined' || s === 'never_inspected' || s === 'inspection_lapsed';
}
