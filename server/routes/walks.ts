/**
 * Walks: one inspector's pass over a level, and the level's units with their state.
 * POST /jobs/:jobId/walks                        inspector, GC manager (Idempotency-Key; optional id made on the phone) → 201 WalkDetail
 * GET  /jobs/:jobId/walks                        inspector, GC manager; filters levelId, inspectorId, open
 * GET  /jobs/:jobId/walks/:walkId                inspector, GC manager → WalkDetail (with coverage)
 * POST /jobs/:jobId/walks/:walkId/finish         the walk's inspector or a GC manager → WalkDetail
 * GET  /jobs/:jobId/levels/:levelId/walk-units   inspector, GC manager → WalkUnitsResponse
 * Subcontractors get 403: walks and unit states show every company's findings.
 * Reads and writes: server/services/walks.ts (unit states: services/walkUnits.ts).
 */
import { Router } from 'express';
import type { z } from 'zod';
import { createWalkSchema, finishWalkSchema, walkLevelParamsSchema, walkListQuerySchema, walkParamsSchema, walkUnitsQuerySchema } from '../../shared/schemas/findings';
import { jobParamsSchema } from '../../shared/schemas/setup';
import { notFound } from '../errors';
import { valid, validate } from '../middleware/validate';
import { policy } from '../policies';
import { idempotentWrite } from '../services/idempotency';
import { pageRequest } from '../services/paging';
import { inTransaction, sequelizeOf } from '../services/records';
import { finishWalk, listWalks, startWalk, walkDetail, walkUnitsOf } from '../services/walks';

const WALK_ROLES = ['gc_manager', 'inspector'] as const;

export function walksRouter(): Router {
  const router = Router();

  router.post('/jobs/:jobId/walks', policy.jobMember(WALK_ROLES), validate({ params: jobParamsSchema, body: createWalkSchema }), async (req, res) => {
    const body = valid<z.infer<typeof createWalkSchema>>(req.valid.body);
    const { job, role } = req.membership!;
    await idempotentWrite(req, res, async (transaction) => {
      const detail = await startWalk({ sequelize: sequelizeOf(req), transaction, jobId: job.id, actor: { id: req.user!.id, role } }, body.levelId, body.id);
      return { status: 201, body: detail };
    });
  });

  router.get('/jobs/:jobId/walks', policy.jobMember(WALK_ROLES), validate({ params: jobParamsSchema, query: walkListQuerySchema }), async (req, res) => {
    const query = valid<z.infer<typeof walkListQuerySchema>>(req.valid.query);
    const page = pageRequest(req, { sort: '-startedAt', value: 'timestamp' });
    res.json(await listWalks(sequelizeOf(req), req.membership!.job.id, query, page));
  });

  router.get('/jobs/:jobId/walks/:walkId', policy.jobMember(WALK_ROLES), validate({ params: walkParamsSchema }), async (req, res) => {
    const { walkId } = valid<z.infer<typeof walkParamsSchema>>(req.valid.params);
    const walk = await walkDetail(sequelizeOf(req), req.membership!.job.id, walkId);
    if (!walk) throw notFound('Walk not found.');
    res.json(walk);
  });

  router.post(
    '/jobs/:jobId/walks/:walkId/finish',
    policy.jobMember(WALK_ROLES),
    validate({ params: walkParamsSchema, body: finishWalkSchema }),
    async (req, res) => {
      const { walkId } = valid<z.infer<typeof walkParamsSchema>>(req.valid.params);
      const { job, role } = req.membership!;
      const detail = await inTransaction(req, (transaction) =>
        finishWalk({ sequelize: sequelizeOf(req), transaction, jobId: job.id, actor: { id: req.user!.id, role } }, walkId),
      );
      res.json(detail);
    },
  );

  router.get(
    '/jobs/:jobId/levels/:levelId/walk-units',
    policy.jobMember(WALK_ROLES),
    validate({ params: walkLevelParamsSchema, query: walkUnitsQuerySchema }),
    async (req, res) => {
      const { levelId } = valid<z.infer<typeof walkLevelParamsSchema>>(req.valid.params);
      const query = valid<z.infer<typeof walkUnitsQuerySchema>>(req.valid.query);
      const page = () => pageRequest(req, { sort: 'tag', value: 'text' });
      res.json(await walkUnitsOf(sequelizeOf(req), req.membership!.job.id, levelId, query, page));
    },
  );

  return router;
}
