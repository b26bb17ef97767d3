/**
 * Invitations to a job, by mail.
 * POST   /api/jobs/:jobId/invitations                 GC manager: invite an address with a role and company
 * GET    /api/jobs/:jobId/invitations                 GC manager: the pending ones
 * DELETE /api/jobs/:jobId/invitations/:invitationId   GC manager: withdraw one
 * GET    /api/invitations/:token                      no session: what the link is for
 * POST   /api/invitations/:token                      no session: accept (new account, or an existing
 *                                                     one with its current password), then signed in
 */
import { Router, type NextFunction, type Request, type Response } from 'express';
import { rateLimit } from 'express-rate-limit';
import { Op, fn, literal, type Sequelize, type Transaction, type WhereOptions } from 'sequelize';
import { z } from 'zod';
import {
  invitationAcceptSchema,
  invitationCreateSchema,
  invitationListQuerySchema,
  invitationParamsSchema,
  personNameSchema,
  tokenParamsSchema,
  type Invitation,
  type InvitationAcceptInput,
  type InvitationCreateInput,
  type InvitationList,
  type InvitationPreview,
} from '../../shared/schemas/auth';
import { newPasswordSchema } from '../../shared/schemas/session';
import { signInAs } from '../auth/establish';
import { hashPassword, verifyPassword } from '../auth/passwords';
import { badRequest, conflict, forbidden, notFound, tooManyRequests, unauthorized } from '../errors';
import type { MailService } from '../mail';
import { invitationMail } from '../mail/messages';
import { validate, valid, zodFieldErrors } from '../middleware/validate';
import { AuthToken, Company, Job, JobCompany, JobMember, User } from '../models';
import { policy, uuidSchema } from '../policies';
import { idempotentWrite } from '../services/idempotency';
import { finishPage, pageRequest } from '../services/paging';
import type { AccountLimits } from '../services/rateLimitStore';
import { consumeToken, hashToken, inspectToken, issueToken } from '../services/tokens';

export interface InvitationRouteOptions {
  mail: MailService;
  limits: AccountLimits;
}

const jobParamsSchema = z.object({ jobId: uuidSchema }).strict();
type Token = { token: string };

function presentInvitation(row: AuthToken): Invitation {
  return {
    id: row.id,
    email: row.email!,
    name: row.name ?? null,
    role: row.role!,
    company: { id: row.companyId!, name: row.company?.name ?? '' },
    invitedBy: row.inviter ? { id: row.inviter.id, name: row.inviter.name } : null,
    createdAt: row.createdAt.toISOString(),
    expiresAt: row.expiresAt.toISOString(),
  };
}

/** A company is on the job when it owns the job or the job's company list holds it. */
async function companyIsOnJob(job: Job, companyId: string, transaction: Transaction): Promise<boolean> {
  if (companyId === job.ownerCompanyId) return true;
  return (await JobCompany.count({ where: { jobId: job.id, companyId }, transaction })) > 0;
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
      const input = valid<InvitationCreateInput>(req.valid.body);
      const { job, companyId: inviterCompanyId } = req.membership!;
      const inviter = req.user!;
      const email = input.email.toLowerCase();
      const companyId = input.companyId ?? inviterCompanyId;
      await idempotentWrite(req, res, async (transaction) => {
        if (companyId !== inviterCompanyId && !(await companyIsOnJob(job, companyId, transaction))) {
          throw badRequest('companyId: That company is not on this job. Add it to the job first.', {
            companyId: 'That company is not on this job. Add it to the job first.',
          });
        }
        const company = await Company.findByPk(companyId, { transaction });
        if (!company) throw badRequest('companyId: That company is not on this job.', { companyId: 'That company is not on this job.' });
        const existing = await User.findOne({ where: { email }, transaction });
        if (existing && (await JobMember.count({ where: { jobId: job.id, userId: existing.id }, transaction })) > 0) {
          throw conflict('That person is already a member of this job.', 'already_member');
        }
        // A new invitation to the same address replaces the pending one.
        await AuthToken.update(
          { revokedAt: fn('now') as unknown as Date },
          { where: { purpose: 'invitation', jobId: job.id, email, usedAt: null, revokedAt: null }, transaction },
        );
        const { token, row } = await issueToken(
          'invitation',
          { email, name: input.name || null, jobId: job.id, role: input.role, companyId, invitedBy: inviter.id },
          transaction,
        );
        mail.outbox.sendAfterCommit(
          transaction,
          invitationMail(
            { name: input.name || existing?.name, address: email },
            { jobName: job.name, role: input.role, companyName: company.name, inviterName: inviter.name, existingAccount: Boolean(existing?.passwordHash) },
            mail.link(`/invite/${token}`),
          ),
        );
        row.company = company;
        row.inviter = await User.findByPk(inviter.id, { transaction }) ?? undefined;
        return { status: 201, body: presentInvitation(row) };
      });
    },
  );

  router.get(
    '/jobs/:jobId/invitations',
    policy.jobMember(['gc_manager']),
    validate({ params: jobParamsSchema, query: invitationListQuerySchema }),
    async (req, res) => {
      const page = pageRequest(req, { sort: '-createdAt', value: 'timestamp' });
      const where: WhereOptions<AuthToken> = {
        purpose: 'invitation',
        jobId: req.membership!.job.id,
        usedAt: null,
        revokedAt: null,
        expiresAt: { [Op.gt]: fn('now') },
      };
      if (page.after) {
        const at = new Date(page.after.value);
        Object.assign(where, { [Op.or]: [{ createdAt: { [Op.lt]: at } }, { createdAt: at, id: { [Op.lt]: page.after.id } }] });
      }
      const rows = await AuthToken.findAll({
        where,
        include: [
          { model: Company, as: 'company' },
          { model: User, as: 'inviter', attributes: ['id', 'name'] },
        ],
        order: [
          ['createdAt', 'DESC'],
          ['id', 'DESC'],
        ],
        limit: page.limit + 1,
      });
      const { rows: kept, nextCursor } = finishPage(rows, page, (row) => row.createdAt.toISOString());
      res.json({ items: kept.map(presentInvitation), nextCursor } satisfies InvitationList);
    },
  );

  router.delete(
    '/jobs/:jobId/invitations/:invitationId',
    policy.jobMember(['gc_manager']),
    validate({ params: invitationParamsSchema }),
    async (req, res) => {
      const { invitationId } = valid<z.infer<typeof invitationParamsSchema>>(req.valid.params);
      const sequelize = req.app.get('sequelize') as Sequelize;
      await sequelize.transaction(async (transaction) => {
        const row = await AuthToken.findOne({
          where: { id: invitationId, jobId: req.membership!.job.id, purpose: 'invitation' },
          transaction,
          lock: transaction.LOCK.UPDATE,
        });
        if (!row) throw notFound('Invitation not found.');
        if (row.usedAt) throw conflict('That invitation was already accepted. Remove the member instead.', 'already_accepted');
        if (!row.revokedAt) await row.update({ revokedAt: new Date() }, { transaction });
      });
      res.status(204).end();
    },
  );

  router.get('/invitations/:token', policy.public(), perAddress, validate({ params: tokenParamsSchema }), async (req, res) => {
    const { token } = valid<Token>(req.valid.params);
    const row = await inspectToken(token, 'invitation');
    const [job, company, inviter, existing] = await Promise.all([
      Job.findByPk(row.jobId!),
      Company.findByPk(row.companyId!),
      row.invitedBy ? User.findByPk(row.invitedBy, { attributes: ['id', 'name'] }) : null,
      User.findOne({ where: { email: row.email! }, attributes: ['id', 'passwordHash'] }),
    ]);
    if (!job || !company) throw notFound('This invitation is for a job that no longer exists.');
    res.json({
      email: row.email!,
      name: row.name ?? null,
      role: row.role!,
      job: { id: job.id, name: job.name },
      company: { name: company.name },
      invitedBy: inviter?.name ?? null,
      existingAccount: Boolean(existing?.passwordHash),
      expiresAt: row.expiresAt.toISOString(),
    } satisfies InvitationPreview);
  });

  router.post(
    '/invitations/:token',
    policy.public(),
    perAddress,
    validate({ params: tokenParamsSchema, body: invitationAcceptSchema }),
    perToken,
    async (req, res) => {
      const { token } = valid<Token>(req.valid.params);
      const input = valid<InvitationAcceptInput>(req.valid.body);
      const invitation = await inspectToken(token, 'invitation');
      const existing = await User.findOne({ where: { email: invitation.email! } });
      let newAccount: { name: string; passwordHash: string } | undefined;
      if (existing?.passwordHash) {
        if (existing.disabledAt) throw forbidden('This account is disabled. Ask the GC manager for help.');
        // An invitation never changes an existing password: the person proves they hold it.
        if (!(await verifyPassword(input.password, existing.passwordHash))) {
          throw unauthorized('That is not the password of your Trimout account. Use "Forgot your password?" on the sign-in page if you lost it.');
        }
      } else {
        const parsed = z
          .object({ name: personNameSchema, password: newPasswordSchema })
          .safeParse({ name: input.name || invitation.name || '', password: input.password });
        if (!parsed.success) {
          const fields = zodFieldErrors(parsed.error);
          const [field, message] = Object.entries(fields)[0]!;
          throw badRequest(`${field}: ${message}`, fields);
        }
        newAccount = { name: parsed.data.name, passwordHash: await hashPassword(parsed.data.password) };
      }
      const sequelize = req.app.get('sequelize') as Sequelize;
      const result = await sequelize.transaction(async (transaction) => {
        const row = await consumeToken(token, 'invitation', transaction);
        let userId: string;
        if (existing) {
          userId = existing.id;
          await User.update(
            {
              // An account without a password (a sign-up never confirmed) is made here as a new one
              // would be: the name, password and company are the invitee's, nothing the sign-up chose.
              ...(newAccount ? { passwordHash: newAccount.passwordHash, name: newAccount.name, companyId: row.companyId! } : {}),
              emailConfirmedAt: fn('coalesce', literal('email_confirmed_at'), fn('now')) as unknown as Date,
            },
            { where: { id: userId }, transaction },
          );
          // The invitation proved the mailbox and set the password: pending sign-up confirmations
          // (which carry passwords chosen by whoever signed up with this address) die here.
          if (newAccount) {
            await AuthToken.update(
              { revokedAt: fn('now') as unknown as Date },
              { where: { userId, purpose: 'email_confirmation', usedAt: null, revokedAt: null }, transaction },
            );
          }
        } else {
          const user = await User.create(
            { email: row.email!, name: newAccount!.name, companyId: row.companyId!, passwordHash: newAccount!.passwordHash, emailConfirmedAt: new Date() },
            { transaction },
          );
          userId = user.id;
        }
        // The membership carries the company the invitation was for, which may not be the
        // person's home company: it decides what a subcontractor sees on this job.
        const [member] = await JobMember.findOrCreate({
          where: { jobId: row.jobId!, userId },
          defaults: { jobId: row.jobId!, userId, role: row.role!, companyId: row.companyId! },
          transaction,
        });
        await row.update({ userId }, { transaction });
        return { userId, jobId: member.jobId };
      });
      const session = await signInAs(req, result.userId);
      res.status(200).json({ ...session, jobId: result.jobId });
    },
  );

  return router;
}
