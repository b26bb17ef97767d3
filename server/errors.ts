/**
 * One error module: stable machine-readable ids, one JSON envelope
 * `{ error: { id, message, fields? } }`, and one handler registered after every route.
 */
import type { ErrorRequestHandler, RequestHandler } from 'express';
import { UniqueConstraintError, ValidationError as SequelizeValidationError, ConnectionError } from 'sequelize';

export type FieldErrors = Record<string, string>;

export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly id: string,
    message: string,
    readonly fields?: FieldErrors,
    readonly headers?: Record<string, string>,
  ) {
    super(message);
  }
}

export const badRequest = (message: string, fields?: FieldErrors) =>
  new HttpError(400, 'bad_request', message, fields);
/** A list position (cursor) the list did not issue for this very request: its sort, filters and path. */
export const invalidCursor = () => {
  const message = 'This list position is not valid any more; start again from the first page.';
  return new HttpError(400, 'invalid_cursor', message, { cursor: message });
};
export const unauthorized = (message = 'Sign in to continue.') => new HttpError(401, 'unauthorized', message);
export const forbidden = (message = 'Your role on this job does not allow that. Ask a GC manager on the job if it needs doing.', id = 'forbidden') => new HttpError(403, id, message);
export const notFound = (message = 'That is not here: it may have been removed, or the link is not complete.') => new HttpError(404, 'not_found', message);
export const conflict = (message: string, id = 'conflict') => new HttpError(409, id, message);
export const preconditionFailed = (message: string) => new HttpError(412, 'stale', message);
export const payloadTooLarge = (message: string) => new HttpError(413, 'too_large', message);
export const unsupportedMediaType = (message: string) => new HttpError(415, 'unsupported_media_type', message);
export const unprocessable = (message: string) => new HttpError(422, 'unprocessable', message);
export const preconditionRequired = (message: string) => new HttpError(428, 'precondition_required', message);
export const tooManyRequests = (message: string, retryAfterSeconds?: number) =>
  new HttpError(
    429,
    'too_many_requests',
    message,
    undefined,
    retryAfterSeconds ? { 'Retry-After': String(retryAfterSeconds) } : undefined,
  );
export const serviceUnavailable = (message: string) => new HttpError(503, 'unavailable', message);

/** JSON 404 for unknown /api paths; registered after every API route. */
export const apiNotFound: RequestHandler = (req, _res, next) => {
  next(notFound(`No API route for ${req.method} ${req.baseUrl}${req.path}.`));
};

interface BodyParserError extends Error {
  type?: string;
  status?: number;
  expose?: boolean;
}

function classify(err: unknown): HttpError {
  if (err instanceof HttpError) return err;
  if (err instanceof UniqueConstraintError) {
    return conflict('That already exists. Change the name or tag so it is different, or use the one there.', 'duplicate');
  }
  if (err instanceof SequelizeValidationError) {
    const fields: FieldErrors = {};
    for (const item of err.errors) if (item.path) fields[item.path] = item.message;
    return badRequest('Check the fields marked below.', fields);
  }
  if (err instanceof ConnectionError) {
    return serviceUnavailable('The database is not reachable right now. Try again in a moment.');
  }
  const e = err as BodyParserError & { code?: string };
  // The database went away (node-postgres error codes and PostgreSQL SQLSTATE classes 08 and 57P).
  if (e && typeof e.code === 'string' && (/^(ECONNREFUSED|ECONNRESET|ETIMEDOUT|57P0[1-3])$/.test(e.code) || e.code.startsWith('08'))) {
    return serviceUnavailable('The database is not reachable right now. Try again in a moment.');
  }
  // body-parser and multer errors carry a type or code; classify by those, never by message text.
  if (e && typeof e === 'object') {
    if (e.type === 'entity.parse.failed') return badRequest('The request body is not valid JSON.');
    if (e.type === 'entity.too.large') return payloadTooLarge('The request body is too large.');
    if (e.type === 'encoding.unsupported' || e.type === 'charset.unsupported') {
      return unsupportedMediaType('The request body encoding is not supported.');
    }
    if (typeof e.status === 'number' && e.status >= 400 && e.status < 500 && e.expose) {
      return new HttpError(e.status, 'bad_request', 'The app sent something the server could not read. Reload the page and try again.');
    }
  }
  return new HttpError(500, 'internal', 'Something went wrong on our side; it has been logged. Try again in a moment.');
}

export function errorHandler(log: (msg: string, err: unknown) => void): ErrorRequestHandler {
  return (err, req, res, _next) => {
    const httpError = classify(err);
    if (httpError.status >= 500) log(`${req.method} ${req.originalUrl} failed`, err);
    if (res.headersSent) {
      res.end();
      return;
    }
    if (httpError.headers) res.set(httpError.headers);
    const current = (httpError as { current?: unknown }).current;
    res.status(httpError.status).json({
      error: {
        id: httpError.id,
        message: httpError.message,
        ...(httpError.fields ? { fields: httpError.fields } : {}),
      },
      ...(current !== undefined ? { current } : {}),
    });
  };
}
