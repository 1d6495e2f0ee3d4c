import { Ban, CircleCheck, CircleX, Clock, FileWarning, Hourglass, UserCheck } from 'lucide-react';
import type { PlaceStatus } from '../../../../shared/schemas/vocabulary';
import type { WaiverState } from '../../../../shared/schemas/students';

type Look = { label: string; Icon: typeof Ban; cls: string };

// Words with an icon, colour only as a third cue (PRODUCT.md §9).
const place: Record<PlaceStatus, Look> = {
  booked: { label: 'Booked', Icon: CircleCheck, cls: 'bg-pine-50 text-pine-800 border-pine-700/30' },
  waitlisted: { label: 'Waitlisted', Icon: Hourglass, cls: 'bg-warn-50 text-warn-700 border-warn-700/30' },
  cancelled: { label: 'Cancelled', Icon: Ban, cls: 'bg-white text-muted border-line' },
  attended: { label: 'Attended', Icon: UserCheck, cls: 'bg-ok-50 text-ok-700 border-ok-700/30' },
  no_show: { label: 'No-show', Icon: CircleX, cls: 'bg-stop-50 text-stop-700 border-stop-700/30' },
};

export const placeStatusLabel = (s: PlaceStatus) => place[s].label;

/** One badge shape for every student state: the icon, the words, the colour as a third cue. */
function Pill({ look: { label, Icon, cls } }: { look: Look }) {
  return (
    <span className={`inline-flex items-center gap-1 whitespace-nowrap rounded-full border px-2 py-0.5 text-xs font-medium ${cls}`}>
      <Icon className="size-3.5" aria-hidden />{label}
    </span>
  );
}

export function PlaceBadge({ status }: { status: PlaceStatus }) {
  return <Pill look={place[status]} />;
}

const waiver: Record<WaiverState, Look> = {
  valid: { label: 'Waiver valid', Icon: CircleCheck, cls: 'bg-ok-50 text-ok-700 border-ok-700/30' },
  expired: { label: 'Waiver expired', Icon: Clock, cls: 'bg-stop-50 text-stop-700 border-stop-700/30' },
  missing: { label: 'No waiver', Icon: FileWarning, cls: 'bg-stop-50 text-stop-700 border-stop-700/30' },
};

export function WaiverBadge({ state }: { state: WaiverState }) {
  return <Pill look={waiver[state]} />;
}

/** For a place where only "does the waiver hold" is known (a class's list). */
export function WaiverMissing() {
  return <Pill look={{ label: 'No valid waiver', Icon: FileWarning, cls: 'bg-stop-50 text-stop-700 border-stop-700/30' }} />;
}
