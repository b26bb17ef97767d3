import { Router } from 'express';
import { policy } from '../policies';
import { presentJobWithRole } from '../presenters/session';
import { jobsOf } from '../services/memberships';

/** GET /api/jobs: my jobs with my role; GET /api/jobs/:jobId: one of them. */
export function jobsRouter(): Router {
  const router = Router();
  router.get('/jobs', policy.signedIn(), async (req, res) => {
    res.json({ items: await jobsOf(req.user!.id) });
  });
  router.get('/jobs/:jobId', policy.jobMember(), async (req, res) => {
    const { job, role } = req.membership!;
    res.json({
      ...presentJobWithRole(job, role),
      startsOn: job.startsOn ?? null,
      endsOn: job.endsOn ?? null,
      timeZone: job.timeZone,
      unitSystem: job.unitSystem,
    });
  });
  return router;
}
