import { infiniteQueryOptions, queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '../../lib/api-client';
import { outboxMessageSchema } from '../../../shared/schemas/outbox';
import { pageSchema } from '../../../shared/schemas/page';

export const caughtMessageSchema = z.object({ to: z.array(z.string()), subject: z.string(), text: z.string(), html: z.string(), receivedAt: z.string() });
export type CaughtMessage = z.infer<typeof caughtMessageSchema>;

export const mailQueries = {
  all: ['mail'] as const,
  /** Newest first, a page at a time. */
  outbox: (state?: 'failed' | 'queued') =>
    infiniteQueryOptions({
      queryKey: [...mailQueries.all, 'outbox', state ?? 'all'],
      queryFn: ({ pageParam }) => {
        const s = new URLSearchParams();
        if (state) s.set('state', state);
        if (pageParam) s.set('cursor', pageParam);
        const q = s.toString();
        return api(`/outbox${q ? `?${q}` : ''}`, { schema: pageSchema(outboxMessageSchema) });
      },
      initialPageParam: undefined as string | undefined,
      getNextPageParam: (last) => last.nextCursor ?? undefined,
      refetchInterval: 15_000,
    }),
  mailbox: () => queryOptions({ queryKey: [...mailQueries.all, 'mailbox'], queryFn: () => api('/dev/mailbox', { schema: z.array(caughtMessageSchema) }), refetchInterval: 10_000 }),
};

/** The owner sends a failed message again; it goes at the mail worker's next cycle. */
export function useResendMessage() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: number) => api(`/outbox/${id}/resend`, { method: 'POST', schema: outboxMessageSchema }),
    onSuccess: () => void qc.invalidateQueries({ queryKey: mailQueries.all }),
  });
}
