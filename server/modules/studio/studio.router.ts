import type { ApiRouter } from '../../http/route';
import { policyPreviewBodySchema, updateStudioSchema } from '../../../shared/schemas/studio';
import type { StudioService } from './studio.service';
import type { PolicyPreviewService } from './policy-preview.service';

export function studioRoutes(api: ApiRouter, studio: StudioService, preview: PolicyPreviewService) {
  api.get('/studio', { access: 'signed_in', handler: () => studio.get() });
  api.patch('/studio', { access: ['owner'], body: updateStudioSchema, handler: ({ body, user }) => studio.update(body, user.id) });
  // Changes nothing: shows the owner what a proposed policy would do now, before they confirm it.
  api.post('/studio/policy/preview', { access: ['owner'], body: policyPreviewBodySchema, handler: ({ body }) => preview.preview(body.policy) });
}
