import type { ApiRouter } from '../../http/route';
import { auditListQuery } from '../../../shared/schemas/audit';
import type { AuditRepository } from './audit.repository';

export function auditRoutes(api: ApiRouter, audit: AuditRepository) {
  api.get('/audit/verify', { access: ['owner'], handler: () => audit.verify() });
  api.get('/audit/facets', { access: ['owner'], handler: () => audit.facets() });
  // `{ items, nextCursor }`, newest first (PRODUCT.md §10).
  api.get('/audit', { access: ['owner'], query: auditListQuery, handler: ({ query }) => audit.page(query) });
}
