import type { ApiRouter } from '../../http/route';
import { idParams } from '../../../shared/schemas/common';
import { createFaultSchema, faultListQuery, resolveFaultSchema } from '../../../shared/schemas/safety';
import { MAX_FILES, uploadMiddleware } from '../documents/documents.service';
import type { FaultsService } from './faults.service';

export function faultsRoutes(api: ApiRouter, faults: FaultsService) {
  api.get('/faults', { access: 'signed_in', query: faultListQuery, handler: ({ query }) => faults.list(query) });
  api.get('/faults/:id', { access: 'signed_in', params: idParams, handler: ({ params }) => faults.get(params.id) });
  // JSON, or multipart with the photos in `photos` (a phone's camera).
  api.post('/faults', {
    access: 'signed_in',
    before: [uploadMiddleware('photos', MAX_FILES)],
    body: createFaultSchema,
    status: 201,
    handler: ({ body, req, user }) => faults.report(body, (req.files as Express.Multer.File[] | undefined) ?? [], user.id),
  });
  api.post('/faults/:id/resolve', { access: ['rigger'], params: idParams, body: resolveFaultSchema, handler: ({ params, body, user }) => faults.resolve(params.id, body, user.id) });
}
