/**
 * Spaces: rooms or areas on a level, with floor area (m²) and ceiling height (mm) for volume
 * checks, occupancy, enclosed, and links (permanent openings) to other spaces.
 * GET    /jobs/:jobId/spaces?levelId=       all roles
 * POST   /jobs/:jobId/spaces                GC manager (Idempotency-Key)
 * GET    /jobs/:jobId/spaces/:spaceId       all roles
 * PATCH  /jobs/:jobId/spaces/:spaceId       GC manager (If-Match); linkedSpaceIds replaces the set
 * DELETE /jobs/:jobId/spaces/:spaceId       GC manager (If-Match); 409 while units are in it
 */
import { Router } from 'express';
import { Op, QueryTypes, type Transaction } from 'sequelize';
import {
  createSpaceSchema,
  spaceListQuerySchema,
  spaceParamsSchema,
  updateSpaceSchema,
  type CreateSpaceInput,
  type UpdateSpaceInput,
} from '../../shared/schemas/setup';
import { badRequest, notFound } from '../errors';
import { valid, validate } from '../middleware/validate';
import { Level, Space, SpaceLink, Unit } from '../models';
import { policy } from '../policies';
import { presentSpace } from '../presenters/setup';
import { idempotentWrite } from '../services/idempotency';
import { afterCursor, finishPage, pageRequest } from '../services/paging';
import { optionalQuantity } from '../services/quantities';
import { destroyOrConflict, inTransaction, lockForChange, refuseIfReferenced, sequelizeOf } from '../services/records';
import { setEtag } from '../services/versioning';

async function presentSpaces(spaces: Space[], transaction?: Transaction) {
  if (spaces.length === 0) return [];
  const ids = spaces.map((s) => s.id);
  const levels = await Level.findAll({ where: { id: [...new Set(spaces.map((s) => s.levelId))] }, transaction });
  const levelName = new Map(levels.map((l) => [l.id, l.name]));
  const links = await SpaceLink.findAll({ where: { [Op.or]: [{ spaceAId: ids }, { spaceBId: ids }] }, transaction });
  const linked = new Map<string, string[]>(ids.map((id) => [id, []]));
  for (const l of links) {
    linked.get(l.spaceAId)?.push(l.spaceBId);
    linked.get(l.spaceBId)?.push(l.spaceAId);
  }
  const unitCounts = await Space.sequelize!.query<{ space_id: string; n: string }>(
    `SELECT space_id, count(*) AS n FROM units WHERE space_id = ANY($1::uuid[]) GROUP BY space_id`,
    { bind: [ids], type: QueryTypes.SELECT, transaction },
  );
  const units = new Map(unitCounts.map((r) => [r.space_id, Number(r.n)]));
  return spaces.map((s) =>
    presentSpace(s, {
      levelName: levelName.get(s.levelId) ?? '',
      linkedSpaceIds: (linked.get(s.id) ?? []).sort(),
      unitCount: units.get(s.id) ?? 0,
    }),
  );
}

async function presentOne(space: Space, transaction?: Transaction) {
  return (await presentSpaces([space], transaction))[0]!;
}

async function requireLevel(jobId: string, levelId: string, transaction: Transaction): Promise<Level> {
  const level = await Level.findOne({ where: { id: levelId, jobId }, transaction });
  if (!level) throw badRequest('levelId: Not a level of this job.', { levelId: 'Not a level of this job.' });
  return level;
}

/** Replaces the links of one space with `linkedIds` (checked to be other spaces of the job). */
async function replaceLinks(jobId: string, spaceId: string, linkedIds: string[], transaction: Transaction): Promise<void> {
  if (linkedIds.includes(spaceId)) {
    throw badRequest('linkedSpaceIds: A space cannot be linked to itself.', { linkedSpaceIds: 'A space cannot be linked to itself.' });
  }
  if (linkedIds.length > 0) {
    const found = await Space.count({ where: { jobId, id: linkedIds }, transaction });
    if (found !== linkedIds.length) {
      throw badRequest('linkedSpaceIds: Not all are spaces of this job.', { linkedSpaceIds: 'Not all are spaces of this job.' });
    }
  }
  await SpaceLink.destroy({ where: { jobId, [Op.or]: [{ spaceAId: spaceId }, { spaceBId: spaceId }] }, transaction });
  if (linkedIds.length > 0) {
    await SpaceLink.bulkCreate(
      linkedIds.map((other) => {
        const [a, b] = spaceId < other ? [spaceId, other] : [other, spaceId];
        return { jobId, spaceAId: a, spaceBId: b };
      }),
      { transaction },
    );
  }
}

export function spacesRouter(): Router {
  const router = Router();

  router.get('/jobs/:jobId/spaces', policy.jobMember(), validate({ query: spaceListQuerySchema }), async (req, res) => {
    const query = valid<{ levelId?: string; limit?: number; cursor?: string }>(req.valid.query);
    const page = pageRequest(req, { sort: 'name', value: 'text' });
    const rows = await Space.findAll({
      where: { jobId: req.membership!.job.id, ...(query.levelId ? { levelId: query.levelId } : {}), ...afterCursor('name', page) },
      order: [['name', 'ASC'], ['id', 'ASC']],
      limit: page.limit + 1,
    });
    const { rows: spaces, nextCursor } = finishPage(rows, page, (s) => s.name);
    res.json({ items: await presentSpaces(spaces), nextCursor });
  });

  router.post('/jobs/:jobId/spaces', policy.jobMember(['gc_manager']), validate({ body: createSpaceSchema }), async (req, res) => {
    const body = valid<CreateSpaceInput>(req.valid.body);
    const jobId = req.membership!.job.id;
    const floorArea = optionalQuantity(body.floorArea, 'area', 'floorArea') ?? null;
    const ceilingHeight = optionalQuantity(body.ceilingHeight, 'length', 'ceilingHeight') ?? null;
    await idempotentWrite(req, res, async (transaction) => {
      await requireLevel(jobId, body.levelId, transaction);
      const space = await Space.create(
        {
          jobId,
          levelId: body.levelId,
          name: body.name,
          floorArea,
          ceilingHeight,
          ...(body.occupancy ? { occupancy: body.occupancy } : {}),
          ...(body.enclosed !== undefined ? { enclosed: body.enclosed } : {}),
        },
        { transaction },
      );
      if (body.linkedSpaceIds) await replaceLinks(jobId, space.id, body.linkedSpaceIds, transaction);
      setEtag(res, space.version);
      return { status: 201, body: await presentOne(space, transaction) };
    });
  });

  router.get('/jobs/:jobId/spaces/:spaceId', policy.jobMember(), validate({ params: spaceParamsSchema }), async (req, res) => {
    const { spaceId } = valid<{ spaceId: string }>(req.valid.params);
    const space = await Space.findOne({ where: { id: spaceId, jobId: req.membership!.job.id } });
    if (!space) throw notFound('Space not found.');
    setEtag(res, space.version);
    res.json(await presentOne(space));
  });

  router.patch(
    '/jobs/:jobId/spaces/:spaceId',
    policy.jobMember(['gc_manager']),
    validate({ params: spaceParamsSchema, body: updateSpaceSchema }),
    async (req, res) => {
      const { spaceId } = valid<{ spaceId: string }>(req.valid.params);
      const body = valid<UpdateSpaceInput>(req.valid.body);
      const jobId = req.membership!.job.id;
      const floorArea = optionalQuantity(body.floorArea, 'area', 'floorArea');
      const ceilingHeight = optionalQuantity(body.ceilingHeight, 'length', 'ceilingHeight');
      const space = await inTransaction(req, async (transaction) => {
        const space = await lockForChange(req, Space, { id: spaceId, jobId }, transaction, 'Space not found.', (s) => presentOne(s, transaction));
        if (body.levelId !== undefined && body.levelId !== space.levelId) {
          await requireLevel(jobId, body.levelId, transaction);
          // Units carry their level too: they move with their space.
          await sequelizeOf(req).query(
            `UPDATE units SET level_id = $1, version = version + 1, updated_at = now() WHERE space_id = $2 AND job_id = $3`,
            { bind: [body.levelId, spaceId, jobId], transaction },
          );
          space.levelId = body.levelId;
        }
        if (body.name !== undefined) space.name = body.name;
        if (floorArea !== undefined) space.floorArea = floorArea;
        if (ceilingHeight !== undefined) space.ceilingHeight = ceilingHeight;
        if (body.occupancy !== undefined) space.occupancy = body.occupancy;
        if (body.enclosed !== undefined) space.enclosed = body.enclosed;
        if (body.linkedSpaceIds !== undefined) await replaceLinks(jobId, space.id, body.linkedSpaceIds, transaction);
        space.version += 1;
        await space.save({ transaction });
        return space;
      });
      setEtag(res, space.version);
      res.json(await presentOne(space));
    },
  );

  router.delete(
    '/jobs/:jobId/spaces/:spaceId',
    policy.jobMember(['gc_manager']),
    validate({ params: spaceParamsSchema }),
    async (req, res) => {
      const { spaceId } = valid<{ spaceId: string }>(req.valid.params);
      const jobId = req.membership!.job.id;
      await inTransaction(req, async (transaction) => {
        const space = await lockForChange(req, Space, { id: spaceId, jobId }, transaction, 'Space not found.', (s) => presentOne(s, transaction));
        const units = await Unit.count({ where: { spaceId }, transaction });
        refuseIfReferenced(space.name, [[units, 'unit', 'units']], 'Move those units to another space (or clear their space) first.');
        await destroyOrConflict(space, transaction, space.name); // its links go with it (ON DELETE CASCADE)
      });
      res.status(204).end();
    },
  );

  return router;
}
