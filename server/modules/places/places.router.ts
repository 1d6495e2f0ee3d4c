import type { ApiRouter } from '../../http/route';
import { idParams } from '../../../shared/schemas/common';
import { cancelBookingSchema, checkInSchema, createBookingSchema, moveBookingSchema } from '../../../shared/schemas/places';
import type { PlacesService } from './places.service';

const DESK = ['reception', 'owner'] as const;

/** Students' places in classes (PRODUCT.md §11). Students book their own through /api/my (i17b). */
export function placesRoutes(api: ApiRouter, places: PlacesService) {
  api.post('/sessions/:id/bookings', { access: DESK, params: idParams, body: createBookingSchema, status: 201, handler: ({ params, body, user }) => places.book(params.id, body, { userId: user.id }) });
  api.get('/sessions/:id/bookings', { access: 'signed_in', params: idParams, handler: ({ params }) => places.listForSession(params.id) });
  api.post('/bookings/:id/cancel', { access: DESK, params: idParams, body: cancelBookingSchema, handler: ({ params, user }) => places.cancel(params.id, { userId: user.id }) });
  api.post('/bookings/:id/check-in', { access: ['instructor', 'reception', 'owner'], params: idParams, body: checkInSchema, handler: ({ params, body, user }) => places.checkIn(params.id, body, user.id) });
  api.post('/bookings/:id/move', { access: DESK, params: idParams, body: moveBookingSchema, handler: ({ params, body, user }) => places.move(params.id, body.pointId, user.id) });
}
