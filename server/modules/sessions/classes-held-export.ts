import type { Writable } from 'node:stream';
import { formatStudioDateTime } from '../../../shared/clearance';
import { formulaSafeRow } from '../../../shared/records/csv-safe';
import { esc, streamCsvWithTrailer, type ExportMeta } from '../../http/export-stream';
import type { ClassHeldRecord } from './session-records';

/**
 * "Classes held" (PRODUCT.md §10): each booked point of each class as it stood when the class
 * started, from `session_records` only, never today's status. A CSV of its own (its columns are
 * not an inspection's) and a section of the printable log, after the inspections.
 */

const statusText: Record<ClassHeldRecord['status'], string> = {
  cleared: 'cleared',
  expiring: 'expiring',
  blocked: 'blocked',
  not_recorded: 'not recorded (class began before records were kept)',
};

export const HELD_COLUMNS = (timeZone: string) => [
  `class start (${timeZone})`,
  'class start (ISO, UTC)',
  'class',
  'room',
  'instructor',
  'cancelled',
  'point',
  'status at start',
  'reasons at start',
  'cleared until (at start)',
  'apparatus kind',
  'apparatus serial',
  `recorded at (${timeZone})`,
];

/** One CSV line per booked point of a class, every cell formula-safe. */
export function heldCsvRow(r: ClassHeldRecord, timeZone: string): string[] {
  const when = (iso: string | null) => (iso ? formatStudioDateTime(new Date(iso), timeZone) : '');
  return formulaSafeRow([
    when(r.startsAt),
    new Date(r.startsAt).toISOString(),
    r.className,
    r.roomName,
    r.instructorName,
    r.cancelled ? 'yes' : 'no',
    r.label,
    statusText[r.status],
    r.reasons.map((x) => x.message).join('; '),
    r.status === 'cleared' || r.status === 'expiring' ? when(r.clearedUntil) : '',
    r.apparatus?.kind ?? '',
    r.apparatus?.serial ?? '',
    when(r.recordedAt),
  ]);
}

/** Streams the classes-held CSV; the last row is the chain-head trailer, as on the inspection CSV. */
export function streamHeldCsv(out: Writable, batches: AsyncIterable<ClassHeldRecord[]>, meta: ExportMeta): Promise<number> {
  return streamCsvWithTrailer(out, batches, meta, { columns: HELD_COLUMNS(meta.timeZone), rowsOf: (r) => [heldCsvRow(r, meta.timeZone)], noun: 'class point records' });
}

export const HELD_CSS = `
section.held { margin-top: 1.5rem; }
section.held > h2 { font-size: 13pt; margin: 0 0 .2rem; break-after: avoid; page-break-after: avoid; }
.class { border-top: 1.5pt solid #000; padding: .45rem 0 .6rem; break-inside: avoid; page-break-inside: avoid; }
.class h3 { font-size: 11pt; margin: 0; display: flex; flex-wrap: wrap; gap: .2rem .9rem; align-items: baseline; }

.class h3 .when { font-weight: 400; font-size: 9.5pt; }
.class .cancelled { font-weight: 700; text-transform: uppercase; letter-spacing: .03em; }
table.held-points th:nth-child(1) { width: 5rem; } table.held-points th:nth-child(2) { width: 9rem; } table.held-points th:nth-child(4) { width: 9rem; }
`;

/**
 * The printable section, streamed: records arrive newest class first with a class's points
 * together, possibly split across batches, so a class's article is opened when its first point
 * arrives and closed when the next class (or the end) does.
 */
export async function* heldSection(batches: AsyncIterable<ClassHeldRecord[]>, meta: ExportMeta, counts: { records: number; classes: number }): AsyncGenerator<string> {
  const when = (iso: string | null) => (iso ? formatStudioDateTime(new Date(iso), meta.timeZone) : '');
  yield `<section class="held" aria-labelledby="held-title" data-testid="classes-held"><h2 id="held-title">Classes held</h2><p class="meta">${esc(meta.scope)}, newest first: each booked point as it stood when the class started, as recorded then; never today’s status.</p>`;
  let open: number | null = null;
  const close = '</tbody></table></div>';
  for await (const batch of batches) {
    let html = '';
    for (const r of batch) {
      if (open !== r.sessionId) {
        if (open !== null) html += close;
        open = r.sessionId;
        counts.classes += 1;
        html += `<div class="class" data-session="${r.sessionId}"><h3><span>${esc(r.className)}</span><span>${esc(r.roomName)}</span><span class="when">${esc(when(r.startsAt))} (${esc(new Date(r.startsAt).toISOString())}) · ${esc(r.instructorName)}</span>${r.cancelled ? '<span class="cancelled">Cancelled</span>' : ''}</h3>`;
        html += `<table class="held-points"><thead><tr><th scope="col">Point</th><th scope="col">Status at start</th><th scope="col">Reasons at start</th><th scope="col">Apparatus that hung</th><th scope="col">Recorded at</th></tr></thead><tbody>`;
      }
      counts.records += 1;
      const flag = r.status === 'blocked' ? ' class="flag"' : '';
      const until = (r.status === 'cleared' || r.status === 'expiring') && r.clearedUntil ? `<br>until ${esc(when(r.clearedUntil))}` : '';
      html += `<tr><td>${esc(r.label)}</td><td${flag}>${esc(statusText[r.status])}${until}</td><td>${esc(r.reasons.map((x) => x.message).join('; '))}</td><td>${r.apparatus ? `${esc(r.apparatus.kind)} ${esc(r.apparatus.serial)}` : 'none recorded'}</td><td>${esc(when(r.recordedAt))}</td></tr>`;
    }
    yield html;
  }
  yield `${open !== null ? close : '<p>No classes held in this range.</p>'}</section>`;
}
