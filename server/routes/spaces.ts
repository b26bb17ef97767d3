/**
 * Spaces: rooms or areas on a level, with floor area (m²) and ceiling height (mm) for volume
 * checks, occupancy, enclosed, and links (permanent openings) to other spaces.
 * GET    /jobs/:jobId/spaces?levelId=       all roles
 * POST   /jobs/:jobId/spaces                GC manager (Idempotency-Key)
 * POST   /jobs/:jobId/spaces/bulk           GC manager (Idempotency-Key); { levelId, names } pasted one per line; all or none
 * POST   /jobs/:jobId/spaces/import         GC manager (Idempotency-Key); a room schedule { rows, apply }: the preview, or
 *                                           all of it (new levels, new spaces, areas and heights) or none
 * GET    /jobs/:jobId/spaces/:spaceId       all roles
 * PATCH  /jobs/:jobId/spaces/:spaceId       GC manager (If-Match); linkedSpaceIds replaces the set
 * DELETE /jobs/:jobId/spaces/:spaceId       GC manager (If-Match); 409 while units are in it
 * Reads: server/services/spaces.ts; writes: commands/createSpace.ts, commands/changeSpace.ts; the import:
 * services/spaceImport.ts.
 */
import express, { Router } from 'express';
import type { z } from 'zod';
import { bulkSpacesSchema, createSpaceSchema, spaceImportSchema, spaceListQuerySchema, spaceParamsSchema, updateSpaceSchema } from '../../shared/schemas/setup';
import { changeSpace } from '../commands/changeSpace';
import { createSpace } from '../commands/createSpace';
import { valid, validate } from '../middleware/validate';
import { policy } from '../policies';
import { idempotentWrite } from '../services/idempotency';
import { pageRequest } from '../services/paging';
import { inTransaction, setupWrite } from '../services/records';
import { importSpaces } from '../services/spaceImport';
import { createSpaces, deleteSpace, findSpace, listSpaces, spaceDto, spaceDtos } from '../services/spaces';
import { setEtag } from '../services/versioning';

/**
 * The room schedule's JSON parser, mounted in app.ts BEFORE the API-wide one (100 kB): 2,000 rooms
 * with their levels, areas and heights are larger than that.
 */
export function spaceImportBodyParser(): Router {
  const router = Router();
  // router.use (not .post): middleware, not a route; the route itself declares its policy below.
  router.use('/jobs/:jobId/spaces/import', express.json({ limit: '1mb', strict: true }));
  return router;
}

export function spacesRouter(): Router {
  const router = Router();

  router.get('/jobs/:jobId/spaces', policy.jobMember(), validate({ query: spaceListQuerySchema }), async (req, res) => {
    const query = valid<z.infer<typeof spaceListQuerySchema>>(req.valid.query);
    const page = pageRequest(req, { sort: 'name', value: 'text' });
    res.json(await listSpaces(req.membership!.job.id, query.levelId, page));
  });

  router.post('/jobs/:jobId/spaces', policy.jobMember(['gc_manager']), validate({ body: createSpaceSchema }), async (req, res) => {
    const body = valid<z.infer<typeof createSpaceSchema>>(req.valid.body);
    await idempotentWrite(req, res, async (transaction) => {
      const { space, dto } = await createSpace({ transaction, jobId: req.membership!.job.id }, body);
      setEtag(res, space.version);
      return { status: 201, body: dto };
    });
  });

  router.post('/jobs/:jobId/spaces/bulk', policy.jobMember(['gc_manager']), validate({ body: bulkSpacesSchema }), async (req, res) => {
    const { levelId, names } = valid<z.infer<typeof bulkSpacesSchema>>(req.valid.body);
    await idempotentWrite(req, res, async (transaction) => {
      const write = setupWrite(req, transaction);
      const spaces = await createSpaces(write, levelId, names, async (input) => (await createSpace(write, input)).space);
      return { status: 201, body: { items: await spaceDtos(spaces, transaction) } };
    });
  });

  router.post('/jobs/:jobId/spaces/import', policy.jobMember(['gc_manager']), validate({ body: spaceImportSchema }), async (req, res) => {
    const body = valid<z.infer<typeof spaceImportSchema>>(req.valid.body);
    await idempotentWrite(req, res, async (transaction) => ({ status: 200, body: await importSpaces(setupWrite(req, transaction), body) }));
  });

  router.get('/jobs/:jobId/spaces/:spaceId', policy.jobMember(), validate({ params: spaceParamsSchema }), async (req, res) => {
    const { spaceId } = valid<z.infer<typeof spaceParamsSchema>>(req.valid.params);
    const space = await findSpace(req.membership!.job.id, spaceId);
    setEtag(res, space.version);
    res.json(await spaceDto(space));
  });

  router.patch(
    '/jobs/:jobId/spaces/:spaceId',
    policy.jobMember(['gc_manager']),
    validate({ params: spaceParamsSchema, body: updateSpaceSchema }),
    async (req, res) => {
      const { spaceId } = valid<z.infer<typeof spaceParamsSchema>>(req.valid.params);
      const body = valid<z.infer<typeof updateSpaceSchema>>(req.valid.body);
      const space = await inTransaction(req, (transaction) => changeSpace(setupWrite(req, transaction), spaceId, body));
      setEtag(res, space.version);
      res.json(await spaceDto(space));
    },
  );

  router.delete('/jobs/:jobId/spaces/:spaceId', policy.jobMember(['gc_manager']), validate({ params: spaceParamsSchema }), async (req, res) => {
    const { spaceId } = valid<z.infer<typeof spaceParamsSchema>>(req.valid.params);
    await inTransaction(req, (transaction) => deleteSpace(setupWrite(req, transaction), spaceId));
    res.status(204).end();
  });

  return router;
}
