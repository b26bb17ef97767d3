import type { RequestHandler } from 'express';
import { unsupportedMediaType } from '../errors';

/** A request with a body on a JSON route must say application/json (else 415). */
export const requireJsonBody: RequestHandler = (req, _res, next) => {
  if (['POST', 'PUT', 'PATCH', 'DELETE'].includes(req.method)) {
    const hasBody = Number(req.get('content-length') ?? 0) > 0 || req.get('transfer-encoding') !== undefined;
    if (hasBody && !req.is('application/json')) {
      return next(unsupportedMediaType('Send the request body as application/json.'));
    }
  }
  next();
};
