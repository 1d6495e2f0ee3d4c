import { button, clockTime, esc, facts, heading, oneLine, page, paragraph, shortDay, textFooter, when, type RenderedMail } from './layout';
import { blockedNote, pointItems, pointLines, type MailPoint } from './points';

export type SessionChangeKind = 'moved' | 'points_swapped' | 'room_changed' | 'cancelled' | 'instructor_changed';

export interface SessionChangeInput {
  kind: SessionChangeKind;
  studioName: string;
  timeZone: string;
  appUrl: string;
  recipientName: string;
  className: string;
  roomName: string;
  /** The session as it is now (after the change). */
  startsAt: Date;
  endsAt: Date;
  /** `moved`: the times before the move. */
  previous?: { startsAt: Date; endsAt: Date };
  /** The points booked now, each with its status at the session's start. */
  points?: MailPoint[];
  /** `points_swapped`, `room_changed`: the labels booked before the change. */
  previousPointLabels?: string[];
  /** `room_changed`: the room the class was in before (`roomName` is the new one). */
  previousRoomName?: string;
  /** `cancelled`: the reason reception gave. */
  reason?: string | null;
  /** `instructor_changed`: whether the recipient now teaches the class or no longer does. */
  assignment?: 'assigned' | 'unassigned';
}

const at = (d: Date, tz: string) => `${shortDay(d, tz)} at ${clockTime(d, tz)}`;

/** PRODUCT.md §5: the instructor is told when a session is moved (in time or to another room), has its points swapped, or is cancelled. */
export function sessionChangeMessage(i: SessionChangeInput): RenderedMail {
  const tz = i.timeZone;
  const link = `${i.appUrl}/today`;
  const points = i.points ?? [];
  let subject: string;
  let lead: string;
  switch (i.kind) {
    case 'moved':
      subject = `Moved: ${i.className} is now on ${at(i.startsAt, tz)}${i.previous ? ` (was ${at(i.previous.startsAt, tz)})` : ''}`;
      lead = i.previous ? `Your class ${i.className} has moved from ${when(i.previous.startsAt, tz)} to ${when(i.startsAt, tz)}.` : `Your class ${i.className} has moved to ${when(i.startsAt, tz)}.`;
      break;
    case 'points_swapped':
      subject = `Points changed: ${i.className} on ${at(i.startsAt, tz)}`;
      lead = `The rigging points booked for your class ${i.className} on ${when(i.startsAt, tz)} have changed.`;
      break;
    case 'room_changed':
      subject = `Room changed: ${i.className} on ${at(i.startsAt, tz)} is now in ${i.roomName}`;
      lead = i.previousRoomName
        ? `Your class ${i.className} on ${when(i.startsAt, tz)} has moved from ${i.previousRoomName} to ${i.roomName}, on new rigging points.`
        : `Your class ${i.className} on ${when(i.startsAt, tz)} has moved to ${i.roomName}, on new rigging points.`;
      break;
    case 'cancelled':
      subject = `Cancelled: ${i.className} on ${at(i.startsAt, tz)}`;
      lead = `Your class ${i.className} on ${when(i.startsAt, tz)} in ${i.roomName} is cancelled.`;
      break;
    case 'instructor_changed':
      subject = i.assignment === 'unassigned' ? `You no longer teach ${i.className} on ${at(i.startsAt, tz)}` : `You now teach ${i.className} on ${at(i.startsAt, tz)}`;
      lead =
        i.assignment === 'unassigned'
          ? `${i.className} on ${when(i.startsAt, tz)} has been given to another instructor; you no longer teach it.`
          : `You have been asked to teach ${i.className} on ${when(i.startsAt, tz)} in ${i.roomName}.`;
      break;
  }
  const showPoints = i.kind !== 'cancelled' && !(i.kind === 'instructor_changed' && i.assignment === 'unassigned');
  const rows: Array<[string, string]> = [
    ['Class', i.className],
    ['Room', i.roomName],
    ['Starts', when(i.startsAt, tz)],
    ['Ends', when(i.endsAt, tz)],
  ];
  if (i.kind === 'moved' && i.previous) rows.push(['Was', `${when(i.previous.startsAt, tz)} to ${when(i.previous.endsAt, tz)}`]);
  if (i.kind === 'room_changed' && i.previousRoomName) rows.push(['Room before', i.previousRoomName]);
  if ((i.kind === 'points_swapped' || i.kind === 'room_changed') && i.previousPointLabels) rows.push(['Points before', i.previousPointLabels.join(', ') || 'none']);
  if (i.kind === 'cancelled' && i.reason) rows.push(['Reason', i.reason]);
  const note = showPoints ? blockedNote(points) : null;

  const text = [
    `Hello ${i.recipientName},`,
    '',
    lead,
    '',
    ...rows.map(([k, v]) => `${k}: ${v}`),
    ...(showPoints ? ['', 'Points (status at the start of class):', ...(points.length ? pointLines(points, tz) : ['No points are booked for this class.'])] : []),
    ...(note ? ['', note] : []),
    ...(showPoints ? ['', 'Your Today board and the pre-use checks:', link] : []),
    ...textFooter(i.studioName, showPoints),
  ].join('\n');

  const html = page({
    title: oneLine(subject),
    studioName: i.studioName,
    caution: showPoints,
    body: [
      paragraph(`Hello ${i.recipientName},`),
      paragraph(lead),
      facts(rows),
      showPoints ? heading('Points, at the start of class') + (points.length ? pointItems(points, tz) : paragraph('No points are booked for this class.', { muted: true })) : '',
      note ? paragraph(note) : '',
      showPoints ? button(link, 'Open the Today board') + `<p style="margin:0;font-size:13px;color:#56666a;word-break:break-all;">${esc(link)}</p>` : '',
    ].join(''),
  });
  return { subject: oneLine(subject), text, html };
}
