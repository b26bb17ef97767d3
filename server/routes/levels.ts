/**
 * Levels of a job: ordered floors with a dense 1-based position.
 * GET    /jobs/:jobId/levels                  all roles
 * POST   /jobs/:jobId/levels                  GC manager (Idempotency-Key); appended last
 * POST   /jobs/:jobId/levels/order            GC manager; { levelIds: every id, new order }
 * PATCH  /jobs/:jobId/levels/:levelId         GC manager (If-Match); rename
 * DELETE /jobs/:jobId/levels/:levelId         GC manager (If-Match); 409 while spaces or units are on it
 */
import { Router } from 'express';
import { QueryTypes, type Transaction, UniqueConstraintError } from 'sequelize';
import {
  createLevelSchema,
  levelListQuerySchema,
  levelParamsSchema,
  reorderLevelsSchema,
  updateLevelSchema,
  type CreateLevelInput,
  type ReorderLevelsInput,
  type UpdateLevelInput,
} from '../../shared/schemas/setup';
import { conflict } from '../errors';
import { valid, validate } from '../middleware/validate';
import { Level, Space, Unit } from '../models';
import { policy } from '../policies';
import { presentLevel } from '../presenters/setup';
import { idempotentWrite } from '../services/idempotency';
import { afterCursor, finishPage, pageRequest } from '../services/paging';
import { destroyOrConflict, inTransaction, lockForChange, lockJob, lowerEquals, refuseIfReferenced, sequelizeOf } from '../services/records';
import { setEtag } from '../services/versioning';

type Counts = Map<string, { spaces: number; units: number }>;

async function countsFor(levelIds: string[], transaction?: Transaction): Promise<Counts> {
  const counts: Counts = new Map(levelIds.map((id) => [id, { spaces: 0, units: 0 }]));
  if (levelIds.length === 0) return counts;
  const sequelize = Level.sequelize!;
  const spaces = await sequelize.query<{ level_id: string; n: string }>(
    `SELECT level_id, count(*) AS n FROM spaces WHERE level_id = ANY($1::uuid[]) GROUP BY level_id`,
    { bind: [levelIds], type: QueryTypes.SELECT, transaction },
  );
  const units = await sequelize.query<{ level_id: string; n: string }>(
    `SELECT level_id, count(*) AS n FROM units WHERE level_id = ANY($1::uuid[]) GROUP BY level_id`,
    { bind: [levelIds], type: QueryTypes.SELECT, transaction },
  );
  for (const r of spaces) counts.get(r.level_id)!.spaces = Number(r.n);
  for (const r of units) counts.get(r.level_id)!.units = Number(r.n);
  return counts;
}

function duplicateName(name: string) {
  return conflict(`This job already has a level named "${name}".`, 'duplicate');
}

async function presentOne(level: Level, transaction?: Transaction) {
  const counts = await countsFor([level.id], transaction);
  return presentLevel(level, counts.get(level.id));
}

export function levelsRouter(): Router {
  const router = Router();

  router.get('/jobs/:jobId/levels', policy.jobMember(), validate({ query: levelListQuerySchema }), async (req, res) => {
    const page = pageRequest(req, { sort: 'position', value: 'int' });
    const jobId = req.membership!.job.id;
    const rows = await Level.findAll({
      where: { jobId, ...afterCursor('position', page) },
      order: [['position', 'ASC'], ['id', 'ASC']],
      limit: page.limit + 1,
    });
    const { rows: levels, nextCursor } = finishPage(rows, page, (l) => l.position);
    const counts = await countsFor(levels.map((l) => l.id));
    res.json({ items: levels.map((l) => presentLevel(l, counts.get(l.id))), nextCursor });
  });

  router.post('/jobs/:jobId/levels', policy.jobMember(['gc_manager']), validate({ body: createLevelSchema }), async (req, res) => {
    const body = valid<CreateLevelInput>(req.valid.body);
    const jobId = req.membership!.job.id;
    await idempotentWrite(req, res, async (transaction) => {
      // Serialise level writes of this job so positions stay dense.
      await lockJob(req, jobId, transaction);
      const clash = await Level.findOne({ where: { jobId, ...lowerEquals('name', body.name) }, transaction });
      if (clash) throw duplicateName(body.name);
      const max = (await Level.max<number, Level>('position', { where: { jobId }, transaction })) ?? 0;
      const level = await Level.create({ jobId, name: body.name, position: max + 1 }, { transaction });
      setEtag(res, level.version);
      return { status: 201, body: presentLevel(level) };
    });
  });

  router.post(
    '/jobs/:jobId/levels/order',
    policy.jobMember(['gc_manager']),
    validate({ body: reorderLevelsSchema }),
    async (req, res) => {
      const { levelIds } = valid<ReorderLevelsInput>(req.valid.body);
      const jobId = req.membership!.job.id;
      await idempotentWrite(req, res, async (transaction) => {
        await lockJob(req, jobId, transaction);
        const levels = await Level.findAll({ where: { jobId }, transaction, lock: transaction.LOCK.UPDATE });
        const held = new Set(levels.map((l) => l.id));
        if (levels.length !== levelIds.length || levelIds.some((id) => !held.has(id))) {
          throw conflict(
            'The level list has changed since you loaded it: send every level of the job exactly once. Reload and try again.',
            'stale_list',
          );
        }
        const byId = new Map(levels.map((l) => [l.id, l]));
        for (const [index, id] of levelIds.entries()) {
          const level = byId.get(id)!;
          if (level.position !== index + 1) {
            level.position = index + 1;
            level.version += 1;
            await level.save({ transaction });
          }
        }
        const ordered = levelIds.map((id) => byId.get(id)!);
        const counts = await countsFor(levelIds, transaction);
        return { status: 200, body: { items: ordered.map((l) => presentLevel(l, counts.get(l.id))), nextCursor: null } };
      });
    },
  );

  router.patch(
    '/jobs/:jobId/levels/:levelId',
    policy.jobMember(['gc_manager']),
    validate({ params: levelParamsSchema, body: updateLevelSchema }),
    async (req, res) => {
      const { levelId } = valid<{ levelId: string }>(req.valid.params);
      const body = valid<UpdateLevelInput>(req.valid.body);
      const jobId = req.membership!.job.id;
      try {
        const level = await inTransaction(req, async (transaction) => {
          const level = await lockForChange(req, Level, { id: levelId, jobId }, transaction, 'Level not found.', (l) => presentOne(l, transaction));
          level.name = body.name;
          level.version += 1;
          await level.save({ transaction });
          return level;
        });
        setEtag(res, level.version);
        res.json(await presentOne(level));
      } catch (err) {
        if (err instanceof UniqueConstraintError) throw duplicateName(body.name);
        throw err;
      }
    },
  );

  router.delete(
    '/jobs/:jobId/levels/:levelId',
    policy.jobMember(['gc_manager']),
    validate({ params: levelParamsSchema }),
    async (req, res) => {
      const { levelId } = valid<{ levelId: string }>(req.valid.params);
      const jobId = req.membership!.job.id;
      await inTransaction(req, async (transaction) => {
        await lockJob(req, jobId, transaction);
        const level = await lockForChange(req, Level, { id: levelId, jobId }, transaction, 'Level not found.', (l) => presentOne(l, transaction));
        const spaces = await Space.count({ where: { levelId }, transaction });
        const units = await Unit.count({ where: { levelId }, transaction });
        refuseIfReferenced(`${level.name}`, [[spaces, 'space', 'spaces'], [units, 'unit', 'units']], 'Move or delete them first.');
        await destroyOrConflict(level, transaction, `${level.name}`);
        await sequelizeOf(req).query(
          `UPDATE levels SET position = position - 1, version = version + 1, updated_at = now() WHERE job_id = $1 AND position > $2`,
          { bind: [jobId, level.position], transaction },
        );
      });
      res.status(204).end();
    },
  );

  return router;
}
