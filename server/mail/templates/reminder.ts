import { studioDay } from '../../../shared/clearance';
import { button, clockTime, esc, facts, heading, itemList, oneLine, page, paragraph, shortDay, textFooter, when, type RenderedMail } from './layout';
import { blockedNote, pointItems, pointLines, type MailPoint } from './points';

export interface ReminderInput {
  studioName: string;
  timeZone: string;
  appUrl: string;
  now: Date;
  className: string;
  roomName: string;
  instructorName: string;
  startsAt: Date;
  endsAt: Date;
  points: MailPoint[];
  /** Apparatus to mount before class, e.g. "Mount hoop HP-0102 on LS-3 before 18:30" (PRODUCT.md §4.7). */
  changeovers?: string[];
}

/** "at 18:00" today, "on Thu 3 Dec at 18:00" on another day. */
function whenShort(i: ReminderInput): string {
  const sameDay = studioDay(i.startsAt, i.timeZone) === studioDay(i.now, i.timeZone);
  return sameDay ? `at ${clockTime(i.startsAt, i.timeZone)}` : `on ${shortDay(i.startsAt, i.timeZone)} at ${clockTime(i.startsAt, i.timeZone)}`;
}

/** PRODUCT.md §5: the instructor's reminder before a class, one line per point in the plain text. */
export function reminderMessage(i: ReminderInput): RenderedMail {
  const tz = i.timeZone;
  const link = `${i.appUrl}/today`;
  const blocked = i.points.filter((p) => p.status === 'blocked').length;
  const subject = oneLine(`Reminder: ${i.className} ${whenShort(i)} in ${i.roomName}${blocked ? ` (${blocked === 1 ? '1 point' : `${blocked} points`} blocked)` : ''}`);
  const note = blockedNote(i.points);
  const rows: Array<[string, string]> = [
    ['Class', i.className],
    ['Room', i.roomName],
    ['Starts', when(i.startsAt, tz)],
    ['Ends', when(i.endsAt, tz)],
  ];

  const text = [
    `Hello ${i.instructorName},`,
    '',
    `${i.className} is ${whenShort(i)} in ${i.roomName}.`,
    '',
    ...rows.map(([k, v]) => `${k}: ${v}`),
    '',
    'Points (status at the start of class):',
    ...(i.points.length ? pointLines(i.points, tz) : ['No points are booked for this class.']),
    ...(note ? ['', note] : []),
    ...(i.changeovers?.length ? ['', 'Changeovers (mount before class, then record the pre-use check):', ...i.changeovers] : []),
    '',
    'Record the pre-use check of each point before class:',
    link,
    ...textFooter(i.studioName, true),
  ].join('\n');

  const html = page({
    title: `${i.className} ${whenShort(i)}`,
    studioName: i.studioName,
    caution: true,
    body: [
      paragraph(`Hello ${i.instructorName}, a reminder of your class.`),
      facts(rows),
      heading('Points, at the start of class'),
      i.points.length ? pointItems(i.points, tz) : paragraph('No points are booked for this class.', { muted: true }),
      note ? paragraph(note) : '',
      i.changeovers?.length ? heading('Changeovers') + itemList(i.changeovers.map((c) => ({ title: c, details: ['Mount it before class, then record the pre-use check.'] }))) : '',
      button(link, 'Open the pre-use check'),
      `<p style="margin:0;font-size:13px;color:#56666a;word-break:break-all;">${esc(link)}</p>`,
    ].join(''),
  });
  return { subject, text, html };
}
