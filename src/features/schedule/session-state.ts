import { Ban, CalendarClock, CircleCheck, History, TriangleAlert } from 'lucide-react';
import type { Session } from '../../../shared/schemas/sessions';

/** A session's state as the desk reads it: word, icon and colour, never colour alone (PRODUCT.md §9). */
export const sessionStates = ['all_clear', 'inspection_due', 'at_risk', 'cancelled', 'finished'] as const;
export type SessionState = (typeof sessionStates)[number];

/**
 * The server decides at risk and inspection due (PRODUCT.md §4.4). "All clear" is never shown
 * while a booked point is blocked: a future class on a point whose clearance has lapsed, but
 * outside the warning window, is the rigger's planned work and reads "Inspection due"; a class
 * that is over reads "Finished", as its points' status is today's, not the class's.
 */
export function stateOf(s: Pick<Session, 'cancelled' | 'atRisk' | 'inspectionDue' | 'endsAt' | 'points'>, now = Date.now()): SessionState {
  if (s.cancelled) return 'cancelled';
  if (new Date(s.endsAt).getTime() <= now) return 'finished';
  if (s.atRisk) return 'at_risk';
  if (s.inspectionDue || s.points.some((p) => p.status === 'blocked')) return 'inspection_due';
  return 'all_clear';
}

export const stateLook: Record<SessionState, { label: string; meaning: string; Icon: typeof CircleCheck; badge: string; event: { bg: string; border: string; text: string } }> = {
  all_clear: {
    label: 'All clear',
    meaning: 'Every booked point is cleared for the class.',
    Icon: CircleCheck,
    badge: 'bg-ok-50 text-ok-700 border-ok-700/30',
    event: { bg: '#e9f6ee', border: '#1c6b41', text: '#14492d' },
  },
  inspection_due: {
    label: 'Inspection due',
    meaning: 'A point’s clearance runs out before the class ends, or has run out: the rigger has it on the list.',
    Icon: CalendarClock,
    badge: 'bg-warn-50 text-warn-700 border-warn-700/30',
    event: { bg: '#fdf3e1', border: '#8a4f00', text: '#633800' },
  },
  at_risk: {
    label: 'At risk',
    meaning: 'A booked point is blocked or its inspection is due within days: swap, move or cancel.',
    Icon: TriangleAlert,
    badge: 'bg-stop-50 text-stop-700 border-stop-700/30',
    event: { bg: '#fdecea', border: '#a8261b', text: '#7d1c14' },
  },
  finished: {
    label: 'Finished',
    meaning: 'The class is over; it stays as a record.',
    Icon: History,
    badge: 'bg-white text-muted border-line',
    event: { bg: '#f4f6f5', border: '#6b7774', text: '#3f4a47' },
  },
  cancelled: {
    label: 'Cancelled',
    meaning: 'Kept on the calendar, marked; the instructor was told.',
    Icon: Ban,
    badge: 'bg-white text-muted border-line',
    event: { bg: '#f1efe9', border: '#8a918f', text: '#55625f' },
  },
};
