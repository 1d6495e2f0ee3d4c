import { useId, useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { ShieldCheck, ShieldX } from 'lucide-react';
import { Button } from '../../../components/ui/button';
import { TextField } from '../../../components/ui/field';
import { Card, ErrorState, Loading } from '../../../components/ui/states';
import { formatInZone } from '../../../components/ui/zoned-time';
import { auditQueries } from '../api';

/** Owner only: checks that no audit entry was changed, removed or reordered since it was written. */
export function AuditVerifyPanel({ timeZone }: { timeZone: string }) {
  const [head, setHead] = useState('');
  const typed = head.trim();
  const headError = typed && !/^\d{1,12}:[0-9a-f]{64}$/.test(typed) ? 'Write it as printed: count:hash, the hash 64 characters 0–9 and a–f' : undefined;
  const verify = useQuery(auditQueries.verify(headError ? '' : typed));
  const [showRecent, setShowRecent] = useState(false);
  const recent = useQuery({ ...auditQueries.recent(), enabled: showRecent });
  const hid = useId();
  const r = verify.data;
  return (
    <Card className="no-print space-y-3">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <div>
          <h2 id={hid} className="text-lg font-semibold">Verify the audit chain</h2>
          <p className="text-sm text-muted">Every change is recorded in a trail chained under a key kept outside the database. Checking it shows whether any entry was edited, removed or reordered, and whether each point’s clearance agrees with its inspection records.</p>
        </div>
        <Button onClick={() => verify.refetch()} busy={verify.isFetching} disabled={Boolean(headError)}>{r ? 'Check again' : 'Verify now'}</Button>
      </div>
      <TextField
        label="Head printed on an export or a digest (optional)"
        value={head}
        onChange={(e) => setHead(e.target.value)}
        placeholder="count:hash"
        spellCheck={false}
        className="font-mono text-sm"
        error={headError}
        hint="With a head published earlier, the check also proves that no entry up to it was deleted or rewritten since."
      />
      <div aria-live="polite">
        {verify.isFetching && !r ? <Loading label="Checking every entry…" /> : verify.isError ? <ErrorState error={verify.error} retry={() => verify.refetch()} /> : r ? (
          r.ok ? (
            <p className="flex items-start gap-2 rounded-lg bg-ok-50 p-3 text-ok-700"><ShieldCheck className="mt-0.5 size-5 shrink-0" aria-hidden /><span><strong>Intact.</strong> All {r.entries} entries follow one another, none was changed after it was written, and every point’s clearance agrees with its inspection records{r.publishedHead ? `; the published head (entry ${r.publishedHead.count}) is in the chain` : ''}.{r.head ? <> Head now: <code className="break-all">{r.head.count}:{r.head.hash}</code></> : null}</span></p>
          ) : (
            <div className="flex items-start gap-2 rounded-lg bg-stop-50 p-3 text-stop-700" role="alert">
              <ShieldX className="mt-0.5 size-5 shrink-0" aria-hidden />
              <div>
                <p><strong>Broken.</strong> {r.problem ?? 'The chain does not verify.'}</p>
                {r.problems.length > 1 ? <ul className="list-disc pl-5 text-sm">{r.problems.slice(1).map((p) => <li key={p}>{p}</li>)}</ul> : null}
                <p className="text-sm">{r.firstBadId !== null ? `First bad entry: #${r.firstBadId} of ${r.entries}. ` : ''}Keep a copy of the database as it is and tell whoever runs the server.</p>
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
