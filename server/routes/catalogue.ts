/**
 * A job's defect catalogue: the built-in items copied at job creation, plus the job's own.
 * Items are retired, never deleted (findings refer to them by code).
 * GET    /jobs/:jobId/catalogue?unitKind=&group=&includeRetired=   all roles
 * POST   /jobs/:jobId/catalogue                                     GC manager (Idempotency-Key)
 * GET    /jobs/:jobId/catalogue/:itemId                             all roles
 * PATCH  /jobs/:jobId/catalogue/:itemId                             GC manager (If-Match); retired: true|false
 * DELETE /jobs/:jobId/catalogue/:itemId                             GC manager (If-Match); retires the item (200)
 */
import { Router } from 'express';
import { Op, UniqueConstraintError } from 'sequelize';
import type { CatalogueGroup, MeasuredRule } from '../../shared/catalogue/types';
import {
  catalogueItemParamsSchema,
  catalogueListQuerySchema,
  createCatalogueItemSchema,
  updateCatalogueItemSchema,
  type CreateCatalogueItemInput,
  type UpdateCatalogueItemInput,
} from '../../shared/schemas/setup';
import type { UnitKindKey } from '../../shared/words';
import { conflict, notFound } from '../errors';
import { valid, validate } from '../middleware/validate';
import { CatalogueItem } from '../models';
import { policy } from '../policies';
import { presentCatalogueItem } from '../presenters/setup';
import { idempotentWrite } from '../services/idempotency';
import { afterCursor, finishPage, pageRequest } from '../services/paging';
import { inTransaction, lockForChange, lockJob } from '../services/records';
import { setEtag } from '../services/versioning';

type CreateBody = Omit<CreateCatalogueItemInput, 'code' | 'caution'> & { code: string; caution?: string | null };
type UpdateBody = Omit<UpdateCatalogueItemInput, 'caution'> & { caution?: string | null };

const duplicateCode = (code: string) => conflict(`Code ${code} is already in this job's catalogue (retired items keep their code).`, 'duplicate');

export function catalogueRouter(): Router {
  const router = Router();

  router.get('/jobs/:jobId/catalogue', policy.jobMember(), validate({ query: catalogueListQuerySchema }), async (req, res) => {
    const query = valid<{ unitKind?: UnitKindKey; group?: CatalogueGroup; includeRetired?: boolean; limit?: number; cursor?: string }>(
      req.valid.query,
    );
    const page = pageRequest(req, { sort: 'position', value: 'int' });
    const rows = await CatalogueItem.findAll({
      where: {
        jobId: req.membership!.job.id,
        ...(query.unitKind ? { unitKinds: { [Op.contains]: [query.unitKind] } } : {}),
        ...(query.group ? { group: query.group } : {}),
        ...(query.includeRetired ? {} : { retiredAt: null }),
        ...afterCursor('position', page),
      },
      order: [['position', 'ASC'], ['id', 'ASC']],
      limit: page.limit + 1,
    });
    const { rows: items, nextCursor } = finishPage(rows, page, (i) => i.position);
    res.json({ items: items.map(presentCatalogueItem), nextCursor });
  });

  router.post('/jobs/:jobId/catalogue', policy.jobMember(['gc_manager']), validate({ body: createCatalogueItemSchema }), async (req, res) => {
    const body = valid<CreateBody>(req.valid.body);
    const jobId = req.membership!.job.id;
    try {
      await idempotentWrite(req, res, async (transaction) => {
        await lockJob(req, jobId, transaction);
        if (await CatalogueItem.findOne({ where: { jobId, code: body.code }, transaction })) throw duplicateCode(body.code);
        const max = (await CatalogueItem.max<number, CatalogueItem>('position', { where: { jobId }, transaction })) ?? 0;
        const item = await CatalogueItem.create(
          {
            jobId,
            code: body.code,
            group: body.group,
            title: body.title,
            description: body.description,
            unitKinds: [...body.unitKinds],
            defaultSeverity: body.defaultSeverity,
            trade: body.trade,
            measuredRule: (body.measuredRule ?? null) as MeasuredRule | null,
            fixGuidance: body.fixGuidance,
            caution: body.caution ?? null,
            needsCeilingAccess: body.needsCeilingAccess,
            builtin: false,
            position: max + 1,
          },
          { transaction },
        );
        setEtag(res, item.version);
        return { status: 201, body: presentCatalogueItem(item) };
      });
    } catch (err) {
      if (err instanceof UniqueConstraintError) throw duplicateCode(body.code);
      throw err;
    }
  });

  router.get('/jobs/:jobId/catalogue/:itemId', policy.jobMember(), validate({ params: catalogueItemParamsSchema }), async (req, res) => {
    const { itemId } = valid<{ itemId: string }>(req.valid.params);
    const item = await CatalogueItem.findOne({ where: { id: itemId, jobId: req.membership!.job.id } });
    if (!item) throw notFound('Catalogue item not found.');
    setEtag(res, item.version);
    res.json(presentCatalogueItem(item));
  });

  router.patch(
    '/jobs/:jobId/catalogue/:itemId',
    policy.jobMember(['gc_manager']),
    validate({ params: catalogueItemParamsSchema, body: updateCatalogueItemSchema }),
    async (req, res) => {
      const { itemId } = valid<{ itemId: string }>(req.valid.params);
      const body = valid<UpdateBody>(req.valid.body);
      const jobId = req.membership!.job.id;
      const item = await inTransaction(req, async (transaction) => {
        const item = await lockForChange(req, CatalogueItem, { id: itemId, jobId }, transaction, 'Catalogue item not found.', presentCatalogueItem);
        if (body.group !== undefined) item.group = body.group;
        if (body.title !== undefined) item.title = body.title;
        if (body.description !== undefined) item.description = body.description;
        if (body.unitKinds !== undefined) item.unitKinds = [...body.unitKinds];
        if (body.defaultSeverity !== undefined) item.defaultSeverity = body.defaultSeverity;
        if (body.trade !== undefined) item.trade = body.trade;
        if (body.measuredRule !== undefined) item.measuredRule = (body.measuredRule ?? null) as MeasuredRule | null;
        if (body.fixGuidance !== undefined) item.fixGuidance = body.fixGuidance;
        if (body.caution !== undefined) item.caution = body.caution;
        if (body.needsCeilingAccess !== undefined) item.needsCeilingAccess = body.needsCeilingAccess;
        if (body.retired === true && !item.retiredAt) item.retiredAt = new Date();
        if (body.retired === false) item.retiredAt = null;
        item.version += 1;
        await item.save({ transaction });
        return item;
      });
      setEtag(res, item.version);
      res.json(presentCatalogueItem(item));
    },
  );

  router.delete(
    '/jobs/:jobId/catalogue/:itemId',
    policy.jobMember(['gc_manager']),
    validate({ params: catalogueItemParamsSchema }),
    async (req, res) => {
      const { itemId } = valid<{ itemId: string }>(req.valid.params);
      const jobId = req.membership!.job.id;
      const item = await inTransaction(req, async (transaction) => {
        const item = await lockForChange(req, CatalogueItem, { id: itemId, jobId }, transaction, 'Catalogue item not found.', presentCatalogueItem);
        if (!item.retiredAt) {
          item.retiredAt = new Date();
          item.version += 1;
          await item.save({ transaction });
        }
        return item;
      });
      setEtag(res, item.version);
      res.json(presentCatalogueItem(item));
    },
  );

  return router;
}
