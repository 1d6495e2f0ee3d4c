import { facts, oneLine, page, paragraph, shortDay, clockTime, textFooter, timeRange, type RenderedMail } from './layout';

/** The four messages a booked student gets (PRODUCT.md §11): booked or waitlisted, a place offered, class moved, class cancelled. */
export type StudentMailKind = 'booking_confirmed' | 'waitlist_place_offered' | 'class_moved_student' | 'class_cancelled_student';

export interface StudentMailInput {
  kind: StudentMailKind;
  studioName: string;
  timeZone: string;
  studentName: string;
  className: string;
  roomName: string;
  startsAt: Date | string;
  endsAt: Date | string;
  /** booking_confirmed: waitlisted rather than booked, with the position. */
  waitlistPosition?: number | null;
  /** class_moved_student: the time and room it moved from. */
  previous?: { startsAt: Date | string; endsAt: Date | string; roomName: string };
  reason?: string | null;
}

/** One message to one student; plain words, no staff detail (no points' status, no other students). */
export function studentMessage(i: StudentMailInput): RenderedMail {
  const tz = i.timeZone;
  const whenShort = `${shortDay(i.startsAt, tz)} at ${clockTime(i.startsAt, tz)}`;
  const rows: Array<[string, string]> = [
    ['Class', i.className],
    ['When', timeRange(i.startsAt, i.endsAt, tz)],
    ['Room', i.roomName],
  ];
  let subject: string;
  let lines: string[];
  switch (i.kind) {
    case 'booking_confirmed':
      if (i.waitlistPosition) {
        subject = `Waitlisted: ${i.className} ${whenShort}`;
        lines = [`The class is full, so you are on its waitlist (number ${i.waitlistPosition}). If a place frees up it goes to the first person on the list, and we will e-mail you.`];
      } else {
        subject = `Booked: ${i.className} ${whenShort}`;
        lines = ['You have a place in this class.'];
      }
      break;
    case 'waitlist_place_offered':
      subject = `A place for you: ${i.className} ${whenShort}`;
      lines = ['A place came free and it is yours: you are now booked into this class. If you can no longer come, please cancel so the next person can have it.'];
      break;
    case 'class_moved_student':
      subject = `Class moved: ${i.className} now ${whenShort}`;
      lines = [
        `Your class has moved${i.previous ? ` from ${timeRange(i.previous.startsAt, i.previous.endsAt, tz)}${i.previous.roomName !== i.roomName ? ` in ${i.previous.roomName}` : ''}` : ''}. Your place is kept at the new time.`,
      ];
      break;
    case 'class_cancelled_student':
      subject = `Class cancelled: ${i.className} ${whenShort}`;
      lines = [`This class is cancelled${i.reason ? `: ${i.reason}` : ''}. Sorry for the change.`];
      break;
  }
  const greeting = `Hello ${i.studentName},`;
  const text = [greeting, '', ...lines, '', ...rows.map(([k, v]) => `${k}: ${v}`), ...textFooter(i.studioName)].join('\n');
  const html = page({ title: subject, studioName: i.studioName, body: [paragraph(greeting), ...lines.map((l) => paragraph(l)), facts(rows)].join('') });
  return { subject: oneLine(subject), text, html };
}
