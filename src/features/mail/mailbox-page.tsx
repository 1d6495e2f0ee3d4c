import { useState } from 'react';
import { useInfiniteQuery, useQuery } from '@tanstack/react-query';
import { toast } from 'sonner';
import { Card, EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { Button } from '../../components/ui/button';
import { ConfirmDialog } from '../../components/ui/confirm';
import { ApiError } from '../../lib/api-client';
import type { OutboxMessageWire } from '../../../shared/schemas/outbox';
import { mailQueries, useResendMessage, type CaughtMessage } from './api';

export function MailboxPage() {
  const box = useQuery(mailQueries.mailbox());
  const [open, setOpen] = useState<number | null>(null);
  return (
    <div className="max-w-4xl">
      <PageHeader title="Mailbox">E-mail waiting or failed in the outbox, and what the built-in mail catcher received.</PageHeader>
      <OutboxTrouble />
      <h2 className="mb-3 mt-8 text-lg font-semibold">Caught by the built-in mail catcher</h2>
      {box.isError && box.error instanceof ApiError && box.error.status === 404 ? (
        <p className="rounded-xl border border-line bg-white p-5 text-sm text-muted">A real mail server is configured (SMTP_URL), so there is no catcher. Messages go out through it; failures are listed above.</p>
      ) : box.isPending ? <Loading /> : box.isError ? <ErrorState error={box.error} retry={() => box.refetch()} /> : box.data.length === 0 ? (
        <EmptyState title="No e-mail caught yet">Reminders, alerts and digests appear here as they are sent.</EmptyState>
      ) : (
        <ul className="space-y-2">
          {box.data.map((m, i) => (
            <li key={i}>
              <Card className="p-0">
                <button className="flex w-full flex-wrap items-baseline justify-between gap-2 px-5 py-3 text-left" aria-expanded={open === i} onClick={() => setOpen(open === i ? null : i)}>
                  <span className="font-medium">{m.subject || '(no subject)'}</span>
                  <span className="text-sm text-muted">to {m.to.join(', ')} · {new Date(m.receivedAt).toLocaleString()}</span>
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

/** Failed and waiting messages, so the owner sees a mail problem in production too. */
function OutboxTrouble() {
  const failed = useInfiniteQuery(mailQueries.outbox('failed'));
  const queued = useInfiniteQuery(mailQueries.outbox('queued'));
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
        <p className="text-sm text-muted">Nothing failed and nothing is waiting: every message due has gone out.</p>
      ) : (
        <ul className="divide-y divide-line text-sm">
          {rows.map((m) => (
            <li key={m.id} className="flex flex-wrap items-center justify-between gap-2 py-2">
              <span>
                <span className={`mr-2 font-medium ${m.state === 'failed' ? 'text-stop-700' : 'text-warn-700'}`}>{m.state === 'failed' ? 'Failed' : 'Waiting'}</span>
                {m.subject} <span className="text-muted">to {m.to.join(', ')} · {m.attempts} attempt{m.attempts === 1 ? '' : 's'}{m.lastError ? ` · last error: ${m.lastError}` : ''}</span>
              </span>
              {m.state === 'failed' ? (
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
