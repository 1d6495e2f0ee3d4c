import type { ApiRouter } from '../../http/route';
import { idParams } from '../../../shared/schemas/common';
import { bookMyselfSchema, signWaiverSchema } from '../../../shared/schemas/my';
import type { MyService } from './my.service';

const STUDENT = ['student'] as const;

/** `/api/my/*` for students (PRODUCT.md §11): only ever about the caller's own student record. */
export function myRoutes(api: ApiRouter, my: MyService) {
  api.get('/my/profile', { access: STUDENT, handler: ({ user }) => my.profile(user) });
  api.get('/my/bookings', { access: STUDENT, handler: ({ user }) => my.bookings(user) });
  api.post('/my/bookings', { access: STUDENT, body: bookMyselfSchema, status: 201, handler: ({ user, body }) => my.book(user, body.sessionId) });
  api.post('/my/bookings/:id/cancel', { access: STUDENT, params: idParams, handler: ({ user, params }) => my.cancel(user, params.id) });
  api.get('/my/waiver', { access: STUDENT, handler: ({ user }) => my.waiver(user) });
  api.post('/my/waiver', { access: STUDENT, body: signWaiverSchema, status: 201, handler: ({ user, body }) => my.signWaiver(user, body) });
}
