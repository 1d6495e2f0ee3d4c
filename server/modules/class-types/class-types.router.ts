import type { ApiRouter } from '../../http/route';
import { idParams } from '../../../shared/schemas/common';
import { createClassTypeSchema, updateClassTypeSchema } from '../../../shared/schemas/class-types';
import type { ClassTypesService } from './class-types.service';

export function classTypesRoutes(api: ApiRouter, classTypes: ClassTypesService) {
  api.get('/class-types', { access: 'signed_in', handler: () => classTypes.list() });
  api.get('/class-types/:id', { access: 'signed_in', params: idParams, handler: ({ params }) => classTypes.get(params.id) });
  api.post('/class-types', { access: ['reception', 'owner'], body: createClassTypeSchema, status: 201, handler: ({ body, user }) => classTypes.create(body, user.id) });
  api.patch('/class-types/:id', { access: ['reception', 'owner'], params: idParams, body: updateClassTypeSchema, handler: ({ params, body, user }) => classTypes.update(params.id, body, user.id) });
}
