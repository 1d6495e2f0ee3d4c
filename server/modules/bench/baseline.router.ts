import Database from 'better-sqlite3';
import { monitorEventLoopDelay } from 'node:perf_hooks';
import { z } from 'zod';
import type { ApiRouter } from '../../http/route';
import { instantSchema } from '../../../shared/schemas/common';

/**
 * Benchmark only (LOFTWISE_BENCH_BASELINE=1): the same rows as the real endpoints, each read with
 * one prepared statement and no logic, so `npm run bench` can show what our logic costs.
 */
export function benchBaselineRoutes(api: ApiRouter, dbFile: string) {
  const raw = new Database(dbFile, { readonly: true, fileMustExist: true });
  const sessions = raw.prepare('SELECT s.*, sp.point_id FROM sessions s JOIN session_points sp ON sp.session_id = s.id WHERE s.starts_at < ? AND s.ends_at > ? ORDER BY s.starts_at');
  const points = raw.prepare('SELECT p.*, l.gear_id, l.position, l.mode FROM points p LEFT JOIN load_path_links l ON l.point_id = p.id ORDER BY p.id, l.position');
  const range = z.object({ from: instantSchema, to: instantSchema });
  api.get('/bench/baseline/sessions', { access: 'signed_in', query: range, handler: ({ query }) => sessions.all(new Date(query.to).toISOString(), new Date(query.from).toISOString()) });
  api.get('/bench/baseline/today', { access: 'signed_in', query: range, handler: ({ query }) => sessions.all(new Date(query.to).toISOString(), new Date(query.from).toISOString()) });
  api.get('/bench/baseline/points', { access: 'signed_in', handler: () => points.all() });
  // The server's own event-loop delay since the last ask (then started afresh): how long anything
  // waiting on the loop (a health check, a socket read) could have been held.
  const loop = monitorEventLoopDelay({ resolution: 5 });
  loop.enable();
  const ms = (ns: number) => Math.round(ns / 1e4) / 100;
  api.get('/bench/loop-delay', {
    access: 'signed_in',
    handler: () => {
      const figures = { p50Ms: ms(loop.percentile(50)), p99Ms: ms(loop.percentile(99)), maxMs: ms(loop.max), samples: loop.count };
      loop.reset();
      return figures;
    },
  });
}
