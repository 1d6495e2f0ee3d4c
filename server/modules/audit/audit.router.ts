import { z } from 'zod';
import type { ApiRouter } from '../../http/route';
import { idSchema } from '../../../shared/schemas/common';
import type { AuditRepository } from './audit.repository';

export function auditRoutes(api: ApiRouter, audit: AuditRepository) {
  api.get('/audit/verify', { access: ['owner'], handler: () => audit.verify() });
  api.get('/audit', {
    access: ['owner'],
    query: z.object({ entity: z.string().max(30).optional(), entityId: idSchema.optional(), limit: z.coerce.number().int().min(1).max(1000).optional() }),
    handler: ({ query }) => audit.list(query),
  });
}
