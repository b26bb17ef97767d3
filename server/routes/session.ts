/**
 * GET /api/session     who am I, my jobs and roles, and the CSRF token to send back
 * POST /api/session    sign in (e-mail + password)
 * DELETE /api/session  sign out: the session is destroyed and the cookie cleared
 */
import { Router, type Request, type Response, type NextFunction } from 'express';
import type passport from 'passport';
import { rateLimit } from 'express-rate-limit';
import { signInSchema, type SessionResponse } from '../../shared/schemas/session';
import { forbidden, tooManyRequests, unauthorized } from '../errors';
import { carriesSecret, expectedCsrfToken, newCsrfToken } from '../middleware/csrf';
import { validate } from '../middleware/validate';
import { policy } from '../policies';
import type { AccountLimits } from '../services/rateLimitStore';
import type { DeviceCookies } from '../auth/deviceCookie';
import { presentUser } from '../presenters/session';
import { jobsOf } from '../services/memberships';
import { UNCONFIRMED, type AuthUser } from '../auth/passport';

export interface SessionRouteOptions {
  passport: passport.PassportStatic;
  csrfSecret: string;
  cookieName: string;
  /** Failed sign-ins per account (or per known device) per 15 minutes; per address, all sign-in attempts. */
  signInLimits: AccountLimits;
  devices: DeviceCookies;
}

const WRONG = 'That e-mail and password do not match an account. Check both and try again.';
/** Said only after the password matched (no account enumeration). */
const UNCONFIRMED_MESSAGE =
  'Confirm your e-mail address first: open the link in the mail we sent you. If it expired, use "Forgot your password?" to get a new link.';

export function sessionRouter(options: SessionRouteOptions): Router {
  const router = Router();
  const { windowMs } = options.signInLimits;
  const limitHandler = (_req: Request, _res: Response, next: NextFunction, opts: { windowMs: number }) =>
    next(tooManyRequests('Too many sign-in attempts. Wait a few minutes and try again.', Math.ceil(opts.windowMs / 1000)));

  const perAddress = rateLimit({
    windowMs,
    limit: options.signInLimits.perAddress,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    handler: (req, res, next, opts) => limitHandler(req, res, next, opts),
    store: options.signInLimits.store?.('sign-in-address'),
  });
  // Failed sign-ins per account, except from a device that signed in to that account before: its
  // failures count against its own budget, so guessing from elsewhere cannot lock the owner out.
  const perAccount = rateLimit({
    windowMs,
    limit: options.signInLimits.perAccount,
    standardHeaders: false,
    legacyHeaders: false,
    skipSuccessfulRequests: true,
    keyGenerator: (req) => {
      const email = String(req.body?.email ?? '').trim().toLowerCase();
      const device = options.devices.deviceFor(req, email);
      return device ? `device:${device}` : `account:${email}`;
    },
    handler: (req, res, next, opts) => limitHandler(req, res, next, opts),
    store: options.signInLimits.store?.('sign-in-account'),
  });

  async function payload(req: Request): Promise<SessionResponse> {
    const csrfToken = expectedCsrfToken(req, options.csrfSecret);
    carriesSecret(req);
    if (!req.user) return { user: null, jobs: [], csrfToken };
    return { user: presentUser(req.user), jobs: await jobsOf(req.user.id), csrfToken };
  }

  router.get('/session', policy.public(), async (req, res) => {
    res.json(await payload(req));
  });

  router.post('/session', policy.public(), perAddress, validate({ body: signInSchema }), perAccount, (req, res, next) => {
    options.passport.authenticate('local', { session: false }, (err: unknown, user: AuthUser | false, info?: { message?: string }) => {
      if (err) return next(err);
      if (!user && info?.message === UNCONFIRMED) return next(forbidden(UNCONFIRMED_MESSAGE, 'email_unconfirmed'));
      if (!user) return next(unauthorized(WRONG));
      // passport >= 0.6 regenerates the session here: the old id dies, nothing of it is kept.
      req.login(user, (loginErr) => {
        if (loginErr) return next(loginErr);
        if (!options.devices.deviceFor(req, user.email)) options.devices.remember(res, user.email);
        req.session.signedInAt = Date.now();
        req.session.csrfToken = newCsrfToken();
        payload(req)
          .then((body) => res.status(200).json(body))
          .catch(next);
      });
    })(req, res, next);
  });

  router.delete('/session', policy.public(), (req, res, next) => {
    const clear = () => {
      res.clearCookie(options.cookieName, { path: '/' });
      res.status(204).end();
    };
    if (!req.session) return clear();
    req.logout((err) => {
      if (err) return next(err);
      req.session.destroy((destroyErr) => (destroyErr ? next(destroyErr) : clear()));
    });
  });

  return router;
}
