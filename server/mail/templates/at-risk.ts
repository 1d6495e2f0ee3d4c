import { button, clockTime, esc, facts, heading, itemList, oneLine, page, paragraph, shortDay, textFooter, when, type RenderedMail } from './layout';

export interface AtRiskClass {
  className: string;
  roomName: string;
  instructorName: string;
  startsAt: Date;
  endsAt: Date;
}

export interface AtRiskInput {
  studioName: string;
  timeZone: string;
  appUrl: string;
  /** The classes at risk for this one cause, earliest first (one, or every date of a series …). */
  classes: AtRiskClass[];
  /** Each affected point with the reasons it puts the classes at risk. */
  points: Array<{ label: string; reasons: string[] }>;
  /** Booked students whose point cannot take their class (PRODUCT.md §11), to be moved or told. */
  students?: Array<{ name: string; pointLabel: string | null; when: string }>;
}

const studentLine = (st: { name: string; pointLabel: string | null; when: string }) => `${st.name} (${st.pointLabel ? `on ${st.pointLabel}` : 'no point'}), ${st.when}`;
/** The students without a fit place, for the plain text: a heading and one line each; nothing when there are none. */
const studentsText = (i: AtRiskInput) => (i.students?.length ? ['', 'Students without a fit place (move them to a free place or swap the point):', ...i.students.map(studentLine)] : []);
const studentsHtml = (i: AtRiskInput) =>
  i.students?.length ? [heading('Students without a fit place'), paragraph('Move each to a free place, or swap the point: students move with it.'), itemList(i.students.map((st) => ({ title: st.name, details: [`${st.pointLabel ? `On ${st.pointLabel}` : 'No point'}, ${st.when}`] })))].join('') : '';

/** PRODUCT.md §5: reception and riggers are told when a booked session turns at risk; one message per cause. */
export function atRiskMessage(input: AtRiskInput): RenderedMail {
  if (input.classes.length > 1) return manyAtRisk(input);
  const [c] = input.classes;
  const i = { ...input, ...c };
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
    ...studentsText(i),
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
      studentsHtml(i),
      paragraph(advice),
      button(link, 'Open the schedule'),
      `<p style="margin:0;font-size:13px;color:#56666a;word-break:break-all;">${esc(link)}</p>`,
    ].join(''),
  });
  return { subject, text, html };
}

/** Several classes at risk for one cause: the dates listed, the cause once. */
function manyAtRisk(i: AtRiskInput): RenderedMail {
  const tz = i.timeZone;
  const link = `${i.appUrl}/schedule`;
  const [first] = i.classes;
  const n = i.classes.length;
  const sameClass = i.classes.every((c) => c.className === first.className && c.roomName === first.roomName);
  const subject = oneLine(sameClass ? `At risk: ${first.className} in ${first.roomName}, ${n} classes from ${shortDay(first.startsAt, tz)}` : `At risk: ${n} classes from ${shortDay(first.startsAt, tz)}`);
  const line = (c: AtRiskClass) => `${shortDay(c.startsAt, tz)} ${clockTime(c.startsAt, tz)}–${clockTime(c.endsAt, tz)}  ${c.className}, ${c.roomName}, ${c.instructorName}`;
  const advice = 'A rigger can resolve the problem or clear the point; reception can move the classes to another point (the schedule suggests replacements, for this and the following classes).';
  const text = [
    `${n} booked classes are at risk for the same reason.`,
    '',
    'Classes:',
    ...i.classes.map(line),
    '',
    'What puts them at risk:',
    ...i.points.flatMap((p) => p.reasons.map((r) => `${p.label}  ${r}`)),
    ...studentsText(i),
    '',
    advice,
    link,
    ...textFooter(i.studioName, true),
  ].join('\n');
  const html = page({
    title: subject,
    studioName: i.studioName,
    caution: true,
    body: [
      paragraph(`${n} booked classes are at risk for the same reason: one or more of their points will not be usable as things stand.`),
      heading('Classes'),
      itemList(i.classes.map((c) => ({ title: `${shortDay(c.startsAt, tz)} ${clockTime(c.startsAt, tz)}–${clockTime(c.endsAt, tz)}`, details: [`${c.className}, ${c.roomName}, ${c.instructorName}`] }))),
      heading('What puts them at risk'),
      itemList(i.points.map((p) => ({ title: p.label, details: p.reasons }))),
      studentsHtml(i),
      paragraph(advice),
      button(link, 'Open the schedule'),
      `<p style="margin:0;font-size:13px;color:#56666a;word-break:break-all;">${esc(link)}</p>`,
    ].join(''),
  });
  return { subject, text, html };
}
