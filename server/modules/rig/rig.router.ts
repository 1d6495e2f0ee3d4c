import { z } from 'zod';
import type { ApiRouter } from '../../http/route';
import { idParams, instantSchema, idSchema } from '../../../shared/schemas/common';
import {
  createGearSchema,
  createPointSchema,
  createRoomSchema,
  gearEventBodySchema,
  gearListQuery,
  loadCheckQuery,
  loadPathBodySchema,
  mountApparatusSchema,
  reasonBodySchema,
  updateGearSchema,
  updatePointSchema,
  uploadFieldsSchema,
} from '../../../shared/schemas/rig';
import { writeTransaction, type Db } from '../../db/knex';
import { HttpError, notFound } from '../../http/errors';
import type { DocumentsService, UploadedFile } from '../documents/documents.service';
import type { RigService } from './rig.service';
import type { SessionRecords } from '../sessions/session-records';
import type { PersonLimiters } from '../../http/person-limits';

const RIG_EDITORS = ['rigger', 'owner'] as const;
const RIGGER = ['rigger'] as const;

export function rigRoutes(api: ApiRouter, rig: RigService, docs: DocumentsService, db: Db, records: SessionRecords, limits: PersonLimiters) {
  const uploadLimit = limits.uploads;
  // rooms
  api.get('/rooms', { access: 'signed_in', handler: () => rig.listRooms() });
  api.get('/rooms/:id', { access: 'signed_in', params: idParams, handler: ({ params }) => rig.getRoom(params.id) });
  api.post('/rooms', { access: RIG_EDITORS, body: createRoomSchema, status: 201, handler: ({ body, user }) => rig.createRoom(body.name, user.id) });

  // points
  api.get('/points', { access: 'signed_in', query: z.object({ roomId: idSchema.optional() }), handler: ({ query }) => rig.listPoints(query) });
  api.get('/points/:id', { access: 'signed_in', params: idParams, handler: ({ params }) => rig.getPoint(params.id) });
  api.post('/points', { access: RIG_EDITORS, body: createPointSchema, status: 201, handler: ({ body, user }) => rig.createPoint(body, user.id) });
  api.patch('/points/:id', { access: RIG_EDITORS, params: idParams, body: updatePointSchema, handler: ({ params, body, user }) => rig.updatePoint(params.id, body, user.id) });
  api.get('/points/:id/status', {
    access: 'signed_in',
    params: idParams,
    query: z.object({ at: instantSchema.optional() }),
    handler: ({ params, query }) => rig.pointStatus(params.id, query.at ? new Date(query.at) : null),
  });
  // The point's history of classes: each as it stood at the class's start (PRODUCT.md §10).
  api.get('/points/:id/records', {
    access: 'signed_in',
    params: idParams,
    query: z.object({ limit: z.coerce.number().int().min(1).max(500).default(100), cursor: z.string().regex(/^[0-9T:.Z-]{20,30}_\d{1,12}$/, 'Use the nextCursor of the page before').optional() }),
    handler: async ({ params, query }) => {
      if (!(await db('points').where({ id: params.id }).first('id'))) throw notFound('That rigging point');
      const cursor = query.cursor ? { startsAt: query.cursor.split('_')[0], id: Number(query.cursor.split('_')[1]) } : undefined;
      return records.forPoint(params.id, { limit: query.limit, cursor });
    },
  });
  api.put('/points/:id/load-path', { access: RIG_EDITORS, params: idParams, body: loadPathBodySchema, handler: ({ params, body, user }) => rig.replaceLoadPath(params.id, body, user.id) });
  // A changeover (§4.7): riggers, and instructors at the point before their class.
  api.post('/points/:id/apparatus', { access: ['rigger', 'instructor'], params: idParams, body: mountApparatusSchema, handler: ({ params, body, user }) => rig.mountApparatus(params.id, body.gearId, user.id) });
  api.get('/points/:id/load-check', { access: 'signed_in', params: idParams, query: loadCheckQuery, handler: ({ params, query }) => rig.loadCheck(params.id, query) });

  // gear
  api.get('/gear', { access: 'signed_in', query: gearListQuery, handler: ({ query }) => rig.listGear(query) });
  api.get('/gear/:id', { access: 'signed_in', params: idParams, handler: ({ params }) => rig.getGear(params.id) });
  api.post('/gear', { access: RIG_EDITORS, body: createGearSchema, status: 201, handler: ({ body, user }) => rig.createGear(body, user.id) });
  api.patch('/gear/:id', { access: RIG_EDITORS, params: idParams, body: updateGearSchema, handler: ({ params, body, user }) => rig.updateGear(params.id, body, user.id) });
  api.post('/gear/:id/retire', { access: RIGGER, params: idParams, body: reasonBodySchema, handler: ({ params, body, user }) => rig.setGearStatus(params.id, 'retired', body.reason, user.id) });
  api.post('/gear/:id/quarantine', { access: RIGGER, params: idParams, body: reasonBodySchema, handler: ({ params, body, user }) => rig.setGearStatus(params.id, 'quarantined', body.reason, user.id) });
  api.post('/gear/:id/events', { access: RIGGER, params: idParams, body: gearEventBodySchema, status: 201, handler: ({ params, body, user }) => rig.recordEvent(params.id, body, user.id) });

  // documents: the engineer's assessment of a point, a maker's certificate for gear
  for (const owner of ['point', 'gear'] as const) {
    const base = owner === 'point' ? '/points/:id/documents' : '/gear/:id/documents';
    const exists = async (id: number) => {
      const row = await db(owner === 'point' ? 'points' : 'gear_items').where({ id }).first('id');
      if (!row) throw notFound(owner === 'point' ? 'That rigging point' : 'That gear item');
    };
    api.get(base, { access: 'signed_in', params: idParams, handler: async ({ params }) => (await exists(params.id), docs.list({ type: owner, id: params.id })) });
    api.post(base, {
      access: RIG_EDITORS,
      params: idParams,
      before: [uploadLimit, docs.upload('file', 1)],
      body: uploadFieldsSchema,
      status: 201,
      handler: async ({ params, body, req, user }) => {
        await exists(params.id);
        const files = (req.files as UploadedFile[] | undefined) ?? [];
        if (!files.length) throw new HttpError(400, 'no_file', 'Choose a file to upload (field “file”).');
        const { stored, notStored } = await writeTransaction(db, (trx) => docs.store(trx, { type: owner, id: params.id }, files, body.kind, user.id));
        // A document is the whole request: when it cannot be kept, nothing was recorded and the sender is told why.
        if (!stored.length) throw new HttpError(507, 'file_not_stored', `“${notStored[0].name}” could not be stored: ${notStored[0].reason}. Nothing was saved; try again later.`);
        return stored[0];
      },
    });
  }
}
