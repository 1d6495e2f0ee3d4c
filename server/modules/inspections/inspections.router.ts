import type { ApiRouter } from '../../http/route';
import { idParams } from '../../../shared/schemas/common';
import { clearanceBodySchema, gearInspectionBodySchema, inspectionLogFilters, inspectionLogQuery, preuseBodySchema } from '../../../shared/schemas/safety';
import type { InspectionsService } from './inspections.service';

export function inspectionsRoutes(api: ApiRouter, inspections: InspectionsService) {
  api.get('/points/:id/checklist', { access: 'signed_in', params: idParams, handler: ({ params }) => inspections.checklist(params.id) });
  api.post('/points/:id/clearances', { access: ['rigger'], params: idParams, body: clearanceBodySchema, status: 201, handler: ({ params, body, user }) => inspections.clear(params.id, body, user.id) });
  api.post('/gear/:id/inspections', { access: ['rigger'], params: idParams, body: gearInspectionBodySchema, status: 201, handler: ({ params, body, user }) => inspections.inspectGear(params.id, body, user.id) });
  api.get('/points/:id/preuse', { access: 'signed_in', params: idParams, handler: ({ params }) => inspections.preuseChecklist(params.id) });
  api.post('/points/:id/preuse', { access: ['instructor', 'rigger'], params: idParams, body: preuseBodySchema, status: 201, handler: ({ params, body, user }) => inspections.preuse(params.id, body, user.id) });
  api.get('/inspections', { access: 'signed_in', query: inspectionLogQuery, handler: ({ query }) => inspections.log(query) });
  // The complete log for any range, streamed (PRODUCT.md §10); the chain head at the foot of both.
  api.get('/inspections/export.csv', {
    access: ['owner', 'rigger'],
    query: inspectionLogFilters,
    handler: async ({ query, res }) => {
      res.type('text/csv; charset=utf-8').attachment('loftwise-inspection-log.csv');
      await inspections.export(query, 'csv', res);
      return undefined;
    },
  });
  api.get('/inspections/export.html', {
    access: ['owner', 'rigger'],
    query: inspectionLogFilters,
    handler: async ({ query, res }) => {
      res.type('text/html; charset=utf-8').set('Cache-Control', 'private, no-store');
      await inspections.export(query, 'html', res);
      return undefined;
    },
  });
}
