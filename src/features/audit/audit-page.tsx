import { useId } from 'react';
import { keepPreviousData, useInfiniteQuery, useQuery } from '@tanstack/react-query';
import { useSearchParams } from 'react-router-dom';
import { Button } from '../../components/ui/button';
import { SelectField, TextField } from '../../components/ui/field';
import { EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { formatInZone } from '../../components/ui/zoned-time';
import { useStudioTimeZone } from '../today/api';
import { auditQueries, auditSearch, type AuditFilterInput } from './api';
import { AuditVerifyPanel } from './components/audit-verify-panel';
import { actionText, describeValue, entityText } from './labels';

const keys = ['actorId', 'action', 'entity', 'entityId', 'from', 'to'] as const;

/** The owner's audit trail: every recorded change, filtered by who, what, which record and when. */
export function AuditPage() {
  const zone = useStudioTimeZone();
  if (zone.isPending) return <Loading />;
  if (zone.isError) return <ErrorState error={zone.error} retry={() => zone.refetch()} />;
  return <AuditTrail timeZone={zone.data} />;
}

function AuditTrail({ timeZone }: { timeZone: string }) {
  const [params, setParams] = useSearchParams();
  const input: AuditFilterInput = Object.fromEntries(keys.map((k) => [k, params.get(k) ?? undefined]));
  const { search, errors } = auditSearch(input, timeZone);
  const valid = Object.keys(errors).length === 0;
  const list = useInfiniteQuery({ ...auditQueries.list(search), enabled: valid, placeholderData: keepPreviousData });
  const facets = useQuery(auditQueries.facets());
  const staff = useQuery(auditQueries.staff());
  const hid = useId();
  const set = (k: (typeof keys)[number], v: string) =>
    setParams((old) => {
      const n = new URLSearchParams(old);
      if (v) n.set(k, v);
      else n.delete(k);
      if (k === 'entity' && !v) n.delete('entityId');
      return n;
    }, { replace: true });
  const filtered = keys.some((k) => params.get(k));
  const rows = list.data?.pages.flatMap((p) => p.items) ?? [];

  return (
    <div className="max-w-6xl space-y-6">
      <PageHeader title="Audit trail">Every change to staff, policy, the rig, classes, faults and inspections, newest first. Entries are append-only and chained; the check below shows whether any was altered.</PageHeader>
      <form className="grid gap-3 rounded-xl border border-line bg-white p-4 sm:grid-cols-2 lg:grid-cols-3" onSubmit={(e) => e.preventDefault()} aria-label="Filter the audit trail">
        <SelectField label="Who" value={input.actorId ?? ''} onChange={(e) => set('actorId', e.target.value)} error={errors.actorId}>
          <option value="">Anyone</option>
          {staff.data?.map((u) => <option key={u.id} value={u.id}>{u.name}{u.active ? '' : ' (former)'}</option>)}
        </SelectField>
        <SelectField label="What" value={input.action ?? ''} onChange={(e) => set('action', e.target.value)} error={errors.action}>
          <option value="">Any change</option>
          {facets.data?.actions.map((a) => <option key={a} value={a}>{actionText(a)}</option>)}
        </SelectField>
        <div className="grid grid-cols-[minmax(0,1fr)_8rem] gap-2">
          <SelectField label="Record" value={input.entity ?? ''} onChange={(e) => set('entity', e.target.value)} error={errors.entity}>
            <option value="">Any record</option>
            {facets.data?.entities.map((en) => <option key={en} value={en}>{entityText(en)}</option>)}
          </SelectField>
          <TextField label="Number" inputMode="numeric" value={input.entityId ?? ''} onChange={(e) => set('entityId', e.target.value)} error={errors.entityId} disabled={!input.entity && !input.entityId} hint="e.g. 12" />
        </div>
        <TextField label="From" type="date" value={input.from ?? ''} onChange={(e) => set('from', e.target.value)} error={errors.from} />
        <TextField label="To" type="date" value={input.to ?? ''} min={input.from} onChange={(e) => set('to', e.target.value)} error={errors.to} />
        {filtered ? (
          <div className="flex items-end">
            <Button type="button" variant="ghost" onClick={() => setParams(new URLSearchParams(), { replace: true })}>Clear the filters</Button>
          </div>
        ) : null}
      </form>
      <section aria-labelledby={hid} className="space-y-3">
        <h2 id={hid} className="text-xl font-semibold">Entries</h2>
        {!valid ? (
          <p className="text-sm text-stop-700">Correct the filters above to see entries.</p>
        ) : list.isPending ? <Loading label="Loading the audit trail…" /> : list.isError ? <ErrorState error={list.error} retry={() => list.refetch()} /> : rows.length === 0 ? (
          <EmptyState title="No entries match">{filtered ? 'Try another person, change or a wider range.' : 'Changes appear here as staff make them.'}</EmptyState>
        ) : (
          <>
            <p className="text-sm text-muted" aria-live="polite">{rows.length} entr{rows.length === 1 ? 'y' : 'ies'} loaded{list.hasNextPage ? ', older ones below' : ''}. Times in {timeZone.replace(/_/g, ' ')}.</p>
            <div className="overflow-x-auto rounded-xl border border-line bg-white">
              <table className="w-full text-left text-sm" data-testid="audit-entries">
                <caption className="sr-only">Audit entries, newest first</caption>
                <thead className="border-b border-line text-xs uppercase tracking-wide text-muted">
                  <tr>
                    <th scope="col" className="px-3 py-2">#</th>
                    <th scope="col" className="px-3 py-2">When</th>
                    <th scope="col" className="px-3 py-2">Who</th>
                    <th scope="col" className="px-3 py-2">What</th>
                    <th scope="col" className="px-3 py-2">Record</th>
                    <th scope="col" className="px-3 py-2">Change</th>
                  </tr>
                </thead>
                <tbody>
                  {rows.map((e) => (
                    <tr key={e.id} className="border-t border-line align-top">
                      <td className="px-3 py-2 text-muted">{e.id}</td>
                      <td className="whitespace-nowrap px-3 py-2">{formatInZone(e.at, timeZone)}</td>
                      <td className="px-3 py-2">{e.actor ?? (e.actorId === null ? 'System' : 'Former staff member')}</td>
                      <td className="px-3 py-2"><span className="font-medium">{actionText(e.action)}</span> <span className="block text-xs text-muted">{e.action}</span></td>
                      <td className="whitespace-nowrap px-3 py-2">{entityText(e.entity)}{e.entityId !== null ? ` #${e.entityId}` : ''}</td>
                      <td className="max-w-md px-3 py-2 text-xs break-words">
                        {e.before ? <p><span className="font-medium">Before:</span> {describeValue(e.before)}</p> : null}
                        {e.after ? <p><span className="font-medium">{e.before ? 'After:' : ''}</span> {describeValue(e.after)}</p> : null}
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
            {list.hasNextPage ? <Button variant="secondary" onClick={() => list.fetchNextPage()} busy={list.isFetchingNextPage}>Show older entries</Button> : null}
          </>
        )}
      </section>
      <AuditVerifyPanel timeZone={timeZone} />
    </div>
  );
}
