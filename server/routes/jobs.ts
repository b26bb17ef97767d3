import { Router } from 'express';
import { JOB_SETTINGS } from '../../shared/catalogue/types';
import { createJobSchema, updateJobSchema, type CreateJobInput, type UpdateJobInput, type StatedLimitInput } from '../../shared/schemas/setup';
import { badRequest } from '../errors';
import { valid, validate } from '../middleware/validate';
import { Job, JobCompany, JobMember } from '../models';
import { policy } from '../policies';
import { presentJobDetail } from '../presenters/setup';
import { copyBuiltinCatalogue } from '../services/catalogue';
import { idempotentWrite } from '../services/idempotency';
import { jobsOf } from '../services/memberships';
import { statedLimit } from '../services/quantities';
import { inTransaction, lockForChange } from '../services/records';
import { setEtag } from '../services/versioning';

/**
 * GET /api/jobs: my jobs with my role; GET /api/jobs/:jobId: one of them (with ETag).
 * POST /api/jobs: any signed-in user creates a job owned by their company and becomes its GC manager.
 * PATCH /api/jobs/:jobId: GC managers change the job's details and settings (If-Match).
 */
export function jobsRouter(): Router {
  const router = Router();
  router.get('/jobs', policy.signedIn(), async (req, res) => {
    res.json({ items: await jobsOf(req.user!.id) });
  });

  router.post('/jobs', policy.signedIn(), validate({ body: createJobSchema }), async (req, res) => {
    const body = valid<CreateJobInput & { number?: string | null; address?: string | null }>(req.valid.body);
    const user = req.user!;
    await idempotentWrite(req, res, async (transaction) => {
      const job = await Job.create(
        {
          ownerCompanyId: user.companyId,
          name: body.name,
          number: body.number ?? null,
          address: body.address ?? null,
          startsOn: body.startsOn ?? null,
          endsOn: body.endsOn ?? null,
          ...(body.timeZone ? { timeZone: body.timeZone } : {}),
          ...(body.unitSystem ? { unitSystem: body.unitSystem } : {}),
        },
        { transaction },
      );
      // The creator acts for their own company, the job's GC.
      await JobMember.create({ jobId: job.id, userId: user.id, role: 'gc_manager', companyId: user.companyId }, { transaction });
      await JobCompany.create({ jobId: job.id, companyId: user.companyId, trades: ['general'] }, { transaction });
      await copyBuiltinCatalogue(job.id, transaction);
      setEtag(res, job.version);
      return { status: 201, body: presentJobDetail(job, 'gc_manager') };
    });
  });

  router.get('/jobs/:jobId', policy.jobMember(), async (req, res) => {
    const { job, role } = req.membership!;
    setEtag(res, job.version);
    res.json(presentJobDetail(job, role));
  });

  router.patch('/jobs/:jobId', policy.jobMember(['gc_manager']), validate({ body: updateJobSchema }), async (req, res) => {
    const body = valid<UpdateJobInput & { number?: string | null; address?: string | null }>(req.valid.body);
    const { job: current, role } = req.membership!;
    const job = await inTransaction(req, async (transaction) => {
      const job = await lockForChange(req, Job, { id: current.id }, transaction, 'Job not found.', (j) => presentJobDetail(j, role));
      if (body.name !== undefined) job.name = body.name;
      if (body.number !== undefined) job.number = body.number;
      if (body.address !== undefined) job.address = body.address;
      if (body.startsOn !== undefined) job.startsOn = body.startsOn;
      if (body.endsOn !== undefined) job.endsOn = body.endsOn;
      if (job.startsOn && job.endsOn && job.startsOn > job.endsOn) {
        throw badRequest('endsOn: The end date is before the start date.', { endsOn: 'The end date is before the start date.' });
      }
      if (body.timeZone !== undefined) job.timeZone = body.timeZone;
      if (body.unitSystem !== undefined) job.unitSystem = body.unitSystem;
      if (body.codeEditions !== undefined) job.codeEditions = { ...body.codeEditions };
      if (body.severityDueDays !== undefined) job.severityDueDays = { ...body.severityDueDays };
      if (body.recurringThresholds !== undefined) job.recurringThresholds = { ...body.recurringThresholds };
      if (body.settings !== undefined) {
        const next = { ...(job.settings ?? {}) };
        for (const def of JOB_SETTINGS) {
          const entry = (body.settings as Record<string, StatedLimitInput | null | undefined>)[def.key];
          if (entry === undefined) continue;
          if (entry === null) delete next[def.key];
          else next[def.key] = statedLimit(entry, def.quantity, `settings.${def.key}.value`);
        }
        job.settings = next;
      }
      job.version += 1;
      await job.save({ transaction });
      return job;
    });
    setEtag(res, job.version);
    res.json(presentJobDetail(job, role));
  });
  return router;
}
