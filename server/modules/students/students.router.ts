import type { ApiRouter } from '../../http/route';
import { idParams } from '../../../shared/schemas/common';
import { createStudentSchema, createWaiverVersionSchema, mergeStudentSchema, paperWaiverSchema, studentListQuery, updateStudentSchema } from '../../../shared/schemas/students';
import type { StudentsService } from './students.service';

const DESK = ['reception', 'owner'] as const;

/** Students and the waiver (PRODUCT.md §11). */
export function studentsRoutes(api: ApiRouter, students: StudentsService) {
  api.get('/students', { access: ['reception', 'owner', 'instructor'], query: studentListQuery, handler: ({ query }) => students.list(query) });
  api.post('/students', { access: DESK, body: createStudentSchema, status: 201, handler: ({ body, user }) => students.create(body, user.id) });
  // The instructor reads a student's page too: the emergency contact and the waiver before class.
  api.get('/students/:id', { access: ['reception', 'owner', 'instructor'], params: idParams, handler: ({ params }) => students.detail(params.id) });
  api.patch('/students/:id', { access: DESK, params: idParams, body: updateStudentSchema, handler: ({ params, body, user }) => students.update(params.id, body, user.id) });
  api.post('/students/:id/merge', { access: ['owner'], params: idParams, body: mergeStudentSchema, handler: ({ params, body, user }) => students.merge(params.id, body.intoId, user.id) });
  api.post('/students/:id/waiver', { access: DESK, params: idParams, body: paperWaiverSchema, status: 201, handler: ({ params, body, user }) => students.recordPaper(params.id, body, user.id) });

  // The current text for everyone signed in; the owner also sees every earlier version.
  api.get('/waivers', { access: 'signed_in', handler: ({ user }) => students.waivers(user.role === 'owner') });
  api.post('/waivers', { access: ['owner'], body: createWaiverVersionSchema, status: 201, handler: ({ body, user }) => students.addWaiverVersion(body.text, user.id) });
}
