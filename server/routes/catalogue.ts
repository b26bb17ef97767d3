/**
 * A job's defect catalogue: the built-in items copied at job creation, plus the job's own.
 * Items are retired, never deleted (findings refer to them by code).
 * GET    /jobs/:jobId/catalogue?unitKind=&group=&includeRetired=   all roles
 * POST   /jobs/:jobId/catalogue                                     GC manager (Idempotency-Key)
 * GET    /jobs/:jobId/catalogue/:itemId                             all roles
 * PATCH  /jobs/:jobId/catalogue/:itemId                             GC manager (If-Match); retired: true|false
 * DELETE /jobs/:jobId/catalogue/:itemId                             GC manager (If-Match); retires the item (200)
 * Reads and writes: server/services/catalogue.ts.
 */
import { Router } from 'express';
import type { z } from 'zod';
import { catalogueItemParamsSchema, catalogueListQuerySchema, createCatalogueItemSchema, updateCatalogueItemSchema } from '../../shared/schemas/setup';
import { valid, validate } from '../middleware/validate';
import { policy } from '../policies';
import { presentCatalogueItem } from '../presenters/catalogue';
import { changeCatalogueItem, createCatalogueItem, findCatalogueItem, listCatalogue, retireCatalogueItem } from '../services/catalogue';
import { idempotentWrite } from '../services/idempotency';
import { pageRequest } from '../services/paging';
import { inTransaction, setupWrite } from '../services/records';
import { setEtag } from '../services/versioning';

export function catalogueRouter(): Router {
  const router = Router();

  router.get('/jobs/:jobId/catalogue', policy.jobMember(), validate({ query: catalogueListQuerySchema }), async (req, res) => {
    const query = valid<z.infer<typeof catalogueListQuerySchema>>(req.valid.query);
    const page = pageRequest(req, { sort: 'position', value: 'int' });
    res.json(await listCatalogue(req.membership!.job.id, query, page));
  });

  router.post('/jobs/:jobId/catalogue', policy.jobMember(['gc_manager']), validate({ body: createCatalogueItemSchema }), async (req, res) => {
    const body = valid<z.infer<typeof createCatalogueItemSchema>>(req.valid.body);
    await idempotentWrite(req, res, async (transaction) => {
      const item = await createCatalogueItem(setupWrite(req, transaction), body);
      setEtag(res, item.version);
      return { status: 201, body: presentCatalogueItem(item) };
    });
  });

  router.get('/jobs/:jobId/catalogue/:itemId', policy.jobMember(), validate({ params: catalogueItemParamsSchema }), async (req, res) => {
    const { itemId } = valid<z.infer<typeof catalogueItemParamsSchema>>(req.valid.params);
    const item = await findCatalogueItem(req.membership!.job.id, itemId);
    setEtag(res, item.version);
    res.json(presentCatalogueItem(item));
  });

  router.patch(
    '/jobs/:jobId/catalogue/:itemId',
    policy.jobMember(['gc_manager']),
    validate({ params: catalogueItemParamsSchema, body: updateCatalogueItemSchema }),
    async (req, res) => {
      const { itemId } = valid<z.infer<typeof catalogueItemParamsSchema>>(req.valid.params);
      const body = valid<z.infer<typeof updateCatalogueItemSchema>>(req.valid.body);
      const item = await inTransaction(req, (transaction) => changeCatalogueItem(setupWrite(req, transaction), itemId, body));
      setEtag(res, item.version);
      res.json(presentCatalogueItem(item));
    },
  );

  router.delete('/jobs/:jobId/catalogue/:itemId', policy.jobMember(['gc_manager']), validate({ params: catalogueItemParamsSchema }), async (req, res) => {
    const { itemId } = valid<z.infer<typeof catalogueItemParamsSchema>>(req.valid.params);
    const item = await inTransaction(req, (transaction) => retireCatalogueItem(setupWrite(req, transaction), itemId));
    setEtag(res, item.version);
    res.json(presentCatalogueItem(item));
  });

  return router;
}
