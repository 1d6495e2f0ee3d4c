import type { ApiRouter } from '../../http/route';
import type { TodayService } from './today.service';

export function todayRoutes(api: ApiRouter, today: TodayService) {
  api.get('/today', { access: 'signed_in', handler: ({ user }) => today.today(user) });
}
