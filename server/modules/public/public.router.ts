import type { Express } from 'express';
import { parseOrThrow } from '../../http/validate';
import { publicTimetableQuery } from '../../../shared/schemas/my';
import type { PublicService } from './public.service';

/**
 * `/api/public/*`: the one part of the API answered without sign-in besides /api/health
 * (PRODUCT.md §6, §11). Registered before the session check; nothing here reads the session.
 */
export function publicRoutes(app: Express, service: PublicService) {
  // The studio's name and zone, so the public timetable shows times as the studio reads them.
  app.get('/api/public/studio', async (_req, res, next) => {
    try {
      res.set('Cache-Control', 'public, max-age=60').json(await service.studio());
    } catch (err) {
      next(err);
    }
  });
  app.get('/api/public/timetable', async (req, res, next) => {
    try {
      const query = parseOrThrow(publicTimetableQuery, { ...req.query }, 'query');
      res.set('Cache-Control', 'public, max-age=30').json(await service.timetable(query));
    } catch (err) {
      next(err);
    }
  });
}
