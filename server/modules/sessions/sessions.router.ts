import type { ApiRouter } from '../../http/route';
import { idParams } from '../../../shared/schemas/common';
import { availabilityQuery, cancelSessionSchema, createSessionSchema, sessionListQuery, swapPointsSchema, updateSessionSchema } from '../../../shared/schemas/sessions';
import { inspectionLogFilters } from '../../../shared/schemas/safety';
import type { SessionsService } from './sessions.service';

const DESK = ['reception', 'owner'] as const;

export function sessionsRoutes(api: ApiRouter, sessions: SessionsService) {
  // Each class with its places (PRODUCT.md §11): capacity, places left, booked, waitlisted (worked out in the view).
  api.get('/sessions', { access: 'signed_in', query: sessionListQuery, handler: ({ query }) => sessions.list(query) });
  api.get('/sessions/availability', { access: 'signed_in', query: availabilityQuery, handler: ({ query }) => sessions.availability(query) });
  // The classes held in a range as recorded at their start, streamed (PRODUCT.md §10); the log's filters, same access as its export.
  api.get('/sessions/records/export.csv', {
    access: ['owner', 'rigger'],
    query: inspectionLogFilters,
    handler: async ({ query, res }) => {
      res.type('text/csv; charset=utf-8').attachment('loftwise-classes-held.csv');
      await sessions.exportHeld(query, res);
      return undefined;
    },
  });
  api.get('/sessions/:id', { access: 'signed_in', params: idParams, handler: ({ params }) => sessions.get(params.id) });
  api.get('/sessions/:id/alternatives', { access: 'signed_in', params: idParams, handler: ({ params }) => sessions.alternatives(params.id) });
  api.post('/sessions', { access: DESK, body: createSessionSchema, status: 201, handler: ({ body, user }) => sessions.create(body, user.id) });
  api.patch('/sessions/:id', { access: DESK, params: idParams, body: updateSessionSchema, handler: ({ params, body, user }) => sessions.update(params.id, body, user.id) });
  api.put('/sessions/:id/points', { access: DESK, params: idParams, body: swapPointsSchema, handler: ({ params, body, user }) => sessions.swapPoints(params.id, body, user.id) });
  api.post('/sessions/:id/cancel', { access: DESK, params: idParams, body: cancelSessionSchema, handler: ({ params, body, user }) => sessions.cancel(params.id, body, user.id) });
}
