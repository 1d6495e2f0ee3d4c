import type { ApiRouter } from '../../http/route';
import { outboxQuery } from '../../../shared/schemas/outbox';
import { idParams } from '../../../shared/schemas/common';
import type { OutboxService } from './outbox.service';

export function outboxRoutes(api: ApiRouter, outbox: OutboxService) {
  api.get('/outbox', { access: ['owner'], query: outboxQuery, handler: ({ query }) => outbox.list(query) });
  api.post('/outbox/:id/resend', { access: ['owner'], params: idParams, handler: ({ params, user }) => outbox.resend(params.id, user.id) });
}
