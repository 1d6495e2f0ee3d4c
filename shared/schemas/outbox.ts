import { z } from 'zod';
import { cursorSchema, idKey, limitSchema } from './page';

export const outboxStates = ['queued', 'sending', 'sent', 'failed', 'skipped'] as const;
/** Newest first, keyset on id. */
export const outboxQuery = z.object({ state: z.enum(outboxStates).optional(), cursor: cursorSchema(idKey).optional(), limit: limitSchema.optional() });

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
