import type { Express } from 'express';
import type { ApiRouter } from '../../http/route';
import type { FeedsService } from './feeds.service';

const FEED_HOLDERS = ['instructor', 'student'] as const;

/** The account page's feed controls (signed in) and the feed itself (the token is the key). */
export function feedsRoutes(api: ApiRouter, feeds: FeedsService) {
  api.get('/my/feed', { access: FEED_HOLDERS, handler: ({ user }) => feeds.state(user) });
  api.post('/my/feed', { access: FEED_HOLDERS, status: 201, handler: ({ user }) => feeds.renew(user) });
  api.delete('/my/feed', { access: FEED_HOLDERS, handler: async ({ user }) => void (await feeds.revoke(user)) });
}

/** `GET /ical/<token>.ics`: no session (calendar apps send none); an unknown or revoked token is 404. */
export function feedRoute(app: Express, feeds: FeedsService) {
  app.get('/ical/:file', async (req, res, next) => {
    try {
      const match = /^(.+)\.ics$/.exec(req.params.file);
      const body = match ? await feeds.calendar(match[1]) : null;
      if (body === null) return void res.status(404).type('text/plain').send('No calendar at this address: it may have been turned off or renewed.');
      res.set({ 'Cache-Control': 'private, no-store', 'Referrer-Policy': 'no-referrer' }).type('text/calendar; charset=utf-8').send(body);
    } catch (err) {
      next(err);
    }
  });
}
