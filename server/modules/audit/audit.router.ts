import { z } from 'zod';
import type { ApiRouter } from '../../http/route';
import { auditListQuery } from '../../../shared/schemas/audit';
import type { AuditRepository } from './audit.repository';
import type { AuditService } from './audit.service';

export function auditRoutes(api: ApiRouter, audit: AuditRepository, service: AuditService) {
  api.get('/audit/verify', {
    access: ['owner'],
    // A head published earlier (count:hash, on an export or a digest) to prove it is still in the chain.
    query: z.object({ head: z.string().max(100).optional() }),
    handler: ({ query }) => service.verify(query.head),
  });
  api.get('/audit/facets', { access: ['owner'], handler: () => audit.facets() });
  // `{ items, nextCursor }`, newest first (PRODUCT.md §10).
  api.get('/audit', { access: ['owner'], query: auditListQuery, handler: ({ query }) => audit.page(query) });
}
