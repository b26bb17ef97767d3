/**
 * Invitations to a job, by mail.
 * POST   /api/jobs/:jobId/invitations                 GC manager: invite an address with a role and company
 * POST   /api/jobs/:jobId/invitations/bulk            GC manager: { people: [{ email, role, companyId? }] }; all or none
 * POST   /api/jobs/:jobId/invitations/:invitationId/resend  GC manager: a pending one again, with a new link
 * GET    /api/jobs/:jobId/invitations                 GC manager: the pending ones
 * DELETE /api/jobs/:jobId/invitations/:invitationId   GC manager: withdraw one
 * GET    /api/invitations/:token                      no session: what the link is for
 * POST   /api/invitations/:token                      no session: accept (new account, or an existing
 *                                                     one with its current password), then signed in
 * Writes: commands/inviteToJob.ts, commands/acceptInvitation.ts; reads: services/invitations.ts.
 */
import { Router, type NextFunction, type Request, type Response } from 'express';
import { rateLimit } from 'express-rate-limit';
import type { z } from 'zod';
import {
  invitationAcceptSchema,
  invitationBulkSchema,
  invitationCreateSchema,
  invitationListQuerySchema,
  invitationParamsSchema,
  invitationResendSchema,
  tokenParamsSchema,
} from '../../shared/schemas/auth';
import { jobParamsSchema } from '../../shared/schemas/setup';
import { signInAs } from '../auth/establish';
import { acceptInvitation } from '../commands/acceptInvitation';
import { inviteSeveral, inviteToJob, resendInvitation } from '../commands/inviteToJob';
import { tooManyRequests } from '../errors';
import type { MailService } from '../mail';
import { validate, valid } from '../middleware/validate';
import { policy } from '../policies';
import { presentInvitation } from '../presenters/invitation';
import { idempotentWrite } from '../services/idempotency';
import { invitationPreview, listPendingInvitations, withdrawInvitation } from '../services/invitations';
import { pageRequest } from '../services/paging';
import type { AccountLimits } from '../services/rateLimitStore';
import { inTransaction, sequelizeOf } from '../services/records';
import { hashToken } from '../services/tokens';

export interface InvitationRouteOptions {
  mail: MailService;
  limits: AccountLimits;
}

export function invitationsRouter(options: InvitationRouteOptions): Router {
  const router = Router();
  const { mail } = options;
  const { windowMs } = options.limits;
  const tooMany = (_req: Request, _res: Response, next: NextFunction) =>
    next(tooManyRequests('Too many attempts. Wait a few minutes and try again.', Math.ceil(windowMs / 1000)));
  const perAddress = rateLimit({ windowMs, limit: options.limits.perAddress, standardHeaders: 'draft-8', legacyHeaders: false, handler: tooMany, store: options.limits.store?.('invitation-address') });
  // Accepting with an existing account checks its password: throttled per link like sign-in per account.
  const perToken = rateLimit({
    windowMs,
    limit: options.limits.perAccount,
    standardHeaders: false,
    legacyHeaders: false,
    skipSuccessfulRequests: true,
    keyGenerator: (req) => `invitation:${hashToken(String(req.params.token ?? ''))}`, // never keep the token itself
    handler: tooMany,
    store: options.limits.store?.('invitation-token'),
  });

  router.post(
    '/jobs/:jobId/invitations',
    policy.jobMember(['gc_manager']),
    validate({ params: jobParamsSchema, body: invitationCreateSchema }),
    async (req, res) => {
      const input = valid<z.infer<typeof invitationCreateSchema>>(req.valid.body);
      const { job, companyId } = req.membership!;
      await idempotentWrite(req, res, async (transaction) => {
        const row = await inviteToJob({ transaction, mail, scope: { job, companyId }, actor: req.user! }, input);
        return { status: 201, body: presentInvitation(row) };
      });
    },
  );

  router.post(
    '/jobs/:jobId/invitations/bulk',
    policy.jobMember(['gc_manager']),
    validate({ params: jobParamsSchema, body: invitationBulkSchema }),
    async (req, res) => {
      const { people } = valid<z.infer<typeof invitationBulkSchema>>(req.valid.body);
      const { job, companyId } = req.membership!;
      await idempotentWrite(req, res, async (transaction) => {
        const rows = await inviteSeveral({ transaction, mail, scope: { job, companyId }, actor: req.user! }, people);
        return { status: 201, body: { items: rows.map(presentInvitation) } };
      });
    },
  );

  router.post(
    '/jobs/:jobId/invitations/:invitationId/resend',
    policy.jobMember(['gc_manager']),
    validate({ params: invitationParamsSchema, body: invitationResendSchema }),
    async (req, res) => {
      const { invitationId } = valid<z.infer<typeof invitationParamsSchema>>(req.valid.params);
      const { job, companyId } = req.membership!;
      await idempotentWrite(req, res, async (transaction) => {
        const row = await resendInvitation({ transaction, mail, scope: { job, companyId }, actor: req.user! }, invitationId);
        return { status: 200, body: presentInvitation(row) };
      });
    },
  );

  router.get(
    '/jobs/:jobId/invitations',
    policy.jobMember(['gc_manager']),
    validate({ params: jobParamsSchema, query: invitationListQuerySchema }),
    async (req, res) => {
      const page = pageRequest(req, { sort: '-createdAt', value: 'timestamp' });
      res.json(await listPendingInvitations(req.membership!.job.id, page));
    },
  );

  router.delete(
    '/jobs/:jobId/invitations/:invitationId',
    policy.jobMember(['gc_manager']),
    validate({ params: invitationParamsSchema }),
    async (req, res) => {
      const { invitationId } = valid<z.infer<typeof invitationParamsSchema>>(req.valid.params);
      await inTransaction(req, (transaction) => withdrawInvitation({ transaction, jobId: req.membership!.job.id }, invitationId));
      res.status(204).end();
    },
  );

  router.get('/invitations/:token', policy.public(), perAddress, validate({ params: tokenParamsSchema }), async (req, res) => {
    const { token } = valid<z.infer<typeof tokenParamsSchema>>(req.valid.params);
    res.json(await invitationPreview(token));
  });

  router.post(
    '/invitations/:token',
    policy.public(),
    perAddress,
    validate({ params: tokenParamsSchema, body: invitationAcceptSchema }),
    perToken,
    async (req, res) => {
      const { token } = valid<z.infer<typeof tokenParamsSchema>>(req.valid.params);
      const input = valid<z.infer<typeof invitationAcceptSchema>>(req.valid.body);
      const accepted = await acceptInvitation({ sequelize: sequelizeOf(req) }, token, input);
      const session = await signInAs(req, accepted.userId);
      res.status(200).json({ ...session, jobId: accepted.jobId });
    },
  );

  return router;
}
