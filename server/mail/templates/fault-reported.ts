import { button, esc, facts, oneLine, page, paragraph, textFooter, when, type RenderedMail } from './layout';

export interface FaultReportedInput {
  studioName: string;
  timeZone: string;
  appUrl: string;
  faultId: number;
  pointLabel: string | null;
  roomName: string | null;
  gearSerial: string | null;
  severity: string;
  description: string;
  reportedBy: string;
  reportedAt: Date;
  /** Why the riggers hear of it directly: no booked class to raise an alert, or high severity. */
  why: 'no_booked_class' | 'high_severity';
}

/** A fault told to the riggers at once (JOURNEYS.md Instructor 3: "the rigger hears about it"). */
export function faultReportedMessage(i: FaultReportedInput): RenderedMail {
  const where = i.pointLabel ? `point ${i.pointLabel}${i.roomName ? ` (${i.roomName})` : ''}` : `gear ${i.gearSerial ?? ''}`.trim();
  const subject = oneLine(`Fault${i.severity === 'high' ? ' (high severity)' : ''} on ${where}: ${i.description}`).slice(0, 280);
  const link = `${i.appUrl}/faults`;
  const rows: Array<[string, string]> = [
    ['Where', where],
    ...(i.gearSerial && i.pointLabel ? ([['Gear', i.gearSerial]] as Array<[string, string]>) : []),
    ['Severity', i.severity],
    ['What was seen', i.description],
    ['Reported by', i.reportedBy],
    ['Reported', when(i.reportedAt, i.timeZone)],
  ];
  const note =
    i.why === 'no_booked_class'
      ? 'No booked class uses this point, so no at-risk alert will follow: this is the only notice.'
      : 'A high-severity fault is always sent to the riggers; reception hears of any booked class it puts at risk.';
  const lead = `The ${where} is blocked until a rigger resolves the fault and clears it again.`;
  const text = [lead, '', ...rows.map(([k, v]) => `${k}: ${v}`), '', note, link, ...textFooter(i.studioName, true)].join('\n');
  const html = page({
    title: subject,
    studioName: i.studioName,
    caution: true,
    body: [paragraph(lead), facts(rows), paragraph(note), button(link, 'Open the faults'), `<p style="margin:0;font-size:13px;color:#56666a;word-break:break-all;">${esc(link)}</p>`].join(''),
  });
  return { subject, text, html };
}
