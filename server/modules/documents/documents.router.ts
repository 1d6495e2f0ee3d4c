import type { ApiRouter } from '../../http/route';
import { idParams } from '../../../shared/schemas/common';
import { notFound } from '../../http/errors';
import type { DocumentsService } from './documents.service';

export function documentsRoutes(api: ApiRouter, docs: DocumentsService) {
  api.get('/documents/:id/file', {
    access: 'signed_in',
    params: idParams,
    handler: async ({ params, res }) => {
      const f = await docs.file(params.id);
      // Served as a download with its checked type; never sniffed, never run as a page.
      res.setHeader('X-Content-Type-Options', 'nosniff');
      res.setHeader('Content-Security-Policy', "default-src 'none'; sandbox");
      res.setHeader('Cache-Control', 'private, no-store');
      const inline = f.mime.startsWith('image/') || f.mime === 'application/pdf';
      res.attachment(f.name);
      if (inline) res.setHeader('Content-Disposition', res.getHeader('Content-Disposition')!.toString().replace(/^attachment/, 'inline'));
      res.type(f.mime);
      await new Promise<void>((resolve, reject) => res.sendFile(f.path, (err) => (err ? reject(res.headersSent ? err : notFound('The stored file')) : resolve())));
      return undefined;
    },
  });
}
