import type { ApiRouter } from '../../http/route';
import { idParams } from '../../../shared/schemas/common';
import { createUserSchema, myPreferencesSchema, resetPasswordSchema, updateUserSchema } from '../../../shared/schemas/staff';
import type { StaffService } from './staff.service';

export function staffRoutes(api: ApiRouter, staff: StaffService) {
  api.get('/me', { access: 'everyone', handler: ({ user }) => user });
  api.get('/me/preferences', { access: 'signed_in', handler: async ({ user }) => ({ digestOptOut: (await staff.get(user.id)).digestOptOut }) });
  api.patch('/me/preferences', { access: 'signed_in', body: myPreferencesSchema, handler: ({ body, user }) => staff.setPreferences(user.id, body) });
  api.get('/users', { access: ['owner', 'reception'], handler: () => staff.list() });
  // Names to filter and pick by, for every role; /users stays staff administration.
  api.get('/instructors', { access: 'signed_in', handler: () => staff.activeInstructors() });
  api.post('/users', { access: ['owner'], body: createUserSchema, status: 201, handler: ({ body, user }) => staff.create(body, user.id) });
  api.patch('/users/:id', {
    access: ['owner'],
    params: idParams,
    body: updateUserSchema,
    handler: ({ params, body, user }) => staff.update(params.id, body, user.id),
  });
  api.post('/users/:id/password', {
    access: ['owner'],
    params: idParams,
    body: resetPasswordSchema,
    handler: async ({ params, body, user }) => {
      await staff.resetPassword(params.id, body.password, user.id);
      return { ok: true };
    },
  });
}
