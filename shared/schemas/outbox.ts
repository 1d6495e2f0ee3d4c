import { z } from 'zod';

export const outboxStates = ['queued', 'sending', 'sent', 'failed', 'skipped'] as const;
export const outboxQuery = z.object({ state: z.enum(outboxStates).optional(), limit: z.coerce.number().int().min(1).max(1000).optional() });

export const outboxMessageSchema = z.object({
  id: z.number(),
  kind: z.string(),
  to: z.array(z.string()),
  subject: z.string(),
  state: z.enum(outboxStates),
  attempts: z.number(),
  nextAttemptAt: z.string(),
  lastError: z.string().nullable(),
  createdAt: z.string(),
  sentAt: z.string().nullable(),
});
export type OutboxMessageWire = z.infer<typeof outboxMessageSchema>;
