import { useEffect, useId, useState } from 'react';
import { flushSync } from 'react-dom';
import { keepPreviousData, useQuery } from '@tanstack/react-query';
import { Download, Printer } from 'lucide-react';
import { Button } from '../../../components/ui/button';
import { SelectField, TextField } from '../../../components/ui/field';
import { EmptyState, ErrorState, Loading } from '../../../components/ui/states';
import { formatInZone } from '../../../components/ui/zoned-time';
import { exportCsvHref, inspectionQueries, type InspectionKind, type LogFilters } from '../api';
import { kindText } from '../labels';
import { InspectionEntry } from './inspection-entry';

const kinds = Object.keys(kindText) as InspectionKind[];
const PAGE = 25;

/** The inspection log with its filters, a CSV of the same rows, and a printable view for the insurer or the venue. */
export function InspectionLog({ timeZone, canExport }: { timeZone: string; canExport: boolean }) {
  const [filters, setFilters] = useState<LogFilters>({});
  const [shown, setShown] = useState(PAGE);
  const [printing, setPrinting] = useState(false);
  // The printed log holds every matching row with every item, whatever the screen shows (the Print button or the browser's own).
  useEffect(() => {
    const before = () => flushSync(() => setPrinting(true));
    const after = () => setPrinting(false);
    window.addEventListener('beforeprint', before);
    window.addEventListener('afterprint', after);
    return () => {
      window.removeEventListener('beforeprint', before);
      window.removeEventListener('afterprint', after);
    };
  }, []);
  const badRange = !!(filters.from && filters.to && filters.from > filters.to);
  const log = useQuery({ ...inspectionQueries.log(badRange ? { ...filters, to: undefined } : filters, timeZone), placeholderData: keepPreviousData });
  const points = useQuery(inspectionQueries.points());
  const hid = useId();
  const set = (patch: Partial<LogFilters>) => { setFilters((f) => ({ ...f, ...patch })); setShown(PAGE); };
  const pointLabel = points.data?.find((p) => p.id === filters.pointId)?.label;
  const filtered = !!(filters.from || filters.to || filters.kind || filters.pointId);
  const summary = [
    filters.kind ? `${kindText[filters.kind].toLowerCase()} inspections` : 'inspections',
    pointLabel ? `of point ${pointLabel}` : '',
    filters.from ? `from ${formatInZone(filters.from, timeZone, 'day')}` : '',
    filters.to ? `to ${formatInZone(filters.to, timeZone, 'day')}` : '',
  ].filter(Boolean).join(' ');

  return (
    <section aria-labelledby={hid} className="space-y-4" data-testid="inspection-log">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h2 id={hid} className="text-xl font-semibold">Inspection log</h2>
          <p className="text-sm text-muted">{filtered ? `Showing ${summary}, newest first.` : 'Showing every inspection, newest first.'} Times in {timeZone.replace(/_/g, ' ')}.</p>
        </div>
        <div className="no-print flex flex-wrap gap-2">
          {canExport ? (
            <a href={exportCsvHref(badRange ? { ...filters, to: undefined } : filters, timeZone)} download className="inline-flex min-h-11 items-center gap-2 rounded-lg border border-line bg-white px-4 text-sm font-medium hover:bg-pine-50">
              <Download className="size-4" aria-hidden /> Download CSV
            </a>
          ) : null}
          <Button variant="secondary" onClick={() => window.print()}><Printer className="size-4" aria-hidden /> Print</Button>
        </div>
      </div>
      <form className="no-print grid gap-3 rounded-xl border border-line bg-white p-4 sm:grid-cols-2 lg:grid-cols-4" onSubmit={(e) => e.preventDefault()} aria-label="Filter the log">
        <TextField label="From" type="date" value={filters.from ?? ''} onChange={(e) => set({ from: e.target.value || undefined })} />
        <TextField label="To" type="date" value={filters.to ?? ''} min={filters.from} onChange={(e) => set({ to: e.target.value || undefined })} error={badRange ? 'The end comes before the start' : undefined} />
        <SelectField label="Kind" value={filters.kind ?? ''} onChange={(e) => set({ kind: (e.target.value || undefined) as InspectionKind | undefined })}>
          <option value="">All kinds</option>
          {kinds.map((k) => <option key={k} value={k}>{kindText[k]}</option>)}
        </SelectField>
        <SelectField label="Point" value={filters.pointId ?? ''} onChange={(e) => set({ pointId: e.target.value ? Number(e.target.value) : undefined })}>
          <option value="">All points</option>
          {points.data?.map((p) => <option key={p.id} value={p.id}>{p.label} — {p.roomName}</option>)}
        </SelectField>
        {filtered ? <div className="sm:col-span-2 lg:col-span-4"><Button type="button" variant="ghost" onClick={() => { setFilters({}); setShown(PAGE); }}>Clear the filters</Button></div> : null}
      </form>
      {log.isPending ? <Loading label="Loading the log…" /> : log.isError ? <ErrorState error={log.error} retry={() => log.refetch()} /> : log.data.length === 0 ? (
        <EmptyState title="No inspections match">{filtered ? 'Try a wider date range or another kind.' : 'Inspections appear here once a rigger or an instructor records one.'}</EmptyState>
      ) : (
        <>
          <p className="text-sm text-muted" aria-live="polite">{log.data.length} inspection{log.data.length === 1 ? '' : 's'}{log.data.length > shown ? `, the newest ${shown} shown (Print includes all)` : ''}{log.isFetching ? ' · updating…' : ''}</p>
          <ol className="space-y-2 print:space-y-0">
            {(printing ? log.data : log.data.slice(0, shown)).map((i) => <InspectionEntry key={i.id} inspection={i} timeZone={timeZone} expanded={printing} />)}
          </ol>
          {!printing && log.data.length > shown ? (
            <Button type="button" variant="secondary" className="no-print" onClick={() => setShown((n) => n + PAGE * 2)}>Show {Math.min(PAGE * 2, log.data.length - shown)} more of {log.data.length - shown}</Button>
          ) : null}
        </>
      )}
    </section>
  );
}
