/**
 * Accounts by mail, no session needed:
 * POST /api/signup                         a GC new to Trimout: company + first account (unconfirmed)
 * POST /api/email-confirmations/:token     confirm the address, then signed in
 * POST /api/password-resets                ask for a reset link (always the same 202)
 * GET  /api/password-resets/:token         is the link still good?
 * POST /api/password-resets/:token         new password: every other session ends, then signed in
 *
 * No answer tells whether an address has an account: sign-up and reset requests answer the same
 * 202 either way, and the mail (to the address's owner) says what happened.
 */
import { Router, type NextFunction, type Request, type Response } from 'express';
import { rateLimit } from 'express-rate-limit';
import { UniqueConstraintError } from 'sequelize';
import type { z } from 'zod';
import {
  passwordResetRequestSchema,
  passwordResetSchema,
  signUpSchema,
  tokenParamsSchema,
  type AcceptedResponse,
  type PasswordResetPreview,
} from '../../shared/schemas/auth';
import { signInAs } from '../auth/establish';
import { hashPassword } from '../auth/passwords';
import { tooManyRequests } from '../errors';
import type { MailService } from '../mail';
import { validate, valid } from '../middleware/validate';
import { policy } from '../policies';
import type { AccountLimits } from '../services/rateLimitStore';
import { confirmEmail } from '../commands/confirmEmail';
import { sendPasswordReset } from '../commands/sendPasswordReset';
import { resetPassword } from '../commands/resetPassword';
import { signUp } from '../commands/signUp';
import { hashToken, inspectToken } from '../services/tokens';
import { inTransaction, sequelizeOf } from '../services/records';
import { idempotentWrite } from '../services/idempotency';

export interface AccountRouteOptions {
  mail: MailService;
  log: (message: string, err?: unknown) => void;
  /** The sign-in limits: the same per-address budget; per-account for mails to one address. */
  limits: AccountLimits;
}

export const SIGN_UP_ACCEPTED: AcceptedResponse = {
  message: 'Check your e-mail: we sent a link to confirm your address. It works for 24 hours.',
};
export const RESET_ACCEPTED: AcceptedResponse = {
  message: 'If that address has a Trimout account, we sent it a link to choose a new password. It works for 1 hour.',
};

type Token = z.infer<typeof tokenParamsSchema>;

export function accountsRouter(options: AccountRouteOptions): Router {
  const router = Router();
  const { mail } = options;
  const { windowMs } = options.limits;
  const tooMany = (_req: Request, _res: Response, next: NextFunction) =>
    next(tooManyRequests('Too many attempts. Wait a few minutes and try again.', Math.ceil(windowMs / 1000)));
  const perAddress = rateLimit({
    windowMs,
    limit: options.limits.perAddress,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    handler: tooMany,
    store: options.limits.store?.('account-address'),
  });
  // Mails to one address: the same budget as failed sign-ins, so nobody can flood an inbox.
  const perEmail = rateLimit({
    windowMs,
    limit: options.limits.perAccount,
    standardHeaders: false,
    legacyHeaders: false,
    keyGenerator: (req) => `mail:${String(req.body?.email ?? '').trim().toLowerCase()}`,
    handler: tooMany,
    store: options.limits.store?.('account-mail'),
  });
  const perToken = rateLimit({
    windowMs,
    limit: options.limits.perAccount,
    standardHeaders: false,
    legacyHeaders: false,
    keyGenerator: (req) => `token:${hashToken(String(req.params.token ?? ''))}`, // never keep the token itself
    handler: tooMany,
    store: options.limits.store?.('account-token'),
  });

  router.post('/signup', policy.public(), perAddress, validate({ body: signUpSchema }), perEmail, async (req, res) => {
    const input = valid<z.infer<typeof signUpSchema>>(req.valid.body);
    // Hash first, whatever happens next: every answer takes as long (no enumeration by timing).
    const passwordHash = await hashPassword(input.password);
    try {
      await idempotentWrite(req, res, async (transaction) => {
        await signUp({ transaction, mail }, input, passwordHash);
        return { status: 202, body: SIGN_UP_ACCEPTED };
      });
    } catch (err) {
      // Two sign-ups with one address at the same moment: the loser gets the same answer.
      if (err instanceof UniqueConstraintError && !res.headersSent) {
        res.status(202).json(SIGN_UP_ACCEPTED);
        return;
      }
      throw err;
    }
  });

  router.post('/email-confirmations/:token', policy.public(), perAddress, validate({ params: tokenParamsSchema }), perToken, async (req, res) => {
    const { token } = valid<Token>(req.valid.params);
    const userId = await inTransaction(req, (transaction) => confirmEmail({ transaction }, token));
    res.status(200).json(await signInAs(req, userId));
  });

  router.post('/password-resets', policy.public(), perAddress, validate({ body: passwordResetRequestSchema }), perEmail, async (req, res) => {
    const { email } = valid<z.infer<typeof passwordResetRequestSchema>>(req.valid.body);
    // Answer first, then do the work: the answer's time cannot tell a known address from an unknown one.
    res.status(202).json(RESET_ACCEPTED);
    await sendPasswordReset({ sequelize: sequelizeOf(req), mail }, email).catch((err: unknown) =>
      options.log('password reset mail could not be prepared', err),
    );
  });

  router.get('/password-resets/:token', policy.public(), perAddress, validate({ params: tokenParamsSchema }), async (req, res) => {
    const { token } = valid<Token>(req.valid.params);
    const row = await inspectToken(token, 'password_reset');
    res.json({ valid: true, expiresAt: row.expiresAt.toISOString() } satisfies PasswordResetPreview);
  });

  router.post(
    '/password-resets/:token',
    policy.public(),
    perAddress,
    validate({ params: tokenParamsSchema, body: passwordResetSchema }),
    perToken,
    async (req, res) => {
      const { token } = valid<Token>(req.valid.params);
      const { password } = valid<z.infer<typeof passwordResetSchema>>(req.valid.body);
      await inspectToken(token, 'password_reset'); // a dead link fails before the slow hash
      const passwordHash = await hashPassword(password);
      const userId = await inTransaction(req, (transaction) => resetPassword({ transaction }, token, passwordHash));
      res.status(200).json(await signInAs(req, userId));
    },
  );

  return router;
}
