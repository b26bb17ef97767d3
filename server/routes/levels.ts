/**
 * Levels of a job: ordered floors with a dense 1-based position.
 * GET    /jobs/:jobId/levels                  all roles
 * POST   /jobs/:jobId/levels                  GC manager (Idempotency-Key); appended last
 * POST   /jobs/:jobId/levels/order            GC manager; { levelIds: every id, new order }
 * POST   /jobs/:jobId/levels/bulk             GC manager (Idempotency-Key); { names } pasted one per line, appended last; all or none
 * PATCH  /jobs/:jobId/levels/:levelId         GC manager (If-Match); rename
 * DELETE /jobs/:jobId/levels/:levelId         GC manager (If-Match); 409 while spaces or units are on it
 * Reads and writes: server/services/levels.ts.
 */
import { Router } from 'express';
import type { z } from 'zod';
import { bulkLevelsSchema, createLevelSchema, levelListQuerySchema, levelParamsSchema, reorderLevelsSchema, updateLevelSchema } from '../../shared/schemas/setup';
import { valid, validate } from '../middleware/validate';
import { policy } from '../policies';
import { presentLevel } from '../presenters/level';
import { idempotentWrite } from '../services/idempotency';
import { createLevel, createLevels, deleteLevel, levelDto, listLevels, renameLevel, reorderLevels } from '../services/levels';
import { pageRequest } from '../services/paging';
import { inTransaction, setupWrite } from '../services/records';
import { setEtag } from '../services/versioning';

export function levelsRouter(): Router {
  const router = Router();

  router.get('/jobs/:jobId/levels', policy.jobMember(), validate({ query: levelListQuerySchema }), async (req, res) => {
    const page = pageRequest(req, { sort: 'position', value: 'int' });
    res.json(await listLevels(req.membership!.job.id, page));
  });

  router.post('/jobs/:jobId/levels', policy.jobMember(['gc_manager']), validate({ body: createLevelSchema }), async (req, res) => {
    const body = valid<z.infer<typeof createLevelSchema>>(req.valid.body);
    await idempotentWrite(req, res, async (transaction) => {
      const level = await createLevel(setupWrite(req, transaction), body);
      setEtag(res, level.version);
      return { status: 201, body: presentLevel(level) };
    });
  });

  router.post('/jobs/:jobId/levels/bulk', policy.jobMember(['gc_manager']), validate({ body: bulkLevelsSchema }), async (req, res) => {
    const { names } = valid<z.infer<typeof bulkLevelsSchema>>(req.valid.body);
    await idempotentWrite(req, res, async (transaction) => {
      const levels = await createLevels(setupWrite(req, transaction), names);
      return { status: 201, body: { items: levels.map((l) => presentLevel(l)) } };
    });
  });

  router.post('/jobs/:jobId/levels/order', policy.jobMember(['gc_manager']), validate({ body: reorderLevelsSchema }), async (req, res) => {
    const { levelIds } = valid<z.infer<typeof reorderLevelsSchema>>(req.valid.body);
    await idempotentWrite(req, res, async (transaction) => {
      const items = await reorderLevels(setupWrite(req, transaction), levelIds);
      return { status: 200, body: { items, nextCursor: null } };
    });
  });

  router.patch(
    '/jobs/:jobId/levels/:levelId',
    policy.jobMember(['gc_manager']),
    validate({ params: levelParamsSchema, body: updateLevelSchema }),
    async (req, res) => {
      const { levelId } = valid<z.infer<typeof levelParamsSchema>>(req.valid.params);
      const body = valid<z.infer<typeof updateLevelSchema>>(req.valid.body);
      const level = await inTransaction(req, (transaction) => renameLevel(setupWrite(req, transaction), levelId, body));
      setEtag(res, level.version);
      res.json(await levelDto(level));
    },
  );

  router.delete('/jobs/:jobId/levels/:levelId', policy.jobMember(['gc_manager']), validate({ params: levelParamsSchema }), async (req, res) => {
    const { levelId } = valid<z.infer<typeof levelParamsSchema>>(req.valid.params);
    await inTransaction(req, (transaction) => deleteLevel(setupWrite(req, transaction), levelId));
    res.status(204).end();
  });

  return router;
}
