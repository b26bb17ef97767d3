/**
 * Systems: refrigerant circuits with their refrigerant and charges (kg).
 * GET    /jobs/:jobId/systems                all roles
 * POST   /jobs/:jobId/systems                GC manager (Idempotency-Key)
 * GET    /jobs/:jobId/systems/:systemId      all roles; with its refrigerant checks
 * PATCH  /jobs/:jobId/systems/:systemId      GC manager (If-Match)
 * DELETE /jobs/:jobId/systems/:systemId      GC manager (If-Match); 409 while units are on it
 * Reads and writes: server/services/systems.ts; the checks: services/refrigerantChecks.ts.
 */
import { Router } from 'express';
import type { z } from 'zod';
import { createSystemSchema, systemListQuerySchema, systemParamsSchema, updateSystemSchema } from '../../shared/schemas/setup';
import { valid, validate } from '../middleware/validate';
import { policy } from '../policies';
import { presentSystem } from '../presenters/system';
import { idempotentWrite } from '../services/idempotency';
import { pageRequest } from '../services/paging';
import { inTransaction, setupWrite } from '../services/records';
import { systemDetail } from '../services/refrigerantChecks';
import { changeSystem, createSystem, deleteSystem, findSystem, listSystems } from '../services/systems';
import { setEtag } from '../services/versioning';

export function systemsRouter(): Router {
  const router = Router();

  router.get('/jobs/:jobId/systems', policy.jobMember(), validate({ query: systemListQuerySchema }), async (req, res) => {
    const page = pageRequest(req, { sort: 'name', value: 'text' });
    res.json(await listSystems(req.membership!.job.id, page));
  });

  router.post('/jobs/:jobId/systems', policy.jobMember(['gc_manager']), validate({ body: createSystemSchema }), async (req, res) => {
    const body = valid<z.infer<typeof createSystemSchema>>(req.valid.body);
    await idempotentWrite(req, res, async (transaction) => {
      const system = await createSystem(setupWrite(req, transaction), body);
      setEtag(res, system.version);
      return { status: 201, body: presentSystem(system, 0) };
    });
  });

  router.get('/jobs/:jobId/systems/:systemId', policy.jobMember(), validate({ params: systemParamsSchema }), async (req, res) => {
    const { systemId } = valid<z.infer<typeof systemParamsSchema>>(req.valid.params);
    const job = req.membership!.job;
    const system = await findSystem(job.id, systemId);
    setEtag(res, system.version);
    res.json(await systemDetail(job, system));
  });

  router.patch(
    '/jobs/:jobId/systems/:systemId',
    policy.jobMember(['gc_manager']),
    validate({ params: systemParamsSchema, body: updateSystemSchema }),
    async (req, res) => {
      const { systemId } = valid<z.infer<typeof systemParamsSchema>>(req.valid.params);
      const body = valid<z.infer<typeof updateSystemSchema>>(req.valid.body);
      const system = await inTransaction(req, (transaction) => changeSystem(setupWrite(req, transaction), systemId, body));
      setEtag(res, system.version);
      res.json(await systemDetail(req.membership!.job, system));
    },
  );

  router.delete('/jobs/:jobId/systems/:systemId', policy.jobMember(['gc_manager']), validate({ params: systemParamsSchema }), async (req, res) => {
    const { systemId } = valid<z.infer<typeof systemParamsSchema>>(req.valid.params);
    await inTransaction(req, (transaction) => deleteSystem(setupWrite(req, transaction), systemId));
    res.status(204).end();
  });

  return router;
}
