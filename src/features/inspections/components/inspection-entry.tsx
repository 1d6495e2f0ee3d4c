import { useState } from 'react';
import { Paperclip } from 'lucide-react';
import type { Inspection } from '../../../../shared/schemas/safety';
import { StatusBadge } from '../../../components/ui/status-badge';
import { formatInZone } from '../../../components/ui/zoned-time';
import { kindText } from '../labels';
import { ResultBadge } from './result-badge';

/**
 * What the inspection did to its point, read from the row alone (`cleared`, and the point's status
 * kept when it was signed): the log, the printable log and the CSV say the same.
 */
export function InspectionOutcomeLine({ inspection: i, timeZone }: { inspection: Inspection; timeZone: string }) {
  const s = i.pointStatus;
  if (i.pointId === null || !s) return null;
  const clears = i.kind !== 'pre_use';
  return (
    <div className="space-y-0.5 text-sm" data-testid="inspection-outcome">
      <p className="flex flex-wrap items-center gap-x-2 gap-y-1">
        {clears ? <span>{i.cleared ? `Cleared the point until ${formatInZone(i.clearedUntil, timeZone)}.` : 'Did not clear the point.'}</span> : null}
        <span className="text-muted">Status when signed:</span>
        {s.status ? <StatusBadge status={s.status} /> : <span className="text-muted">not recorded (older entry)</span>}
      </p>
      {s.reasons.length ? (
        <ul className="list-disc pl-6">
          {s.reasons.map((r, n) => <li key={`${r.code}-${n}`}>{r.message}</li>)}
          {!s.recorded ? <li className="text-muted">Other reasons were not recorded at the time.</li> : null}
        </ul>
      ) : null}
    </div>
  );
}

/** One inspection in the log: who, when, what, the outcome, and every item with its note (all of them on paper). */
export function InspectionEntry({ inspection: i, timeZone }: { inspection: Inspection; timeZone: string }) {
  const [open, setOpen] = useState(false);
  const count = (r: string) => i.items.filter((it) => it.result === r).length;
  const flagged = [count('fail') ? `${count('fail')} fail` : '', count('attention') ? `${count('attention')} attention` : ''].filter(Boolean).join(', ');
  const subject = i.pointLabel ? `Point ${i.pointLabel}` : i.gearSerial ? `Gear ${i.gearSerial}` : 'Unknown item';
  return (
    <li className="space-y-1 rounded-lg border print:break-inside-auto border-line bg-white px-3 py-2 print:rounded-none print:border-x-0 print:border-b-0 print:border-t-2 print:border-t-ink print:px-0" data-testid="inspection-entry">
      {/* On paper an inspection may run onto the next page (its table head repeats); its heading never ends a page. */}
      <div className="flex flex-wrap items-center gap-x-3 gap-y-1 break-after-avoid">
        <span className="font-semibold">{subject}</span>
        <span className="text-sm">{kindText[i.kind]}</span>
        <ResultBadge result={i.result} />
        <span className="text-sm text-muted">{formatInZone(i.inspectedAt, timeZone)} · {i.inspector ?? 'former staff member'}</span>
        {i.items.length ? (
          <button type="button" onClick={() => setOpen((o) => !o)} aria-expanded={open} className="no-print ml-auto min-h-11 rounded-lg px-2 text-left text-sm font-medium text-pine-700 hover:bg-pine-50">
            {open ? 'Hide' : 'Show'} {i.items.length} item{i.items.length === 1 ? '' : 's'}
            {flagged ? ` (${flagged})` : ', all pass'}
          </button>
        ) : null}
      </div>
      <InspectionOutcomeLine inspection={i} timeZone={timeZone} />
      {i.notes ? <p className="whitespace-pre-line text-sm">{i.notes}</p> : null}
      {i.photos.length ? (
        <p className="flex flex-wrap items-center gap-x-2 text-sm">
          <Paperclip className="size-4" aria-hidden /> Photos:
          {i.photos.map((p) => <a key={p.id} href={p.url} target="_blank" rel="noopener" className="font-medium text-pine-700 underline">{p.name}</a>)}
        </p>
      ) : null}
      {i.items.length ? (
        <table className={`w-full table-fixed text-left text-sm ${open ? '' : 'hidden print:table'}`}>
          <caption className="sr-only">Items of inspection {i.id}</caption>
          <thead className="text-xs uppercase tracking-wide text-muted">
            <tr><th scope="col" className="w-1/2 py-1 pr-2">Item</th><th scope="col" className="w-28 py-1 pr-2">Result</th><th scope="col" className="py-1">Note</th></tr>
          </thead>
          <tbody>
            {i.items.map((it) => (
              <tr key={it.key} className="border-t border-line align-top">
                <td className="py-1 pr-2">{it.label}</td>
                <td className="py-1 pr-2"><ResultBadge result={it.result} /></td>
                <td className="py-1 [overflow-wrap:anywhere]">{it.note}</td>
              </tr>
            ))}
          </tbody>
        </table>
      ) : null}
    </li>
  );
}
