import type { ErrorRequestHandler, RequestHandler } from 'express';
import { ZodError } from 'zod';
import { HttpError } from './errors';
import { zodDetails } from './validate';
import { DatabaseBusyError, isBusy } from '../db/knex';

export const apiNotFound: RequestHandler = (req, res) => {
  res.status(404).json({ error: { code: 'not_found', message: `No such API route: ${req.method} ${req.path}` } });
};

/** Maps every thrown error to the error shape; anything unexpected is logged and answered 500 without internals. */
export function errorHandler(log: (err: unknown) => void): ErrorRequestHandler {
  return (err, req, res, _next) => {
    if (res.headersSent) return;
    if (err instanceof HttpError) {
      res.status(err.status).json({ error: { code: err.code, message: err.message, details: err.details } });
      return;
    }
    if (err instanceof ZodError) {
      res.status(400).json({ error: { code: 'invalid_request', message: 'Some fields are not valid.', details: zodDetails(err, 'body') } });
      return;
    }
    // body-parser and multer errors carry a status and a type; they are the caller's fault.
    const e = err as { status?: number; statusCode?: number; type?: string; code?: string; message?: string };
    const status = e.status ?? e.statusCode;
    if (e.type === 'entity.too.large' || e.code === 'LIMIT_FILE_SIZE') {
      res.status(413).json({ error: { code: 'too_large', message: 'The request or file is too large.' } });
      return;
    }
    if (typeof e.code === 'string' && e.code.startsWith('LIMIT_')) {
      res.status(400).json({ error: { code: 'invalid_upload', message: e.message ?? 'The upload was refused.' } });
      return;
    }
    if (status && status >= 400 && status < 500) {
      const code = e.type === 'entity.parse.failed' ? 'invalid_json' : 'bad_request';
      const message = e.type === 'entity.parse.failed' ? 'The request body is not valid JSON.' : 'The request could not be read.';
      res.status(status).json({ error: { code, message } });
      return;
    }
    // Only after writeTransaction waited out its patience (another process held the lock for
    // seconds): nothing was written, and trying again is right.
    if (err instanceof DatabaseBusyError || isBusy(err)) {
      res.set('Retry-After', '5').status(503).json({ error: { code: 'busy', message: 'The studio records are busy. Nothing was changed; try again in a moment.' } });
      return;
    }
    log(err);
    res.status(500).json({ error: { code: 'internal', message: 'Something went wrong on our side. It has been logged.' } });
  };
}
