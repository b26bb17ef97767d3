import { Router } from 'express';
import type { z } from 'zod';
import { copyJobSchema, createJobSchema, jobParamsSchema, setupChecklistQuerySchema, updateJobSchema } from '../../shared/schemas/setup';
import { copyJob } from '../commands/copyJob';
import { createJob } from '../commands/createJob';
import { valid, validate } from '../middleware/validate';
import { policy } from '../policies';
import { presentJobDetail } from '../presenters/job';
import { idempotentWrite } from '../services/idempotency';
import { changeJob } from '../services/jobs';
import { loadSetupChecklist } from '../services/setupChecklist';
import { jobsOf } from '../services/memberships';
import { inTransaction, sequelizeOf } from '../services/records';
import { setEtag } from '../services/versioning';

/**
 * GET /api/jobs: my jobs with my role; GET /api/jobs/:jobId: one of them (with ETag).
 * POST /api/jobs: any signed-in user creates a job owned by their company and becomes its GC manager.
 * PATCH /api/jobs/:jobId: GC managers change the job's details and settings (If-Match).
 * POST /api/jobs/:jobId/copy: a GC manager starts a new job as a copy of this one's structure (201).
 * GET /api/jobs/:jobId/setup/checklist: a GC manager's list of what is missing before a walk makes sense.
 * Writes: commands/createJob.ts, commands/copyJob.ts, services/jobs.ts.
 */
export function jobsRouter(): Router {
  const router = Router();
  router.get('/jobs', policy.signedIn(), async (req, res) => {
    res.json({ items: await jobsOf(req.user!.id) });
  });

  router.post('/jobs', policy.signedIn(), validate({ body: createJobSchema }), async (req, res) => {
    const body = valid<z.infer<typeof createJobSchema>>(req.valid.body);
    await idempotentWrite(req, res, async (transaction) => {
      const job = await createJob({ transaction, actor: req.user! }, body);
      setEtag(res, job.version);
      return { status: 201, body: presentJobDetail(job, 'gc_manager') };
    });
  });

  router.post('/jobs/:jobId/copy', policy.jobMember(['gc_manager']), validate({ body: copyJobSchema }), async (req, res) => {
    const body = valid<z.infer<typeof copyJobSchema>>(req.valid.body);
    const source = req.membership!.job;
    await idempotentWrite(req, res, async (transaction) => {
      const job = await copyJob({ transaction, actor: req.user! }, source, body);
      setEtag(res, job.version);
      return { status: 201, body: presentJobDetail(job, 'gc_manager') };
    });
  });

  router.get('/jobs/:jobId/setup/checklist', policy.jobMember(['gc_manager']), validate({ params: jobParamsSchema, query: setupChecklistQuerySchema }), async (req, res) => {
    res.json(await loadSetupChecklist(sequelizeOf(req), req.membership!.job.id));
  });

  router.get('/jobs/:jobId', policy.jobMember(), async (req, res) => {
    const { job, role } = req.membership!;
    setEtag(res, job.version);
    res.json(presentJobDetail(job, role));
  });

  router.patch('/jobs/:jobId', policy.jobMember(['gc_manager']), validate({ body: updateJobSchema }), async (req, res) => {
    const body = valid<z.infer<typeof updateJobSchema>>(req.valid.body);
    const { job: current, role } = req.membership!;
    const job = await inTransaction(req, (transaction) => changeJob({ transaction, jobId: current.id, ifMatch: req.get('if-match'), role }, body));
    setEtag(res, job.version);
    res.json(presentJobDetail(job, role));
  });
  return router;
}
