/**
 * Walks: one inspector's pass over a level, and the level's units with their state.
 * POST /jobs/:jobId/walks                        inspector, GC manager (Idempotency-Key) → 201 WalkDetail
 * GET  /jobs/:jobId/walks                        inspector, GC manager; filters levelId, inspectorId, open
 * GET  /jobs/:jobId/walks/:walkId                inspector, GC manager → WalkDetail (with coverage)
 * POST /jobs/:jobId/walks/:walkId/finish         the walk's inspector or a GC manager → WalkDetail
 * GET  /jobs/:jobId/levels/:levelId/walk-units   inspector, GC manager → WalkUnitsResponse
 * Subcontractors get 403: walks and unit states show every company's findings.
 */
import { Router } from 'express';
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import {
  createWalkSchema,
  finishWalkSchema,
  walkLevelParamsSchema,
  walkListQuerySchema,
  walkParamsSchema,
  walkUnitsQuerySchema,
  type CreateWalkInput,
  type WalkDetail,
  type WalkDto,
  type WalkListQueryParsed,
  type WalkUnitsQueryParsed,
  type WalkUnitsResponse,
} from '../../shared/schemas/findings';
import { jobParamsSchema } from '../../shared/schemas/setup';
import { badRequest, forbidden, notFound } from '../errors';
import { valid, validate } from '../middleware/validate';
import { Level, Walk } from '../models';
import { policy } from '../policies';
import { idempotentWrite } from '../services/idempotency';
import { finishPage, pageRequest } from '../services/paging';
import { inTransaction, lockRow, sequelizeOf } from '../services/records';
import { levelCoverage, walkUnitCounts, walkUnitsPage } from '../services/walkUnits';

const WALK_ROLES = ['gc_manager', 'inspector'] as const;

interface WalkRow {
  id: string;
  level_id: string;
  level_name: string;
  inspector_id: string;
  inspector_name: string;
  started_at: Date;
  finished_at: Date | null;
  check_count: string | number;
  /** started_at with microseconds, for the cursor. */
  started_text: string;
}

const WALK_SELECT = `
  SELECT w.id, w.level_id, l.name AS level_name, w.inspector_id, u.name AS inspector_name,
         w.started_at, w.finished_at,
         to_char(w.started_at AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.US"Z"') AS started_text,
         (SELECT count(*) FROM unit_checks uc WHERE uc.walk_id = w.id) AS check_count
    FROM walks w JOIN levels l ON l.id = w.level_id JOIN users u ON u.id = w.inspector_id`;

function presentWalk(row: WalkRow): WalkDto {
  return {
    id: row.id,
    levelId: row.level_id,
    levelName: row.level_name,
    inspector: { id: row.inspector_id, name: row.inspector_name },
    startedAt: new Date(row.started_at).toISOString(),
    finishedAt: row.finished_at ? new Date(row.finished_at).toISOString() : null,
    checkCount: Number(row.check_count),
  };
}

export async function walkDetail(
  sequelize: Sequelize,
  jobId: string,
  walkId: string,
  transaction?: Transaction,
): Promise<WalkDetail | null> {
  const [row] = await sequelize.query<WalkRow>(`${WALK_SELECT} WHERE w.job_id = $1 AND w.id = $2`, {
    bind: [jobId, walkId],
    type: QueryTypes.SELECT,
    transaction,
  });
  if (!row) return null;
  const coverage = await levelCoverage(sequelize, jobId, row.level_id, transaction);
  const [inWalk] = await sequelize.query<{ n: string }>(
    `SELECT count(DISTINCT unit_id) AS n FROM unit_checks WHERE walk_id = $1 AND complete`,
    { bind: [walkId], type: QueryTypes.SELECT, transaction },
  );
  return { ...presentWalk(row), coverage, checkedInWalk: Number(inWalk?.n ?? 0) };
}

export function walksRouter(): Router {
  const router = Router();

  router.post(
    '/jobs/:jobId/walks',
    policy.jobMember(WALK_ROLES),
    validate({ params: jobParamsSchema, body: createWalkSchema }),
    async (req, res) => {
      const body = valid<CreateWalkInput>(req.valid.body);
      const { job } = req.membership!;
      const sequelize = sequelizeOf(req);
      await idempotentWrite(req, res, async (transaction) => {
        const level = await Level.findOne({ where: { id: body.levelId, jobId: job.id }, transaction });
        if (!level) throw badRequest('levelId: That level is not on this job.', { levelId: 'That level is not on this job.' });
        const now = new Date();
        const walk = await Walk.create(
          { jobId: job.id, levelId: level.id, inspectorId: req.user!.id, startedAt: now },
          { transaction },
        );
        return { status: 201, body: await walkDetail(sequelize, job.id, walk.id, transaction) };
      });
    },
  );

  router.get(
    '/jobs/:jobId/walks',
    policy.jobMember(WALK_ROLES),
    validate({ params: jobParamsSchema, query: walkListQuerySchema }),
    async (req, res) => {
      const query = valid<WalkListQueryParsed>(req.valid.query);
      const { job } = req.membership!;
      const page = pageRequest(req, { sort: '-startedAt', value: 'timestamp' });
      const bind: unknown[] = [job.id];
      const conds = ['w.job_id = $1'];
      if (query.levelId) conds.push(`w.level_id = $${bind.push(query.levelId)}`);
      if (query.inspectorId) conds.push(`w.inspector_id = $${bind.push(query.inspectorId)}`);
      if (query.open === true) conds.push('w.finished_at IS NULL');
      if (query.open === false) conds.push('w.finished_at IS NOT NULL');
      if (page.after) {
        // Newest first: (started_at, id) descending; the cursor carries started_at as text (microseconds kept).
        const a = bind.push(String(page.after.value));
        const b = bind.push(page.after.id);
        conds.push(`(w.started_at < $${a}::timestamptz OR (w.started_at = $${a}::timestamptz AND w.id < $${b}))`);
      }
      const limit = bind.push(page.limit + 1);
      const rows = await sequelizeOf(req).query<WalkRow>(
        `${WALK_SELECT} WHERE ${conds.join(' AND ')} ORDER BY w.started_at DESC, w.id DESC LIMIT $${limit}`,
        { bind, type: QueryTypes.SELECT },
      );
      const { rows: kept, nextCursor } = finishPage(rows, page, (r) => r.started_text);
      res.json({ items: kept.map(presentWalk), nextCursor });
    },
  );

  router.get('/jobs/:jobId/walks/:walkId', policy.jobMember(WALK_ROLES), validate({ params: walkParamsSchema }), async (req, res) => {
    const { walkId } = valid<{ walkId: string }>(req.valid.params);
    const walk = await walkDetail(sequelizeOf(req), req.membership!.job.id, walkId);
    if (!walk) throw notFound('Walk not found.');
    res.json(walk);
  });

  router.post(
    '/jobs/:jobId/walks/:walkId/finish',
    policy.jobMember(WALK_ROLES),
    validate({ params: walkParamsSchema, body: finishWalkSchema }),
    async (req, res) => {
      const { walkId } = valid<{ walkId: string }>(req.valid.params);
      const { job, role } = req.membership!;
      const sequelize = sequelizeOf(req);
      const detail = await inTransaction(req, async (transaction) => {
        const walk = await lockRow(Walk, { id: walkId, jobId: job.id }, transaction, 'Walk not found.');
        if (role !== 'gc_manager' && walk.inspectorId !== req.user!.id) {
          throw forbidden('Only the inspector who started this walk or a GC manager can finish it.');
        }
        // Finishing twice is harmless (a retried request): the first finish time stays.
        if (!walk.finishedAt) {
          walk.finishedAt = new Date();
          await walk.save({ transaction });
        }
        return walkDetail(sequelize, job.id, walk.id, transaction);
      });
      res.json(detail);
    },
  );

  router.get(
    '/jobs/:jobId/levels/:levelId/walk-units',
    policy.jobMember(WALK_ROLES),
    validate({ params: walkLevelParamsSchema, query: walkUnitsQuerySchema }),
    async (req, res) => {
      const { levelId } = valid<{ levelId: string }>(req.valid.params);
      const query = valid<WalkUnitsQueryParsed>(req.valid.query);
      const { job } = req.membership!;
      const sequelize = sequelizeOf(req);
      const level = await Level.findOne({ where: { id: levelId, jobId: job.id } });
      if (!level) throw notFound('Level not found.');
      const page = pageRequest(req, { sort: 'tag', value: 'text' });
      const filters = { spaceId: query.spaceId, systemId: query.systemId, kind: query.kind, q: query.q || undefined, state: query.state };
      const items = await walkUnitsPage(sequelize, job.id, level.id, filters, page);
      const { rows, nextCursor } = finishPage(items, page, (u) => u.tag);
      const counts = await walkUnitCounts(sequelize, job.id, level.id, filters);
      const coverage = await levelCoverage(sequelize, job.id, level.id);
      const body: WalkUnitsResponse = {
        items: rows,
        nextCursor,
        counts: {
          total: counts.total,
          checked: counts.checked,
          notChecked: counts.notChecked,
          inProgress: counts.inProgress,
          withOpenFindings: counts.withOpenFindings,
        },
        coverage,
      };
      res.json(body);
    },
  );

  return router;
}
