import type { ApiRouter } from '../../http/route';
import { idParams } from '../../../shared/schemas/common';
import { createFaultSchema, faultListQuery, resolveFaultSchema } from '../../../shared/schemas/safety';
import { MAX_FILES, type DocumentsService, type UploadedFile } from '../documents/documents.service';
import type { FaultsService } from './faults.service';
import type { PersonLimiters } from '../../http/person-limits';

export function faultsRoutes(api: ApiRouter, faults: FaultsService, docs: DocumentsService, limits: PersonLimiters) {
  const { faultReports: reportLimit, uploads: uploadLimit } = limits;
  api.get('/faults', { access: 'signed_in', query: faultListQuery, handler: ({ query }) => faults.list(query) });
  api.get('/faults/:id', { access: 'signed_in', params: idParams, handler: ({ params }) => faults.get(params.id) });
  // JSON, or multipart with the photos in `photos` (a phone's camera).
  api.post('/faults', {
    access: 'signed_in',
    // Limits first, so a person over them is refused before any photo is read.
    before: [reportLimit, (req, res, next) => (req.is('multipart/form-data') ? uploadLimit(req, res, next) : next()), docs.upload('photos', MAX_FILES)],
    body: createFaultSchema,
    status: 201,
    handler: ({ body, req, user }) => faults.report(body, (req.files as UploadedFile[] | undefined) ?? [], user.id),
  });
  api.post('/faults/:id/resolve', { access: ['rigger'], params: idParams, body: resolveFaultSchema, handler: ({ params, body, user }) => faults.resolve(params.id, body, user.id) });
}
