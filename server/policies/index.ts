/**
 * Who may do what, in one place. Every API route declares exactly one policy middleware;
 * each carries a `policy` tag so tests can walk the routers and refuse an undeclared route.
 *
 * - public:     no session needed
 * - signedIn:   any signed-in user
 * - jobMember:  a member of the job in :jobId with one of the given roles. Membership is read
 *               from the database on every request (never cached in the session); usually in
 *               the same query as the user (req.preloadedMembership, server/auth/passport.ts). A job the user
 *               is not a member of answers 404, so its existence is not leaked. It also sets the
 *               caller's scope (req.scope), once: a subcontractor sees the findings of the company
 *               their membership is for (the company they were invited for), never those of their
 *               home company unless that is the membership's company.
 */
import type { NextFunction, Request, RequestHandler, Response } from 'express';
import { z } from 'zod';
import type { Role } from '../../shared/words';
import { ROLES } from '../../shared/words';
import { badRequest, forbidden, notFound, unauthorized } from '../errors';
import { Job, JobMember } from '../models';
import type { FindingScope } from '../services/findingQueries';

export type PolicyHandler = RequestHandler & { policy: string };

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Request {
      /** Set by policy.jobMember: the job, the caller's role on it and the company the membership is for. */
      membership?: { job: Job; role: Role; companyId: string };
      /**
       * Set by policy.jobMember: what the caller may see of the job's findings. `companyId` is the
       * membership's company for a subcontractor, null for a GC manager or an inspector (all).
       * Every finding read (list, detail, photos, board, exports) takes this value.
       */
      scope?: FindingScope;
    }
  }
}

function tag(name: string, fn: RequestHandler): PolicyHandler {
  return Object.assign(fn, { policy: name });
}

const NOT_A_JOB = 'This link does not name a job: open the job from its list.';
export const uuidSchema = z.string().uuid('This link does not name a record: open it from its list.');

export const policy = {
  public: () => tag('public', (_req, _res, next) => next()),

  signedIn: () =>
    tag('signedIn', (req, _res, next) => {
      if (!req.user) return next(unauthorized());
      next();
    }),

  jobMember: (roles: readonly Role[] = ROLES) =>
    tag(`jobMember:${roles.join(',')}`, async (req: Request, _res: Response, next: NextFunction) => {
      if (!req.user) return next(unauthorized());
      const jobId = uuidSchema.safeParse(req.params.jobId);
      if (!jobId.success) return next(badRequest(`jobId: ${NOT_A_JOB}`, { jobId: NOT_A_JOB }));
      // Read with the user in this request (server/auth/passport.ts) when the path named this job.
      const pre = req.preloadedMembership?.jobId === jobId.data ? req.preloadedMembership : undefined;
      const member = pre
        ? { role: pre.role, companyId: pre.companyId, job: pre.job }
        : await JobMember.findOne({
            where: { jobId: jobId.data, userId: req.user.id },
            include: [{ model: Job, as: 'job', required: true }],
          });
      if (!member || !member.role || !member.companyId || !member.job) return next(notFound('Job not found.'));
      const role = member.role;
      if (!roles.includes(role)) {
        return next(forbidden(`Your role on this job (${role.replace('_', ' ')}) cannot do that.`));
      }
      req.membership = { job: member.job, role, companyId: member.companyId };
      req.scope = { jobId: member.job.id, timeZone: member.job.timeZone || 'UTC', companyId: role === 'subcontractor' ? member.companyId : null };
      next();
    }),
};
