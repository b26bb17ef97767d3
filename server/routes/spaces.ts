/**
 * Spaces: rooms or areas on a level, with floor area (m²) and ceiling height (mm) for volume
 * checks, occupancy, enclosed, and links (permanent openings) to other spaces.
 * GET    /jobs/:jobId/spaces?levelId=       all roles
 * POST   /jobs/:jobId/spaces                GC manager (Idempotency-Key)
 * GET    /jobs/:jobId/spaces/:spaceId       all roles
 * PATCH  /jobs/:jobId/spaces/:spaceId       GC manager (If-Match); linkedSpaceIds replaces the set
 * DELETE /jobs/:jobId/spaces/:spaceId       GC manager (If-Match); 409 while units are in it
 * Reads: server/services/spaces.ts; writes: commands/createSpace.ts, commands/changeSpace.ts.
 */
import { Router } from 'express';
import type { z } from 'zod';
import { createSpaceSchema, spaceListQuerySchema, spaceParamsSchema, updateSpaceSchema } from '../../shared/schemas/setup';
import { changeSpace } from '../commands/changeSpace';
import { createSpace } from '../commands/createSpace';
import { valid, validate } from '../middleware/validate';
import { policy } from '../policies';
import { idempotentWrite } from '../services/idempotency';
import { pageRequest } from '../services/paging';
import { inTransaction, setupWrite } from '../services/records';
import { deleteSpace, findSpace, listSpaces, spaceDto } from '../services/spaces';
import { setEtag } from '../services/versioning';

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
