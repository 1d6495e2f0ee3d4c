import { useId, useState } from 'react';
import { keepPreviousData, useInfiniteQuery, useQuery } from '@tanstack/react-query';
import { Download, Printer } from 'lucide-react';
import { Button } from '../../../components/ui/button';
import { SelectField, TextField } from '../../../components/ui/field';
import { EmptyState, ErrorState, Loading } from '../../../components/ui/states';
import { formatInZone } from '../../../components/ui/zoned-time';
import { classesHeldCsvHref, exportCsvHref, inspectionQueries, printableHref, type InspectionKind, type LogFilters } from '../api';
import { kindText } from '../labels';
import { InspectionEntry } from './inspection-entry';

const kinds = Object.keys(kindText) as InspectionKind[];
const linkButton = 'inline-flex min-h-11 items-center gap-2 rounded-lg border border-line bg-white px-4 text-sm font-medium hover:bg-pine-50';

/** The inspection log with its filters, a page at a time; the CSV and the printable log hold every matching row. */
export function InspectionLog({ timeZone, canExport }: { timeZone: string; canExport: boolean }) {
  const [filters, setFilters] = useState<LogFilters>({});
  const badRange = !!(filters.from && filters.to && filters.from > filters.to);
  const asked = badRange ? { ...filters, to: undefined } : filters;
  const log = useInfiniteQuery({ ...inspectionQueries.log(asked, timeZone), placeholderData: keepPreviousData });
  const points = useQuery(inspectionQueries.points());
  const hid = useId();
  const set = (patch: Partial<LogFilters>) => setFilters((f) => ({ ...f, ...patch }));
  const pointLabel = points.data?.find((p) => p.id === filters.pointId)?.label;
  const filtered = !!(filters.from || filters.to || filters.kind || filters.pointId);
  const summary = [
    filters.kind ? `${kindText[filters.kind].toLowerCase()} inspections` : 'inspections',
    pointLabel ? `of point ${pointLabel}` : '',
    filters.from ? `from ${formatInZone(filters.from, timeZone, 'day')}` : '',
    filters.to ? `to ${formatInZone(filters.to, timeZone, 'day')}` : '',
  ].filter(Boolean).join(' ');
  const rows = log.data?.pages.flatMap((p) => p.items) ?? [];

  return (
    <section aria-labelledby={hid} className="space-y-4" data-testid="inspection-log">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h2 id={hid} className="text-xl font-semibold">Inspection log</h2>
          <p className="text-sm text-muted">{filtered ? `Showing ${summary}, newest first.` : 'Showing every inspection, newest first.'} Times in {timeZone.replace(/_/g, ' ')}.</p>
        </div>
        {canExport ? (
          <div className="no-print flex flex-wrap gap-2">
            <a href={exportCsvHref(asked, timeZone)} download className={linkButton}>
              <Download className="size-4" aria-hidden /> Download CSV
            </a>
            <a href={classesHeldCsvHref(asked, timeZone)} download className={linkButton}>
              <Download className="size-4" aria-hidden /> Classes held CSV
            </a>
            <a href={printableHref(asked, timeZone)} target="_blank" rel="noopener" className={linkButton}>
              <Printer className="size-4" aria-hidden /> Printable log<span className="sr-only"> (opens in a new tab)</span>
            </a>
            <p className="basis-full text-xs text-muted">
              The printable log ends with the classes held in the same dates{filters.pointId ? ' on this point' : ''}: each point’s status as recorded when the class started, never today’s.
            </p>
          </div>
        ) : null}
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
        {filtered ? <div className="sm:col-span-2 lg:col-span-4"><Button type="button" variant="ghost" onClick={() => setFilters({})}>Clear the filters</Button></div> : null}
      </form>
      {log.isPending ? <Loading label="Loading the log…" /> : log.isError ? <ErrorState error={log.error} retry={() => log.refetch()} /> : rows.length === 0 ? (
        <EmptyState title="No inspections match">{filtered ? 'Try a wider date range or another kind.' : 'Inspections appear here once a rigger or an instructor records one.'}</EmptyState>
      ) : (
        <>
          <p className="no-print text-sm text-muted" aria-live="polite">
            {rows.length} inspection{rows.length === 1 ? '' : 's'} loaded{log.hasNextPage ? ', older ones below' : ', the whole log'}{log.isFetching && !log.isFetchingNextPage ? ' · updating…' : ''}
          </p>
          {/* Printing this page prints what is loaded and says so; the printable log holds every row. */}
          <p className="hidden text-sm print:block">
            {log.hasNextPage ? `The ${rows.length} newest matching inspections, as loaded on screen; older ones are not on this printout. The printable log holds them all.` : `All ${rows.length} matching inspections.`}
          </p>
          <ol className="space-y-2 print:space-y-0">
            {rows.map((i) => <InspectionEntry key={i.id} inspection={i} timeZone={timeZone} />)}
          </ol>
          {log.hasNextPage ? (
            <Button type="button" variant="secondary" className="no-print" onClick={() => log.fetchNextPage()} busy={log.isFetchingNextPage}>Show older inspections</Button>
          ) : null}
        </>
      )}
    </section>
  );
}
