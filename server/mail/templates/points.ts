import type { PointStatusWord } from '../../../shared/schemas/vocabulary';
import { itemList, when } from './layout';

/** A booked point as a message shows it: its status at the session's time and why. */
export interface MailPoint {
  label: string;
  status: PointStatusWord;
  reasons: string[];
  clearedUntil: Date | null;
}

const order: Record<PointStatusWord, number> = { blocked: 0, expiring: 1, cleared: 2 };

/** Blocked points first, then expiring, then cleared; the booking's order within each. */
export function byUrgency(points: MailPoint[]): MailPoint[] {
  return points
    .map((p, i) => ({ p, i }))
    .sort((a, b) => order[a.p.status] - order[b.p.status] || a.i - b.i)
    .map(({ p }) => p);
}

function detail(p: MailPoint, timeZone: string): string[] {
  if (p.reasons.length) return p.reasons;
  if (p.status === 'expiring' && p.clearedUntil) return [`cleared until ${when(p.clearedUntil, timeZone)}`];
  return [];
}

/** One plain-text line per point: `<label>  <status word>  <reasons joined by '; '>`. */
export function pointLines(points: MailPoint[], timeZone: string): string[] {
  return byUrgency(points).map((p) => [p.label, p.status, detail(p, timeZone).join('; ')].filter(Boolean).join('  '));
}

export function pointItems(points: MailPoint[], timeZone: string): string {
  return itemList(byUrgency(points).map((p) => ({ title: p.label, status: p.status, details: detail(p, timeZone) })));
}

export function blockedNote(points: MailPoint[]): string | null {
  const n = points.filter((p) => p.status === 'blocked').length;
  if (!n) return null;
  return n === 1
    ? '1 point is blocked: do not use it until a rigger clears it. Reception can move the class to another point.'
    : `${n} points are blocked: do not use them until a rigger clears them. Reception can move the class to other points.`;
}
