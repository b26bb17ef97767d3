/**
 * NUL (U+0000) is never meaningful in Trimout's text, and PostgreSQL cannot store it in text
 * columns: left in, it is stored mangled, breaks a streamed export after its headers, or matches
 * everything in a search. Every input is checked here, once, and refused with a 400 naming the
 * field: the path, the query, JSON and CSV bodies (refuseNul, mounted after the body parsers) and
 * the JSON carried in a multipart `data` field (upload.ts calls nulField on it).
 */
import type { RequestHandler } from 'express';
import { badRequest, type HttpError } from '../errors';

const MESSAGE = 'must not contain a NUL character (U+0000).';

/** The dotted path of the first string or key holding a NUL, or null. */
export function nulField(value: unknown, path = ''): string | null {
  if (typeof value === 'string') return value.includes('\u0000') ? path || 'body' : null;
  if (Buffer.isBuffer(value)) return value.includes(0) ? path || 'body' : null;
  if (Array.isArray(value)) {
    for (let i = 0; i < value.length; i += 1) {
      const found = nulField(value[i], path ? `${path}.${i}` : String(i));
      if (found) return found;
    }
    return null;
  }
  if (value && typeof value === 'object') {
    for (const [key, inner] of Object.entries(value)) {
      const here = path ? `${path}.${key}` : key;
      if (key.includes('\u0000')) return path || 'body';
      const found = nulField(inner, here);
      if (found) return found;
    }
  }
  return null;
}

export function nulRefusal(field: string): HttpError {
  return badRequest(`${field}: ${MESSAGE}`, { [field]: MESSAGE });
}

function decodedPath(path: string): string {
  try {
    return decodeURIComponent(path);
  } catch {
    return path; // a malformed escape is the router's 404/400, not ours
  }
}

export const refuseNul: RequestHandler = (req, _res, next) => {
  if (decodedPath(req.path).includes('\u0000')) return next(nulRefusal('path'));
  const inQuery = nulField(req.query);
  if (inQuery) return next(nulRefusal(inQuery === 'body' ? 'query' : inQuery));
  const inBody = nulField(req.body);
  if (inBody) return next(nulRefusal(inBody));
  next();
};
