import { useState } from 'react';
import type { Inspection } from '../../../../shared/schemas/safety';
import { formatInZone } from '../../../components/ui/zoned-time';
import { kindText } from '../labels';
import { ResultBadge } from './result-badge';

/** One inspection in the log: who, when, what, the result, and every item with its note. */
export function InspectionEntry({ inspection: i, timeZone, expanded = false }: { inspection: Inspection; timeZone: string; expanded?: boolean }) {
  const [open, setOpen] = useState(false);
  const showItems = expanded || open;
  const count = (r: string) => i.items.filter((it) => it.result === r).length;
  const flagged = [count('fail') ? `${count('fail')} fail` : '', count('attention') ? `${count('attention')} attention` : ''].filter(Boolean).join(', ');
  const subject = i.pointLabel ? `Point ${i.pointLabel}` : i.gearSerial ? `Gear ${i.gearSerial}` : 'Unknown item';
  return (
    <li className="break-inside-avoid space-y-1 rounded-lg border border-line bg-white px-3 py-2 print:rounded-none print:border-x-0 print:border-t-0">
      <div className="flex flex-wrap items-center gap-x-3 gap-y-1">
        <span className="font-semibold">{subject}</span>
        <span className="text-sm">{kindText[i.kind]}</span>
        <ResultBadge result={i.result} />
        <span className="text-sm text-muted">{formatInZone(i.inspectedAt, timeZone)} · {i.inspector ?? 'former staff member'}</span>
        {i.items.length && !expanded ? (
          <button type="button" onClick={() => setOpen((o) => !o)} aria-expanded={open} className="no-print ml-auto min-h-11 rounded-lg px-2 text-left text-sm font-medium text-pine-700 hover:bg-pine-50">
            {open ? 'Hide' : 'Show'} {i.items.length} item{i.items.length === 1 ? '' : 's'}
            {flagged ? ` (${flagged})` : ', all pass'}
          </button>
        ) : null}
      </div>
      {i.kind === 'periodic' && i.pointId !== null ? (
        <p className="text-sm">{i.cleared ? `Cleared the point until ${formatInZone(i.clearedUntil, timeZone)}.` : 'Did not clear the point.'}</p>
      ) : null}
      {i.notes ? <p className="whitespace-pre-line text-sm">{i.notes}</p> : null}
      {showItems && i.items.length ? (
        <table className="w-full text-left text-sm">
          <caption className="sr-only">Items of inspection {i.id}</caption>
          <thead className="text-xs uppercase tracking-wide text-muted">
            <tr><th scope="col" className="py-1 pr-2">Item</th><th scope="col" className="py-1 pr-2">Result</th><th scope="col" className="py-1">Note</th></tr>
          </thead>
          <tbody>
            {i.items.map((it) => (
              <tr key={it.key} className="border-t border-line align-top">
                <td className="py-1 pr-2">{it.label}</td>
                <td className="py-1 pr-2"><ResultBadge result={it.result} /></td>
                <td className="py-1">{it.note}</td>
              </tr>
            ))}
          </tbody>
        </table>
      ) : null}
    </li>
  );
}
