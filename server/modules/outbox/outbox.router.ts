import { z } from 'zod';
import type { ApiRouter } from '../../http/route';
import { outboxStates } from './outbox.repository';
import type { OutboxService } from './outbox.service';

export function outboxRoutes(api: ApiRouter, outbox: OutboxService) {
  api.get('/outbox', {
    access: ['owner'],
    query: z.object({ state: z.enum(outboxStates).optional(), limit: z.coerce.number().int().min(1).max(1000).optional() }),
    handler: ({ query }) => outbox.list(query),
  });
}
