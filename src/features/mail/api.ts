import { queryOptions } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '../../lib/api-client';
import { outboxMessageSchema } from '../../../shared/schemas/outbox';

export const caughtMessageSchema = z.object({ to: z.array(z.string()), subject: z.string(), text: z.string(), html: z.string(), receivedAt: z.string() });
export type CaughtMessage = z.infer<typeof caughtMessageSchema>;

export const mailQueries = {
  all: ['mail'] as const,
  outbox: (state?: 'failed' | 'queued') =>
    queryOptions({ queryKey: [...mailQueries.all, 'outbox', state ?? 'all'], queryFn: () => api(`/outbox${state ? `?state=${state}` : ''}`, { schema: z.array(outboxMessageSchema) }), refetchInterval: 15_000 }),
  mailbox: () => queryOptions({ queryKey: [...mailQueries.all, 'mailbox'], queryFn: () => api('/dev/mailbox', { schema: z.array(caughtMessageSchema) }), refetchInterval: 10_000 }),
};
