/**
 * Cross-site request forgery defence for every state-changing request:
 * 1. Sec-Fetch-Site, when the browser sends it, must be same-origin (or none: typed URL, scripts);
 * 2. Origin, when present, must be this server's own origin or PUBLIC_URL's;
 * 3. the X-CSRF-Token header must carry the token that GET /api/session returned.
 * A cross-site HTML form can set none of these, so it is refused with 403.
 */
import { createHmac, randomBytes, timingSafeEqual } from 'node:crypto';
import type { Request, RequestHandler } from 'express';
import { HttpError } from '../errors';

const SAFE = new Set(['GET', 'HEAD', 'OPTIONS']);

export function newCsrfToken(): string {
  return randomBytes(24).toString('base64url');
}

export function anonymousCsrfToken(secret: string): string {
  return createHmac('sha256', secret).update('trimout-anonymous-csrf').digest('base64url');
}

export function expectedCsrfToken(req: Request, secret: string): string {
  return req.user && req.session?.csrfToken ? req.session.csrfToken : anonymousCsrfToken(secret);
}

function sameToken(a: string, b: string): boolean {
  const x = Buffer.from(a);
  const y = Buffer.from(b);
  return x.length === y.length && timingSafeEqual(x, y);
}

export function csrfProtection(options: { secret: string; publicUrl?: string }): RequestHandler {
  const publicOrigin = options.publicUrl ? new URL(options.publicUrl).origin : undefined;
  return (req, _res, next) => {
    if (SAFE.has(req.method)) return next();
    const site = req.get('sec-fetch-site');
    if (site && site !== 'same-origin' && site !== 'none') {
      return next(new HttpError(403, 'cross_site', 'Requests from another site are refused.'));
    }
    const origin = req.get('origin');
    if (origin) {
      const own = `${req.protocol}://${req.get('host')}`;
      if (origin !== own && origin !== publicOrigin) {
        return next(new HttpError(403, 'cross_site', 'Requests from another site are refused.'));
      }
    }
    const token = req.get('x-csrf-token');
    if (!token || !sameToken(token, expectedCsrfToken(req, options.secret))) {
      return next(
        new HttpError(403, 'csrf', 'This request is missing its security token. Reload the page and try again.'),
      );
    }
    next();
  };
}

/**
 * Marks the answer as carrying the CSRF token: it is sent uncompressed (server/app.ts), so its
 * length never depends on the secret and on other content together (the BREACH attack on
 * compressed HTTPS answers).
 */
export function carriesSecret(req: Request): void {
  if (req.res) req.res.locals.carriesSecret = true;
}
