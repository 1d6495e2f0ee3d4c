import { button, clockTime, esc, facts, heading, itemList, oneLine, page, paragraph, shortDay, textFooter, when, type RenderedMail } from './layout';

export interface AtRiskInput {
  studioName: string;
  timeZone: string;
  appUrl: string;
  className: string;
  roomName: string;
  instructorName: string;
  startsAt: Date;
  endsAt: Date;
  /** Each affected point with the reasons it puts the session at risk. */
  points: Array<{ label: string; reasons: string[] }>;
}

/** PRODUCT.md §5: reception and riggers are told when a booked session turns at risk. */
export function atRiskMessage(i: AtRiskInput): RenderedMail {
  const tz = i.timeZone;
  const link = `${i.appUrl}/schedule`;
  const whenShort = `on ${shortDay(i.startsAt, tz)} at ${clockTime(i.startsAt, tz)}`;
  const subject = oneLine(`At risk: ${i.className} ${whenShort} in ${i.roomName}`);
  const rows: Array<[string, string]> = [
    ['Class', i.className],
    ['Room', i.roomName],
    ['Starts', when(i.startsAt, tz)],
    ['Ends', when(i.endsAt, tz)],
    ['Instructor', i.instructorName],
  ];
  const advice = 'A rigger can resolve the problem or clear the point; reception can move the class to another point (the schedule suggests replacements).';

  const text = [
    `${i.className} ${whenShort} in ${i.roomName} is at risk.`,
    '',
    ...rows.map(([k, v]) => `${k}: ${v}`),
    '',
    'What puts it at risk:',
    ...i.points.flatMap((p) => p.reasons.map((r) => `${p.label}  ${r}`)),
    '',
    advice,
    link,
    ...textFooter(i.studioName, true),
  ].join('\n');

  const html = page({
    title: `At risk: ${i.className} ${whenShort}`,
    studioName: i.studioName,
    caution: true,
    body: [
      paragraph(`A booked class is at risk: one or more of its points will not be usable as things stand.`),
      facts(rows),
      heading('What puts it at risk'),
      itemList(i.points.map((p) => ({ title: p.label, details: p.reasons }))),
      paragraph(advice),
      button(link, 'Open the schedule'),
      `<p style="margin:0;font-size:13px;color:#56666a;word-break:break-all;">${esc(link)}</p>`,
    ].join(''),
  });
  return { subject, text, html };
}
