import { Readable, type Writable } from 'node:stream';
import type { Inspection } from '../../../shared/schemas/safety';
import { formatStudioDateTime } from '../../../shared/clearance';
import { formulaSafeRow } from '../../../shared/records/csv-safe';
import { HELD_CSS, heldSection } from '../sessions/classes-held-export';
import { esc, pipeTo, streamCsvWithTrailer, type ExportMeta } from '../../http/export-stream';
import type { ClassHeldRecord } from '../sessions/session-records';


const kindWord: Record<Inspection['kind'], string> = { pre_use: 'pre-use', periodic: 'periodic', after_incident: 'after-incident' };
const subjectOf = (i: Inspection) => (i.pointLabel ? `point ${i.pointLabel}` : i.gearSerial ? `gear ${i.gearSerial}` : 'an item no longer in the register');

/** The point's status when signed, in words; never today's status. */
export function statusWords(i: Inspection): { status: string; why: string } {
  const s = i.pointStatus;
  if (!s) return { status: '', why: '' };
  const why = s.reasons.map((r) => r.message).join('; ');
  if (s.status) return { status: s.status, why: s.recorded ? why : `${why}${why ? '; ' : ''}other reasons not recorded at the time` };
  return { status: 'not recorded', why: i.clearanceSigned ? 'a clearance was signed; the point’s status at the time was not recorded' : '' };
}

export const CSV_COLUMNS = (timeZone: string) => [
  'inspection',
  `inspected at (${timeZone})`,
  'kind',
  'point',
  'gear serial',
  'inspector',
  'result',
  'cleared',
  'cleared until',
  'point status when signed',
  'why',
  'notes',
  'photos',
  'item',
  'item result',
  'item note',
];

/** The CSV lines of one inspection: one per checklist item (or one alone), every cell formula-safe. */
export function csvRows(i: Inspection, timeZone: string): string[][] {
  const when = (iso: string | null) => (iso ? formatStudioDateTime(new Date(iso), timeZone) : '');
  const { status, why } = statusWords(i);
  const base = [
    String(i.id),
    when(i.inspectedAt),
    kindWord[i.kind],
    i.pointLabel ?? '',
    i.gearSerial ?? '',
    i.inspector ?? '',
    i.result,
    i.cleared ? 'yes' : 'no',
    i.cleared ? when(i.clearedUntil) : '',
    status,
    why,
    i.notes,
    i.photos.map((p) => p.name).join('; '),
  ];
  const lines = i.items.length ? i.items.map((it) => [...base, it.label, it.result, it.note]) : [[...base, '', '', '']];
  return lines.map(formulaSafeRow);
}

/** Streams the inspection CSV with its chain-head trailer (server/http/export-stream.ts). */
export function streamCsv(out: Writable, batches: AsyncIterable<Inspection[]>, meta: ExportMeta): Promise<number> {
  return streamCsvWithTrailer(out, batches, meta, { columns: CSV_COLUMNS(meta.timeZone), rowsOf: (i) => csvRows(i, meta.timeZone), noun: 'inspections' });
}

const PRINT_CSS = `
@font-face { font-family: Lexend; font-style: normal; font-weight: 400; font-display: swap; src: url('/fonts/lexend-latin-400-normal.woff2') format('woff2'); }
@font-face { font-family: Lexend; font-style: normal; font-weight: 700; font-display: swap; src: url('/fonts/lexend-latin-700-normal.woff2') format('woff2'); }
:root { color: #111; background: #fff; font-family: Lexend, "Segoe UI", system-ui, sans-serif; font-size: 10.5pt; line-height: 1.35; }
body { margin: 0 auto; max-width: 52rem; padding: 1.5rem; }
h1 { font-size: 16pt; margin: 0 0 .25rem; }
.meta, .foot { font-size: 9pt; }
.caution { border: 1px solid #555; padding: .4rem .6rem; font-size: 8.5pt; margin: .6rem 0 1rem; }
.toolbar { display: flex; gap: .75rem; align-items: center; margin: .75rem 0; font-size: 10pt; }
.toolbar button { white-space: nowrap; font: inherit; min-height: 2.75rem; padding: 0 1rem; border: 1px solid #333; border-radius: .4rem; background: #fff; cursor: pointer; }
article { border-top: 1.5pt solid #000; padding: .45rem 0 .6rem; break-inside: avoid; page-break-inside: avoid; }
article h2 { font-size: 11pt; margin: 0; display: flex; flex-wrap: wrap; gap: .2rem .9rem; align-items: baseline; }
article h2 .when { font-weight: 400; font-size: 9.5pt; }
.outcome { margin: .2rem 0; }
.outcome strong { text-transform: uppercase; letter-spacing: .03em; }
.outcome strong.status { text-transform: none; letter-spacing: 0; }
.why { margin: .1rem 0 .2rem 1rem; padding: 0; }
.notes { white-space: pre-line; margin: .2rem 0; }
table { width: 100%; table-layout: fixed; border-collapse: collapse; margin-top: .3rem; font-size: 9pt; }
th, td { text-align: left; vertical-align: top; padding: .15rem .4rem .15rem 0; border-bottom: .5pt solid #888; }
th { font-size: 8pt; text-transform: uppercase; letter-spacing: .04em; border-bottom: 1pt solid #000; }
th:nth-child(1) { width: 55%; } th:nth-child(2) { width: 6.5rem; }
td { overflow-wrap: anywhere; }
td.res { white-space: nowrap; }
.flag { font-weight: 700; }
.photos { font-size: 9pt; margin: .2rem 0 0; }
.foot { border-top: 1.5pt solid #000; margin-top: 1rem; padding-top: .4rem; }
.foot code { font-size: 8pt; word-break: break-all; }
.pageno { display: none; }
@page { size: auto; margin: 14mm 14mm 16mm; @bottom-right { content: "Page " counter(page) " of " counter(pages); font: 8pt Lexend, system-ui, sans-serif; } }
@media print {
  body { max-width: none; padding: 0; }
  .toolbar { display: none; }
  a { color: inherit; text-decoration: none; }
}
`;

/** The printable log: one page of HTML, streamed entry by entry, for the browser to print. */
export async function streamPrintable(out: Writable, batches: AsyncIterable<Inspection[]>, meta: ExportMeta, held?: { batches: AsyncIterable<ClassHeldRecord[]>; scope: string }): Promise<number> {
  let count = 0;
  const heldCounts = { records: 0, classes: 0 };
  async function* chunks() {
    yield printableHead(meta);
    for await (const batch of batches) {
      count += batch.length;
      yield batch.map((i) => printableEntry(i, meta.timeZone)).join('');
    }
    if (count === 0) yield '<p>No inspections match.</p>';
    // The classes held in the same range follow the inspections, under the same chain head.
    if (held) yield* heldSection(held.batches, { ...meta, scope: held.scope }, heldCounts);
    yield printableFoot(count, meta, held ? heldCounts : null);
  }
  await pipeTo(out, Readable.from(chunks()));
  return count;
}

function printableHead(meta: ExportMeta): string {
  const title = `${meta.studioName}: inspection log`;
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>${esc(title)}</title><style>${PRINT_CSS}${HELD_CSS}</style><script src="/print-log.js" defer></script></head><body>
<header><h1>${esc(title)}</h1>
<p class="meta">${esc(meta.scope)}, newest first. Times in ${esc(meta.timeZone.replace(/_/g, ' '))}. Printed ${esc(formatStudioDateTime(meta.exportedAt, meta.timeZone))}.</p>
<p class="caution"><strong>Caution.</strong> Figures come from the ratings entered and the rules configured. They do not replace inspection by a qualified rigger, the maker’s instructions, an engineer’s assessment of the structure, or local codes and licensed practice.</p>
<div class="toolbar"><button type="button" data-print>Print this log</button><span>Every matching inspection, and the classes held in the same range, are on this page; page numbers and the audit chain head print with it.</span></div>
</header><main>`;
}

function printableEntry(i: Inspection, timeZone: string): string {
  const when = (iso: string | null) => (iso ? formatStudioDateTime(new Date(iso), timeZone) : '');
  const s = i.pointStatus;
  // The status word as recorded when signed; an older row without one says so once, plainly.
  const statusText = s?.status ? `<strong class="status">${esc(s.status)}</strong>` : 'not recorded (older entry)';
  const outcome =
    i.pointId === null
      ? `<p class="outcome">Gear inspected on its own: it clears no point.</p>`
      : i.kind === 'pre_use'
        ? `<p class="outcome">Pre-use check (clears nothing). Point status when signed: ${statusText}.</p>`
        : i.cleared
          ? `<p class="outcome"><strong>Cleared</strong> the point until ${esc(when(i.clearedUntil))}. Status when signed: ${statusText}.</p>`
          : `<p class="outcome"><strong>Did not clear</strong> the point. Status when signed: ${statusText}.</p>`;
  const reasons = s?.reasons.length ? `<ul class="why">${s.reasons.map((r) => `<li>${esc(r.message)}</li>`).join('')}${s.recorded ? '' : '<li>Other reasons were not recorded at the time.</li>'}</ul>` : '';
  const items = i.items.length
    ? `<table><thead><tr><th scope="col">Item</th><th scope="col">Result</th><th scope="col">Note</th></tr></thead><tbody>${i.items
        .map((it) => `<tr><td>${esc(it.label)}</td><td class="res${it.result === 'pass' ? '' : ' flag'}">${it.result === 'fail' ? 'FAIL' : it.result === 'attention' ? 'ATTENTION' : 'pass'}</td><td>${esc(it.note)}</td></tr>`)
        .join('')}</tbody></table>`
    : '';
  const photos = i.photos.length ? `<p class="photos">Photos: ${i.photos.map((p) => esc(p.name)).join(', ')}</p>` : '';
  const subject = subjectOf(i).replace(/^./, (c) => c.toUpperCase());
  return `<article data-inspection="${i.id}"><h2><span>#${i.id} · ${esc(subject)}</span><span>${esc(kindWord[i.kind])}</span><span>Result: ${i.result === 'pass' ? 'pass' : i.result.toUpperCase()}</span><span class="when">${esc(when(i.inspectedAt))} · ${esc(i.inspector ?? 'former staff member')}</span></h2>${outcome}${reasons}${i.notes ? `<p class="notes">Notes: ${esc(i.notes)}</p>` : ''}${items}${photos}</article>`;
}

function printableFoot(count: number, meta: ExportMeta, held: { records: number; classes: number } | null): string {
  const heldText = held ? ` ${held.classes} class${held.classes === 1 ? '' : 'es'} held (${held.records} booked point${held.records === 1 ? '' : 's'}).` : '';
  return `</main><footer class="foot" data-testid="chain-head"><p>${count} inspection${count === 1 ? '' : 's'} in this log.${heldText} End of log.</p><p>Audit chain head when printed: <code>${meta.head.count}:${esc(meta.head.hash)}</code><br>The owner can check that this head is still in the studio’s audit chain (Audit → Verify the audit chain).</p></footer></body></html>`;
}
