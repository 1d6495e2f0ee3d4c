import type { ApiRouter } from '../../http/route';
import { updateStudioSchema } from '../../../shared/schemas/studio';
import type { StudioService } from './studio.service';

export function studioRoutes(api: ApiRouter, studio: StudioService) {
  api.get('/studio', { access: 'signed_in', handler: () => studio.get() });
  api.patch('/studio', { access: ['owner'], body: updateStudioSchema, handler: ({ body }) => studio.update(body) });
}
