import type { ZodType } from 'zod';
import { errorSchema } from '../../shared/schemas/common';

export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
  }
  /** Field messages of a 400, keyed by field name. */
  get fields(): Record<string, string> {
    const d = this.details as { fields?: Record<string, string> } | undefined;
    return d?.fields ?? {};
  }
}

type Method = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
interface Options<T> {
  method?: Method;
  body?: unknown;
  schema?: ZodType<T>;
  signal?: AbortSignal;
}

let onUnauthenticated: () => void = () => undefined;
export function setUnauthenticatedHandler(fn: () => void) {
  onUnauthenticated = fn;
}

/** The one way the client talks to the API: JSON in and out, errors thrown as ApiError, answers parsed with the shared schema. */
export async function api<T = unknown>(path: string, opts: Options<T> = {}): Promise<T> {
  const isForm = typeof FormData !== 'undefined' && opts.body instanceof FormData;
  let res: Response;
  try {
    res = await fetch(`/api${path}`, {
      method: opts.method ?? 'GET',
      credentials: 'same-origin',
      headers: opts.body === undefined || isForm ? { Accept: 'application/json' } : { 'Content-Type': 'application/json', Accept: 'application/json' },
      body: opts.body === undefined ? undefined : isForm ? (opts.body as FormData) : JSON.stringify(opts.body),
      signal: opts.signal,
    });
  } catch (err) {
    if ((err as Error).name === 'AbortError') throw err;
    throw new ApiError(0, 'network', 'Cannot reach Loftwise. Check the connection and try again.');
  }
  const text = await res.text();
  const json = text ? safeJson(text) : undefined;
  if (!res.ok) {
    if (res.status === 401) onUnauthenticated();
    const parsed = errorSchema.safeParse(json);
    if (parsed.success) throw new ApiError(res.status, parsed.data.error.code, parsed.data.error.message, parsed.data.error.details);
    throw new ApiError(res.status, 'http_' + res.status, `The server answered ${res.status}.`);
  }
  if (!opts.schema) return json as T;
  const parsed = opts.schema.safeParse(json);
  if (!parsed.success) throw new ApiError(res.status, 'bad_response', 'The server sent an answer this page does not understand. Reload the page.');
  return parsed.data;
}

function safeJson(text: string): unknown {
  try {
    return JSON.parse(text);
  } catch {
    return undefined;
  }
}

export function errorMessage(err: unknown): string {
  if (err instanceof ApiError) return err.message;
  if (err instanceof Error) return err.message;
  return 'Something went wrong.';
}
