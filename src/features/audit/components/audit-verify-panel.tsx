import { useId, useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { ShieldCheck, ShieldX } from 'lucide-react';
import { Button } from '../../../components/ui/button';
import { Card, ErrorState, Loading } from '../../../components/ui/states';
import { formatInZone } from '../../../components/ui/zoned-time';
import { auditQueries } from '../api';

/** Owner only: checks that no audit entry was changed, removed or reordered since it was written. */
export function AuditVerifyPanel({ timeZone }: { timeZone: string }) {
  const verify = useQuery(auditQueries.verify());
  const [showRecent, setShowRecent] = useState(false);
  const recent = useQuery({ ...auditQueries.recent(), enabled: showRecent });
  const hid = useId();
  const r = verify.data;
  return (
    <Card className="no-print space-y-3">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <div>
          <h2 id={hid} className="text-lg font-semibold">Verify the audit chain</h2>
          <p className="text-sm text-muted">Every change is recorded in a hash-chained trail. Checking it shows whether any entry was edited, removed or reordered.</p>
        </div>
        <Button onClick={() => verify.refetch()} busy={verify.isFetching}>{r ? 'Check again' : 'Verify now'}</Button>
      </div>
      <div aria-live="polite">
        {verify.isFetching && !r ? <Loading label="Checking every entry…" /> : verify.isError ? <ErrorState error={verify.error} retry={() => verify.refetch()} /> : r ? (
          r.ok ? (
            <p className="flex items-start gap-2 rounded-lg bg-ok-50 p-3 text-ok-700"><ShieldCheck className="mt-0.5 size-5 shrink-0" aria-hidden /><span><strong>Intact.</strong> All {r.entries} entries follow one another and none was changed after it was written.</span></p>
          ) : (
            <div className="flex items-start gap-2 rounded-lg bg-stop-50 p-3 text-stop-700" role="alert">
              <ShieldX className="mt-0.5 size-5 shrink-0" aria-hidden />
              <div>
                <p><strong>Broken.</strong> {r.problem ?? 'The chain does not verify.'}</p>
                <p className="text-sm">First bad entry: #{r.firstBadId ?? '?'} of {r.entries}. Keep a copy of the database as it is and tell whoever runs the server; entries before it are intact.</p>
              </div>
            </div>
          )
        ) : null}
      </div>
      <details onToggle={(e) => setShowRecent((e.target as HTMLDetailsElement).open)}>
        <summary className="flex min-h-11 cursor-pointer items-center font-medium">Latest entries</summary>
        {recent.isLoading ? <Loading /> : recent.isPending ? null : recent.isError ? <ErrorState error={recent.error} retry={() => recent.refetch()} /> : (
          <ol className="divide-y divide-line text-sm">
            {recent.data.map((e) => (
              <li key={e.id} className="flex flex-wrap gap-x-3 py-1.5">
                <span className="text-muted">#{e.id}</span>
                <span>{formatInZone(e.at, timeZone)}</span>
                <span className="font-medium">{e.action}</span>
                <span>{e.entity}{e.entityId !== null ? ` #${e.entityId}` : ''}</span>
                <span className="text-muted">{e.actor ?? 'system'}</span>
              </li>
            ))}
          </ol>
        )}
      </details>
    </Card>
  );
}
