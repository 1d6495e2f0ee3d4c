/** The one error type. Services throw it; the error middleware turns it into PRODUCT.md §6's shape. */
export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = 'HttpError';
  }
}

export const badRequest = (code: string, message: string, details?: unknown) => new HttpError(400, code, message, details);
export const notFound = (what: string) => new HttpError(404, 'not_found', `${what} was not found.`);
export const conflict = (code: string, message: string, details?: unknown) => new HttpError(409, code, message, details);
export const forbidden = (message = 'Your role may not do this.') => new HttpError(403, 'forbidden', message);
