import { formatStudioDay } from '../../../shared/clearance';
import { button, esc, heading, itemList, oneLine, page, paragraph, textFooter, when, type RenderedMail } from './layout';

export interface DigestInput {
  studioName: string;
  timeZone: string;
  appUrl: string;
  recipientName: string;
  /** The studio day, e.g. "3 Dec 2026". */
  dayLabel: string;
  warningDays: number;
  /** The audit chain's head, `count:hash`, printed so it can be checked against the chain later. */
  chainHead: string;
  expiringPoints: Array<{ label: string; roomName: string; clearedUntil: Date }>;
  sessionsPastClearance: Array<{ className: string; roomName: string; startsAt: Date; endsAt: Date; pointLabel: string; clearedUntil: Date | null }>;
  gearServiceLife: Array<{ name: string; pointLabel: string | null; lifeEnd: Date; past: boolean }>;
  /** Points whose clearance was voided and that no rigger has cleared since. */
  awaitingClearance: Array<{ label: string; roomName: string; voidedAt: Date | null }>;
  /** Every open fault, newest first; `on` names the point or the gear item in words. */
  openFaults: Array<{ on: string; severity: string; description: string; reportedAt: Date }>;
}

export type DigestSection = 'expiringPoints' | 'sessionsPastClearance' | 'gearServiceLife' | 'awaitingClearance' | 'openFaults';

const plural = (n: number, one: string, many: string) => `${n} ${n === 1 ? one : many}`;

export function digestIsEmpty(i: Pick<DigestInput, DigestSection>): boolean {
  return !i.expiringPoints.length && !i.sessionsPastClearance.length && !i.gearServiceLife.length && !i.awaitingClearance.length && !i.openFaults.length;
}

/** PRODUCT.md §5: the rigger's daily digest of work coming due. */
export function digestMessage(i: DigestInput): RenderedMail {
  const tz = i.timeZone;
  const link = `${i.appUrl}/rig`;
  const counts = [
    i.awaitingClearance.length && plural(i.awaitingClearance.length, 'point awaiting clearance', 'points awaiting clearance'),
    i.openFaults.length && plural(i.openFaults.length, 'open fault', 'open faults'),
    i.expiringPoints.length && plural(i.expiringPoints.length, 'point expiring', 'points expiring'),
    i.sessionsPastClearance.length && plural(i.sessionsPastClearance.length, 'booking past clearance', 'bookings past clearance'),
    i.gearServiceLife.length && plural(i.gearServiceLife.length, 'gear item at end of life', 'gear items at end of life'),
  ].filter(Boolean) as string[];
  const subject = oneLine(`Rig digest for ${i.dayLabel}: ${counts.length ? counts.join(', ') : 'nothing due'}`);
  const window = plural(i.warningDays, 'day', 'days');

  const awaiting = i.awaitingClearance.map((p) => ({ title: `${p.label} (${p.roomName})`, details: [p.voidedAt ? `clearance voided ${when(p.voidedAt, tz)}` : 'clearance voided'] }));
  const faults = i.openFaults.map((f) => ({ title: `${f.on}, ${f.severity} severity`, details: [oneLine(f.description), `reported ${when(f.reportedAt, tz)}`] }));
  const points = i.expiringPoints.map((p) => ({ title: `${p.label} (${p.roomName})`, details: [`cleared until ${when(p.clearedUntil, tz)}`] }));
  const sessions = i.sessionsPastClearance.map((s) => ({
    title: `${s.className}, ${when(s.startsAt, tz)}, ${s.roomName}`,
    details: [`point ${s.pointLabel} ${s.clearedUntil ? `is cleared only until ${when(s.clearedUntil, tz)}` : 'is not cleared'}; the class ends ${when(s.endsAt, tz)}`],
  }));
  const gear = i.gearServiceLife.map((g) => ({
    title: g.name + (g.pointLabel ? ` (on ${g.pointLabel})` : ''),
    details: [`${g.past ? 'service life ended' : 'service life ends'} ${formatStudioDay(g.lifeEnd, tz)}`],
  }));
  const textSection = (title: string, items: Array<{ title: string; details: string[] }>) => (items.length ? ['', `${title}:`, ...items.map((x) => `${x.title}  ${x.details.join('; ')}`)] : []);

  const text = [
    `Hello ${i.recipientName},`,
    '',
    counts.length ? `Rig work coming due, ${i.dayLabel} (warning window ${window}).` : `Nothing comes due in the next ${window}.`,
    ...textSection('Points awaiting a rigger’s clearance', awaiting),
    ...textSection('Open faults', faults),
    ...textSection(`Points whose clearance runs out within ${window}`, points),
    ...textSection('Booked classes that end after a point’s clearance runs out', sessions),
    ...textSection(`Gear reaching the end of its service life within ${window}`, gear),
    '',
    link,
    '',
    `Audit chain head: ${i.chainHead}`,
    ...textFooter(i.studioName, true),
  ].join('\n');

  const section = (title: string, items: Array<{ title: string; details: string[] }>) => (items.length ? heading(title) + itemList(items) : '');
  const html = page({
    title: `Rig digest, ${i.dayLabel}`,
    studioName: i.studioName,
    caution: true,
    body: [
      paragraph(`Hello ${i.recipientName},`),
      paragraph(counts.length ? `Rig work coming due (warning window ${window}).` : `Nothing comes due in the next ${window}.`),
      section('Points awaiting a rigger’s clearance', awaiting),
      section('Open faults', faults),
      section(`Points whose clearance runs out within ${window}`, points),
      section('Booked classes that end after a point’s clearance runs out', sessions),
      section(`Gear reaching the end of its service life within ${window}`, gear),
      button(link, 'Open the rig register'),
      `<p style="margin:0;font-size:13px;color:#56666a;word-break:break-all;">${esc(link)}</p>`,
      `<p style="margin:16px 0 0;font-size:12px;color:#56666a;word-break:break-all;">Audit chain head: <code>${esc(i.chainHead)}</code></p>`,
    ].join(''),
  });
  return { subject, text, html };
}
