import type { ApiRouter } from '../../http/route';
import { outboxQuery } from '../../../shared/schemas/outbox';
import type { OutboxService } from './outbox.service';

export function outboxRoutes(api: ApiRouter, outbox: OutboxService) {
  api.get('/outbox', { access: ['owner'], query: outboxQuery, handler: ({ query }) => outbox.list(query) });
}
