import type { ApiRouter } from '../../http/route';
import { idParams } from '../../../shared/schemas/common';
import { clearanceBodySchema, gearInspectionBodySchema, inspectionLogQuery, preuseBodySchema } from '../../../shared/schemas/safety';
import type { InspectionsService } from './inspections.service';

export function inspectionsRoutes(api: ApiRouter, inspections: InspectionsService) {
  api.get('/points/:id/checklist', { access: 'signed_in', params: idParams, handler: ({ params }) => inspections.checklist(params.id) });
  api.post('/points/:id/clearances', { access: ['rigger'], params: idParams, body: clearanceBodySchema, status: 201, handler: ({ params, body, user }) => inspections.clear(params.id, body, user.id) });
  api.post('/gear/:id/inspections', { access: ['rigger'], params: idParams, body: gearInspectionBodySchema, status: 201, handler: ({ params, body, user }) => inspections.inspectGear(params.id, body, user.id) });
  api.get('/points/:id/preuse', { access: 'signed_in', params: idParams, handler: ({ params }) => inspections.preuseChecklist(params.id) });
  api.post('/points/:id/preuse', { access: ['instructor', 'rigger'], params: idParams, body: preuseBodySchema, status: 201, handler: ({ params, body, user }) => inspections.preuse(params.id, body, user.id) });
  api.get('/inspections', { access: 'signed_in', query: inspectionLogQuery, handler: ({ query }) => inspections.log(query) });
  api.get('/inspections/export.csv', {
    access: ['owner', 'rigger'],
    query: inspectionLogQuery,
    handler: async ({ query, res }) => {
      const csv = await inspections.exportCsv(query);
      res.type('text/csv; charset=utf-8').attachment('loftwise-inspection-log.csv').send(csv);
      return undefined;
    },
  });
}
