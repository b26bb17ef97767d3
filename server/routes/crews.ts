/**
 * Crews: named teams within a company on a job (shared/schemas/setup/crews.ts).
 * GET    /jobs/:jobId/crews?companyId=   all roles (a subcontractor: own company's crews)
 * POST   /jobs/:jobId/crews              GC manager, subcontractor for own company (Idempotency-Key) → 201
 * PATCH  /jobs/:jobId/crews/:crewId      GC manager, subcontractor for own company (If-Match)
 * DELETE /jobs/:jobId/crews/:crewId      GC manager, subcontractor for own company (If-Match); 409 while units name it
 * Reads and writes: server/services/crews.ts.
 */
import { Router } from 'express';
import type { z } from 'zod';
import { createCrewSchema, crewListQuerySchema, crewParamsSchema, updateCrewSchema, type CrewListResponse } from '../../shared/schemas/setup';
import { valid, validate } from '../middleware/validate';
import { policy } from '../policies';
import { createCrew, crewActor, deleteCrew, listCrews, renameCrew } from '../services/crews';
import { idempotentWrite } from '../services/idempotency';
import { inTransaction, sequelizeOf } from '../services/records';
import { setEtag } from '../services/versioning';

const CREW_EDITORS = ['gc_manager', 'subcontractor'] as const;

export function crewsRouter(): Router {
  const router = Router();

  router.get('/jobs/:jobId/crews', policy.jobMember(), validate({ query: crewListQuerySchema }), async (req, res) => {
    const query = valid<z.infer<typeof crewListQuerySchema>>(req.valid.query);
    const actor = crewActor(req.membership!);
    const items = await listCrews(sequelizeOf(req), req.membership!.job.id, actor, query.companyId);
    const body: CrewListResponse = { items, nextCursor: null, companyScope: actor.companyId };
    res.json(body);
  });

  router.post('/jobs/:jobId/crews', policy.jobMember(CREW_EDITORS), validate({ body: createCrewSchema }), async (req, res) => {
    const body = valid<z.infer<typeof createCrewSchema>>(req.valid.body);
    await idempotentWrite(req, res, async (transaction) => {
      const crew = await createCrew({ sequelize: sequelizeOf(req), transaction, job: req.membership!.job, actor: crewActor(req.membership!) }, body);
      setEtag(res, crew.version);
      return { status: 201, body: crew };
    });
  });

  router.patch(
    '/jobs/:jobId/crews/:crewId',
    policy.jobMember(CREW_EDITORS),
    validate({ params: crewParamsSchema, body: updateCrewSchema }),
    async (req, res) => {
      const { crewId } = valid<z.infer<typeof crewParamsSchema>>(req.valid.params);
      const body = valid<z.infer<typeof updateCrewSchema>>(req.valid.body);
      const crew = await inTransaction(req, (transaction) =>
        renameCrew(
          { sequelize: sequelizeOf(req), transaction, job: req.membership!.job, actor: crewActor(req.membership!), ifMatch: req.get('if-match') },
          crewId,
          body,
        ),
      );
      setEtag(res, crew.version);
      res.json(crew);
    },
  );

  router.delete('/jobs/:jobId/crews/:crewId', policy.jobMember(CREW_EDITORS), validate({ params: crewParamsSchema }), async (req, res) => {
    const { crewId } = valid<z.infer<typeof crewParamsSchema>>(req.valid.params);
    await inTransaction(req, (transaction) =>
      deleteCrew(
        { sequelize: sequelizeOf(req), transaction, job: req.membership!.job, actor: crewActor(req.membership!), ifMatch: req.get('if-match') },
        crewId,
      ),
    );
    res.status(204).end();
  });

  return router;
}
