import { useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { Card, EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { mailQueries, type CaughtMessage } from './api';

export function MailboxPage() {
  const box = useQuery(mailQueries.mailbox());
  const [open, setOpen] = useState<number | null>(null);
  return (
    <div className="max-w-4xl">
      <PageHeader title="Mailbox">Every e-mail Loftwise sent, as the built-in mail catcher received it. Newest first; refreshes every 10 seconds.</PageHeader>
      {box.isPending ? <Loading /> : box.isError ? <ErrorState error={box.error} retry={() => box.refetch()} /> : box.data.length === 0 ? (
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

function MessageBody({ m }: { m: CaughtMessage }) {
  return (
    <div className="grid gap-4 border-t border-line p-5 lg:grid-cols-2">
      <pre className="whitespace-pre-wrap text-sm">{m.text}</pre>
      {m.html ? <iframe title={`HTML of ${m.subject}`} sandbox="" srcDoc={m.html} className="h-96 w-full rounded border border-line bg-white" /> : null}
    </div>
  );
}
