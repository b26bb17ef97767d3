/**
 * Unit models: an indoor unit model with its nominal capacity (W) and per-model limits entered
 * from its installation manual (MODEL_LIMITS keys; each value typed with its unit, plus source).
 * GET    /jobs/:jobId/models?unitKind=     all roles
 * POST   /jobs/:jobId/models               GC manager (Idempotency-Key)
 * GET    /jobs/:jobId/models/:modelId      all roles
 * PATCH  /jobs/:jobId/models/:modelId      GC manager (If-Match); limits merge by key, null removes
 * DELETE /jobs/:jobId/models/:modelId      GC manager (If-Match); 409 while units use it
 */
import { Router } from 'express';
import { Op, QueryTypes, UniqueConstraintError, type Transaction } from 'sequelize';
import { MODEL_LIMITS, type ModelLimitKey } from '../../shared/catalogue/types';
import {
  createModelSchema,
  modelListQuerySchema,
  modelParamsSchema,
  updateModelSchema,
  type CreateModelInput,
  type StatedLimitDto,
  type StatedLimitInput,
  type UpdateModelInput,
} from '../../shared/schemas/setup';
import type { UnitKindKey } from '../../shared/words';
import { badRequest, conflict, notFound } from '../errors';
import { valid, validate } from '../middleware/validate';
import { Unit, UnitModel } from '../models';
import { policy } from '../policies';
import { presentUnitModel } from '../presenters/setup';
import { idempotentWrite } from '../services/idempotency';
import { afterCursor, finishPage, pageRequest } from '../services/paging';
import { optionalQuantity, statedLimit } from '../services/quantities';
import { destroyOrConflict, inTransaction, lockForChange, lowerEquals, refuseIfReferenced } from '../services/records';
import { setEtag } from '../services/versioning';

async function unitCounts(ids: string[], transaction?: Transaction): Promise<Map<string, number>> {
  if (ids.length === 0) return new Map();
  const rows = await UnitModel.sequelize!.query<{ model_id: string; n: string }>(
    `SELECT model_id, count(*) AS n FROM units WHERE model_id = ANY($1::uuid[]) GROUP BY model_id`,
    { bind: [ids], type: QueryTypes.SELECT, transaction },
  );
  return new Map(rows.map((r) => [r.model_id, Number(r.n)]));
}

/** Applies limit inputs onto `current`: each key parsed to base units; null removes it. */
export function mergeLimits(
  current: Partial<Record<ModelLimitKey, StatedLimitDto>>,
  input: Partial<Record<ModelLimitKey, StatedLimitInput | null>> | undefined,
): Partial<Record<ModelLimitKey, StatedLimitDto>> {
  const next = { ...current };
  if (!input) return next;
  for (const def of MODEL_LIMITS) {
    const entry = input[def.key];
    if (entry === undefined) continue;
    if (entry === null) delete next[def.key];
    else next[def.key] = statedLimit(entry, def.quantity, `limits.${def.key}.value`);
  }
  return next;
}

const duplicateName = (name: string) => conflict(`This job already has a unit model named "${name}".`, 'duplicate');

export function unitModelsRouter(): Router {
  const router = Router();

  router.get('/jobs/:jobId/models', policy.jobMember(), validate({ query: modelListQuerySchema }), async (req, res) => {
    const query = valid<{ unitKind?: UnitKindKey; limit?: number; cursor?: string }>(req.valid.query);
    const page = pageRequest(req, { sort: 'name', value: 'text' });
    const rows = await UnitModel.findAll({
      where: { jobId: req.membership!.job.id, ...(query.unitKind ? { unitKind: query.unitKind } : {}), ...afterCursor('name', page) },
      order: [['name', 'ASC'], ['id', 'ASC']],
      limit: page.limit + 1,
    });
    const { rows: models, nextCursor } = finishPage(rows, page, (m) => m.name);
    const counts = await unitCounts(models.map((m) => m.id));
    res.json({ items: models.map((m) => presentUnitModel(m, counts.get(m.id) ?? 0)), nextCursor });
  });

  router.post('/jobs/:jobId/models', policy.jobMember(['gc_manager']), validate({ body: createModelSchema }), async (req, res) => {
    const body = valid<CreateModelInput & { modelNumber?: string | null }>(req.valid.body);
    const jobId = req.membership!.job.id;
    const nominalCapacity = optionalQuantity(body.nominalCapacity, 'capacity', 'nominalCapacity') ?? null;
    const limits = mergeLimits({}, body.limits);
    await idempotentWrite(req, res, async (transaction) => {
      if (await UnitModel.findOne({ where: { jobId, ...lowerEquals('name', body.name) }, transaction })) throw duplicateName(body.name);
      const model = await UnitModel.create(
        { jobId, name: body.name, modelNumber: body.modelNumber ?? null, unitKind: body.unitKind, nominalCapacity, limits },
        { transaction },
      );
      setEtag(res, model.version);
      return { status: 201, body: presentUnitModel(model, 0) };
    });
  });

  router.get('/jobs/:jobId/models/:modelId', policy.jobMember(), validate({ params: modelParamsSchema }), async (req, res) => {
    const { modelId } = valid<{ modelId: string }>(req.valid.params);
    const model = await UnitModel.findOne({ where: { id: modelId, jobId: req.membership!.job.id } });
    if (!model) throw notFound('Unit model not found.');
    setEtag(res, model.version);
    res.json(presentUnitModel(model, (await unitCounts([model.id])).get(model.id) ?? 0));
  });

  router.patch(
    '/jobs/:jobId/models/:modelId',
    policy.jobMember(['gc_manager']),
    validate({ params: modelParamsSchema, body: updateModelSchema }),
    async (req, res) => {
      const { modelId } = valid<{ modelId: string }>(req.valid.params);
      const body = valid<UpdateModelInput & { modelNumber?: string | null }>(req.valid.body);
      const jobId = req.membership!.job.id;
      const nominalCapacity = optionalQuantity(body.nominalCapacity, 'capacity', 'nominalCapacity');
      try {
        const { model, count } = await inTransaction(req, async (transaction) => {
          const present = async (m: UnitModel) => presentUnitModel(m, (await unitCounts([m.id], transaction)).get(m.id) ?? 0);
          const model = await lockForChange(req, UnitModel, { id: modelId, jobId }, transaction, 'Unit model not found.', present);
          if (body.unitKind !== undefined && body.unitKind !== model.unitKind) {
            const using = await Unit.count({ where: { modelId, kind: { [Op.ne]: body.unitKind } }, transaction });
            if (using > 0) {
              throw badRequest(`unitKind: ${using} unit(s) of another kind use this model; change them first.`, {
                unitKind: 'Units of another kind use this model.',
              });
            }
            model.unitKind = body.unitKind;
          }
          if (body.name !== undefined) model.name = body.name;
          if (body.modelNumber !== undefined) model.modelNumber = body.modelNumber;
          if (nominalCapacity !== undefined) model.nominalCapacity = nominalCapacity;
          if (body.limits !== undefined) model.limits = mergeLimits(model.limits ?? {}, body.limits);
          model.version += 1;
          await model.save({ transaction });
          return { model, count: (await unitCounts([model.id], transaction)).get(model.id) ?? 0 };
        });
        setEtag(res, model.version);
        res.json(presentUnitModel(model, count));
      } catch (err) {
        if (err instanceof UniqueConstraintError && body.name) throw duplicateName(body.name);
        throw err;
      }
    },
  );

  router.delete(
    '/jobs/:jobId/models/:modelId',
    policy.jobMember(['gc_manager']),
    validate({ params: modelParamsSchema }),
    async (req, res) => {
      const { modelId } = valid<{ modelId: string }>(req.valid.params);
      const jobId = req.membership!.job.id;
      await inTransaction(req, async (transaction) => {
        const model = await lockForChange(req, UnitModel, { id: modelId, jobId }, transaction, 'Unit model not found.', (m) => presentUnitModel(m, 0));
        const units = await Unit.count({ where: { modelId }, transaction });
        refuseIfReferenced(`Model ${model.name}`, [[units, 'unit', 'units']], 'Change those units to another model (or none) first.');
        await destroyOrConflict(model, transaction, `Model ${model.name}`);
      });
      res.status(204).end();
    },
  );

  return router;
}
