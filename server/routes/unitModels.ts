/**
 * Unit models: an indoor unit model with its nominal capacity (W) and per-model limits entered
 * from its installation manual (MODEL_LIMITS keys; each value typed with its unit, plus source).
 * GET    /jobs/:jobId/models?unitKind=     all roles
 * POST   /jobs/:jobId/models               GC manager (Idempotency-Key)
 * GET    /jobs/:jobId/models/:modelId      all roles
 * PATCH  /jobs/:jobId/models/:modelId      GC manager (If-Match); limits merge by key, null removes
 * DELETE /jobs/:jobId/models/:modelId      GC manager (If-Match); 409 while units use it
 * Reads and writes: server/services/unitModels.ts.
 */
import { Router } from 'express';
import type { z } from 'zod';
import { createModelSchema, modelListQuerySchema, modelParamsSchema, updateModelSchema } from '../../shared/schemas/setup';
import { valid, validate } from '../middleware/validate';
import { policy } from '../policies';
import { presentUnitModel } from '../presenters/unitModel';
import { idempotentWrite } from '../services/idempotency';
import { pageRequest } from '../services/paging';
import { inTransaction, setupWrite } from '../services/records';
import { changeUnitModel, createUnitModel, deleteUnitModel, findUnitModel, listUnitModels, unitModelDto } from '../services/unitModels';
import { setEtag } from '../services/versioning';

export function unitModelsRouter(): Router {
  const router = Router();

  router.get('/jobs/:jobId/models', policy.jobMember(), validate({ query: modelListQuerySchema }), async (req, res) => {
    const query = valid<z.infer<typeof modelListQuerySchema>>(req.valid.query);
    const page = pageRequest(req, { sort: 'name', value: 'text' });
    res.json(await listUnitModels(req.membership!.job.id, query.unitKind, page));
  });

  router.post('/jobs/:jobId/models', policy.jobMember(['gc_manager']), validate({ body: createModelSchema }), async (req, res) => {
    const body = valid<z.infer<typeof createModelSchema>>(req.valid.body);
    await idempotentWrite(req, res, async (transaction) => {
      const model = await createUnitModel(setupWrite(req, transaction), body);
      setEtag(res, model.version);
      return { status: 201, body: presentUnitModel(model, 0) };
    });
  });

  router.get('/jobs/:jobId/models/:modelId', policy.jobMember(), validate({ params: modelParamsSchema }), async (req, res) => {
    const { modelId } = valid<z.infer<typeof modelParamsSchema>>(req.valid.params);
    const model = await findUnitModel(req.membership!.job.id, modelId);
    setEtag(res, model.version);
    res.json(await unitModelDto(model));
  });

  router.patch(
    '/jobs/:jobId/models/:modelId',
    policy.jobMember(['gc_manager']),
    validate({ params: modelParamsSchema, body: updateModelSchema }),
    async (req, res) => {
      const { modelId } = valid<z.infer<typeof modelParamsSchema>>(req.valid.params);
      const body = valid<z.infer<typeof updateModelSchema>>(req.valid.body);
      const dto = await inTransaction(req, (transaction) => changeUnitModel(setupWrite(req, transaction), modelId, body));
      setEtag(res, dto.version);
      res.json(dto);
    },
  );

  router.delete('/jobs/:jobId/models/:modelId', policy.jobMember(['gc_manager']), validate({ params: modelParamsSchema }), async (req, res) => {
    const { modelId } = valid<z.infer<typeof modelParamsSchema>>(req.valid.params);
    await inTransaction(req, (transaction) => deleteUnitModel(setupWrite(req, transaction), modelId));
    res.status(204).end();
  });

  return router;
}
