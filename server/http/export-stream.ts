import { Readable, type Writable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { stringify } from 'csv-stringify';
import { formatStudioDateTime } from '../../shared/clearance';
import { formulaSafeRow } from '../../shared/records/csv-safe';

/*
 * What the record exports (inspection log, classes held) share: the foot every export carries
 * (PRODUCT.md §10), streaming with backpressure, and the CSV's chain-head trailer row.
 */

/** What the foot of every export carries (PRODUCT.md §10). */
export interface ExportMeta {
  studioName: string;
  timeZone: string;
  exportedAt: Date;
  /** The audit chain's head when the export began: `count:hash`. */
  head: { count: number; hash: string };
  /** The filters in words, e.g. "periodic inspections of point LS-1 from 1 Nov 2026". */
  scope: string;
}

export const CHAIN_HEAD_LABEL = '# audit chain head';

export const esc = (v: string) => v.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

/** A client that goes away mid-download ends the export quietly; any other failure is reported. */
export async function pipeTo(out: Writable, source: Readable, through?: NodeJS.ReadWriteStream): Promise<void> {
  try {
    await (through ? pipeline(source, through, out) : pipeline(source, out));
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code !== 'ERR_STREAM_PREMATURE_CLOSE') throw err;
  }
}

/**
 * Streams a CSV: rows are written as each batch arrives, with backpressure from the client, so
 * memory holds one batch whatever the range. The last row is the trailer: `# audit chain head`,
 * `count:hash`, how many records (`noun`) and the export's time, padded to the header's width so a
 * spreadsheet opens it as one more row. Returns the number of records.
 */
export async function streamCsvWithTrailer<T>(
  out: Writable,
  batches: AsyncIterable<T[]>,
  meta: ExportMeta,
  o: { columns: string[]; rowsOf: (record: T) => Iterable<string[]>; noun: string },
): Promise<number> {
  let count = 0;
  async function* rows() {
    for await (const batch of batches) {
      for (const r of batch) {
        count += 1;
        yield* o.rowsOf(r);
      }
    }
    const trailer = formulaSafeRow([CHAIN_HEAD_LABEL, `${meta.head.count}:${meta.head.hash}`, `${count} ${o.noun}`, `exported ${formatStudioDateTime(meta.exportedAt, meta.timeZone)}`]);
    yield [...trailer, ...Array<string>(o.columns.length - trailer.length).fill('')];
  }
  await pipeTo(out, Readable.from(rows()), stringify({ header: true, columns: o.columns, record_delimiter: 'windows' }));
  return count;
}
