import { infiniteQueryOptions, queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '../../lib/api-client';
import { outboxKinds, outboxMessageSchema, type MailFilter } from '../../../shared/schemas/outbox';
import { pageSchema } from '../../../shared/schemas/page';

export const caughtMessageSchema = z.object({ to: z.array(z.string()), subject: z.string(), text: z.string(), html: z.string(), receivedAt: z.string(), kind: z.enum(outboxKinds).nullable().catch(null) });
export type CaughtMessage = z.infer<typeof caughtMessageSchema>;

/** The filter as query parameters, leaving out what is not set. */
function filterParams(filter: MailFilter): Record<string, string> {
  const out: Record<string, string> = {};
  if (filter.kind) out.kind = filter.kind;
  if (filter.to) out.to = filter.to;
  return out;
}

export const mailQueries = {
  all: ['mail'] as const,
  /** Newest first, a page at a time. */
  outbox: (state?: 'failed' | 'queued', filter: MailFilter = {}) =>
    infiniteQueryOptions({
      queryKey: [...mailQueries.all, 'outbox', state ?? 'all', filter.kind ?? '', filter.to ?? ''],
      queryFn: ({ pageParam }) => {
        const s = new URLSearchParams(filterParams(filter));
        if (state) s.set('state', state);
        if (pageParam) s.set('cursor', pageParam);
        const q = s.toString();
        return api(`/outbox${q ? `?${q}` : ''}`, { schema: pageSchema(outboxMessageSchema) });
      },
      initialPageParam: undefined as string | undefined,
      getNextPageParam: (last) => last.nextCursor ?? undefined,
      refetchInterval: 15_000,
    }),
  mailbox: (filter: MailFilter = {}) =>
    queryOptions({
      queryKey: [...mailQueries.all, 'mailbox', filter.kind ?? '', filter.to ?? ''],
      queryFn: () => {
        const q = new URLSearchParams(filterParams(filter)).toString();
        return api(`/dev/mailbox${q ? `?${q}` : ''}`, { schema: z.array(caughtMessageSchema) });
      },
      refetchInterval: 10_000,
    }),
};

/** The owner sends a failed message again; it goes at the mail worker's next cycle. */
export function useResendMessage() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: number) => api(`/outbox/${id}/resend`, { method: 'POST', schema: outboxMessageSchema }),
    onSuccess: () => void qc.invalidateQueries({ queryKey: mailQueries.all }),
  });
}
