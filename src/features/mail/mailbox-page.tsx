import { useState } from 'react';
import { useSearchParams } from 'react-router-dom';
import { useInfiniteQuery, useQuery } from '@tanstack/react-query';
import { toast } from 'sonner';
import { Card, EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { Button } from '../../components/ui/button';
import { ConfirmDialog } from '../../components/ui/confirm';
import { ApiError } from '../../lib/api-client';
import { SelectField } from '../../components/ui/field';
import { formatInZone } from '../../components/ui/zoned-time';
import { outboxKindLabels, outboxKinds, type MailFilter, type OutboxKind, type OutboxMessageWire } from '../../../shared/schemas/outbox';
import { staffQueries } from '../staff/api';
import { useStudioTimeZone } from '../today/api';
import { mailQueries, useResendMessage, type CaughtMessage } from './api';

/** The filter lives in the address (`?kind=&to=`), so a reload or a shared link keeps it. */
function useMailFilter(): [MailFilter, (next: MailFilter) => void] {
  const [params, setParams] = useSearchParams();
  const kind = params.get('kind');
  const filter: MailFilter = {
    kind: kind && (outboxKinds as readonly string[]).includes(kind) ? (kind as OutboxKind) : undefined,
    to: params.get('to')?.trim().toLowerCase() || undefined,
  };
  const set = (next: MailFilter) => {
    const p = new URLSearchParams(params);
    for (const key of ['kind', 'to'] as const) {
      const v = next[key];
      if (v) p.set(key, v);
      else p.delete(key);
    }
    setParams(p, { replace: true });
  };
  return [filter, set];
}

export function MailboxPage() {
  const [filter, setFilter] = useMailFilter();
  const zone = useStudioTimeZone();
  const box = useQuery(mailQueries.mailbox(filter));
  const [open, setOpen] = useState<number | null>(null);
  const timeZone = zone.data ?? 'UTC';
  const filtered = Boolean(filter.kind || filter.to);
  return (
    <div className="max-w-4xl">
      <PageHeader title="Mailbox">E-mail waiting or failed in the outbox, and what the built-in mail catcher received. Times in {timeZone.replace(/_/g, ' ')}.</PageHeader>
      <MailFilterBar filter={filter} onChange={(f) => { setOpen(null); setFilter(f); }} />
      <OutboxTrouble filter={filter} timeZone={timeZone} />
      <h2 className="mb-3 mt-8 text-lg font-semibold">Caught by the built-in mail catcher</h2>
      {box.isError && box.error instanceof ApiError && box.error.status === 404 ? (
        <p className="rounded-xl border border-line bg-white p-5 text-sm text-muted">A real mail server is configured (SMTP_URL), so there is no catcher. Messages go out through it; failures are listed above.</p>
      ) : box.isPending ? <Loading /> : box.isError ? <ErrorState error={box.error} retry={() => box.refetch()} /> : box.data.length === 0 ? (
        filtered ? (
          <EmptyState title="No e-mail caught matches the filter">Choose another kind or recipient, or show all messages.</EmptyState>
        ) : (
          <EmptyState title="No e-mail caught yet">Reminders, alerts and digests appear here as they are sent.</EmptyState>
        )
      ) : (
        <ul className="space-y-2" aria-label="Caught messages">
          {box.data.map((m, i) => (
            <li key={i}>
              <Card className="p-0">
                <button className="flex w-full flex-wrap items-baseline justify-between gap-2 px-5 py-3 text-left" aria-expanded={open === i} onClick={() => setOpen(open === i ? null : i)}>
                  <span className="font-medium">{m.subject || '(no subject)'}</span>
                  <span className="text-sm text-muted">{m.kind ? `${outboxKindLabels[m.kind]} · ` : ''}to {m.to.join(', ')} · <time dateTime={m.receivedAt}>{formatInZone(m.receivedAt, timeZone)}</time></span>
                </button>
                {open === i ? <MessageBody m={m} /> : null}
              </Card>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}

/** Kind and recipient; recipients are the staff, the only people the studio mails. */
function MailFilterBar({ filter, onChange }: { filter: MailFilter; onChange: (f: MailFilter) => void }) {
  const staff = useQuery(staffQueries.list());
  const people = (staff.data ?? []).slice().sort((a, b) => a.name.localeCompare(b.name));
  const known = !filter.to || people.some((p) => p.email.toLowerCase() === filter.to);
  return (
    <div role="search" aria-label="Filter the mailbox" className="mb-6 flex flex-wrap items-end gap-3">
      <SelectField label="Kind" value={filter.kind ?? ''} onChange={(e) => onChange({ ...filter, kind: (e.target.value || undefined) as OutboxKind | undefined })}>
        <option value="">Every kind</option>
        {outboxKinds.map((k) => <option key={k} value={k}>{outboxKindLabels[k]}</option>)}
      </SelectField>
      <SelectField label="Recipient" value={filter.to ?? ''} onChange={(e) => onChange({ ...filter, to: e.target.value || undefined })}>
        <option value="">Anyone</option>
        {!known ? <option value={filter.to}>{filter.to}</option> : null}
        {people.map((p) => <option key={p.id} value={p.email.toLowerCase()}>{p.name} ({p.email})</option>)}
      </SelectField>
      {filter.kind || filter.to ? <Button variant="secondary" onClick={() => onChange({})}>Show all messages</Button> : null}
    </div>
  );
}

/** Failed and waiting messages, so the owner sees a mail problem in production too. */
function OutboxTrouble({ filter, timeZone }: { filter: MailFilter; timeZone: string }) {
  const failed = useInfiniteQuery(mailQueries.outbox('failed', filter));
  const queued = useInfiniteQuery(mailQueries.outbox('queued', filter));
  const resend = useResendMessage();
  const [asking, setAsking] = useState<OutboxMessageWire | null>(null);
  const confirm = () => {
    if (!asking) return;
    resend.mutate(asking.id, {
      onSuccess: () => {
        toast.success('Queued again: it goes out at the mail worker’s next run.');
        setAsking(null);
      },
      onError: (err) => {
        toast.error(err instanceof ApiError ? err.message : 'The message could not be queued again.');
        setAsking(null);
      },
    });
  };
  if (failed.isPending || queued.isPending) return <Loading label="Loading the outbox…" />;
  if (failed.isError) return <ErrorState error={failed.error} retry={() => failed.refetch()} />;
  if (queued.isError) return <ErrorState error={queued.error} retry={() => queued.refetch()} />;
  const rows = [...failed.data.pages.flatMap((p) => p.items), ...queued.data.pages.flatMap((p) => p.items)];
  return (
    <Card>
      <h2 className="mb-2 text-lg font-semibold">Outbox</h2>
      {rows.length === 0 ? (
        <p className="text-sm text-muted">{filter.kind || filter.to ? 'Nothing failed and nothing is waiting among the messages the filter keeps.' : 'Nothing failed and nothing is waiting: every message due has gone out.'}</p>
      ) : (
        <ul className="divide-y divide-line text-sm">
          {rows.map((m) => (
            <li key={m.id} className="flex flex-wrap items-center justify-between gap-2 py-2">
              <span>
                <span className={`mr-2 font-medium ${m.state === 'failed' ? 'text-stop-700' : 'text-warn-700'}`}>{m.state === 'failed' ? 'Failed' : 'Waiting'}</span>
                <span className="mr-1 text-muted">{outboxKindLabels[m.kind]}:</span> {m.subject} <span className="text-muted">to {m.to.join(', ')} · written {formatInZone(m.createdAt, timeZone)} · {m.attempts} attempt{m.attempts === 1 ? '' : 's'}{m.lastError ? ` · last error: ${m.lastError}` : ''}</span>
              </span>
              {m.state === 'failed' && m.kind === 'sign_in_link' ? (
                <span className="text-muted">Not kept: the student asks for a new link</span>
              ) : m.state === 'failed' ? (
                <Button variant="secondary" disabled={resend.isPending} onClick={() => setAsking(m)}>
                  Send again
                </Button>
              ) : null}
            </li>
          ))}
        </ul>
      )}
      {failed.hasNextPage || queued.hasNextPage ? (
        <Button
          variant="secondary"
          className="mt-3"
          busy={failed.isFetchingNextPage || queued.isFetchingNextPage}
          onClick={() => void Promise.all([failed.hasNextPage ? failed.fetchNextPage() : null, queued.hasNextPage ? queued.fetchNextPage() : null])}
        >
          Show older messages
        </Button>
      ) : null}
      <ConfirmDialog open={asking !== null} title="Send this message again?" confirmLabel="Send again" danger={false} busy={resend.isPending} onCancel={() => setAsking(null)} onConfirm={confirm}>
        “{asking?.subject}” to {asking?.to.join(', ')} is queued again and goes out at the mail worker’s next run. Check the mail settings first if the last error names them.
      </ConfirmDialog>
    </Card>
  );
}

function MessageBody({ m }: { m: CaughtMessage }) {
  return (
    <div className="grid gap-4 border-t border-line p-5 lg:grid-cols-2">
      <pre className="whitespace-pre-wrap text-sm">{m.text}</pre>
      {m.html ? <iframe title={`HTML of ${m.subject}`} sandbox="" srcDoc={m.html} className="h-96 w-full rounded border border-line bg-white" /> : null}
    </div>
  );
}
