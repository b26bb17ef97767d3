import type { RequestHandler } from 'express';
import { unsupportedMediaType } from '../errors';

/** Routes (paths relative to /api) that also take a CSV file as text/csv. */
export const TEXT_CSV_PATHS: readonly RegExp[] = [/^\/jobs\/[^/]+\/units\/import$/];
/** Routes (paths relative to /api) that also take photos as multipart/form-data (server/middleware/upload.ts reads them). */
export const MULTIPART_PATHS: readonly RegExp[] = [
  /^\/jobs\/[^/]+\/findings$/,
  /^\/jobs\/[^/]+\/findings\/batch$/,
  /^\/jobs\/[^/]+\/findings\/[^/]+\/(fixes|photos|reinspections)$/,
  /^\/jobs\/[^/]+\/levels\/[^/]+\/plan$/,
  /^\/jobs\/[^/]+\/test-records$/,
];

/** A request with a body on a JSON route must say application/json (else 415). */
export const requireJsonBody: RequestHandler = (req, _res, next) => {
  if (['POST', 'PUT', 'PATCH', 'DELETE'].includes(req.method)) {
    const hasBody = Number(req.get('content-length') ?? 0) > 0 || req.get('transfer-encoding') !== undefined;
    const csvAllowed = req.method === 'POST' && TEXT_CSV_PATHS.some((p) => p.test(req.path)) && typeof req.is('text/csv') === 'string';
    const multipartAllowed =
      req.method === 'POST' && MULTIPART_PATHS.some((p) => p.test(req.path)) && typeof req.is('multipart/form-data') === 'string';
    if (hasBody && !req.is('application/json') && !csvAllowed && !multipartAllowed) {
      return next(unsupportedMediaType('Send the request body as application/json.'));
    }
  }
  next();
};
