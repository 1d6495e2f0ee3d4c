import type { ZodError, ZodType } from 'zod';
import { HttpError } from './errors';

export type Source = 'body' | 'query' | 'params';

/** Field messages keyed by path, so a form can show each next to its field. */
export function zodDetails(err: ZodError, source: Source) {
  const fields: Record<string, string> = {};
  for (const issue of err.issues) {
    const key = issue.path.length ? issue.path.join('.') : '_';
    fields[key] ??= issue.message;
  }
  return { source, fields };
}

/** The one validation path: parse with the shared schema, or throw 400 with field messages. */
export function parseOrThrow<T>(schema: ZodType<T>, value: unknown, source: Source): T {
  const result = schema.safeParse(value);
  if (!result.success) {
    const what = source === 'body' ? 'Some fields are not valid.' : source === 'query' ? 'The query is not valid.' : 'The address is not valid.';
    throw new HttpError(400, 'invalid_request', what, zodDetails(result.error, source));
  }
  return result.data;
}
