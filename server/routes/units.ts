/**
 * Units: indoor units known by their tag (unique within the job).
 * GET    /jobs/:jobId/units?levelId&spaceId&systemId&kind&q&limit&cursor   all roles
 * GET    /jobs/:jobId/units.csv?levelId&spaceId&systemId&kind&q            all roles; the register as CSV
 * POST   /jobs/:jobId/units                                                 GC manager (Idempotency-Key)
 * POST   /jobs/:jobId/units/import                                          GC manager; CSV (text/csv or JSON {csv, mapping, dryRun})
 * GET    /jobs/:jobId/units/:unitId                                         all roles
 * PATCH  /jobs/:jobId/units/:unitId                                         GC manager (If-Match); also pinX/pinY (plan pin)
 * DELETE /jobs/:jobId/units/:unitId                                         GC manager (If-Match)
 */
import express, { Router } from 'express';
import { Op, UniqueConstraintError, type Transaction } from 'sequelize';
import {
  createUnitSchema,
  unitImportQuerySchema,
  unitImportSchema,
  unitListQuerySchema,
  unitParamsSchema,
  updateUnitSchema,
  type CreateUnitInput,
  type UnitImportInput,
  type UpdateUnitInput,
} from '../../shared/schemas/setup';
import type { UnitKindKey } from '../../shared/words';
import { badRequest, notFound } from '../errors';
import { valid, validate, zodFieldErrors } from '../middleware/validate';
import { Unit } from '../models';
import { policy } from '../policies';
import { presentUnit } from '../presenters/setup';
import { idempotentWrite } from '../services/idempotency';
import { afterCursor, finishPage, pageRequest } from '../services/paging';
import { optionalQuantity } from '../services/quantities';
import { destroyOrConflict, inTransaction, likeContains, lockForChange } from '../services/records';
import { decodeCsv, importUnits } from '../services/unitImport';
import { csvFileName, exportLimiter } from '../services/csvSafe';
import { exportUnits } from '../services/unitExport';
import { checkUnitRefs, duplicateTag, tagTaken, UNIT_INCLUDES, UNIT_LIST_INCLUDES } from '../services/units';
import { setEtag } from '../services/versioning';

const IMPORT_BODY_LIMIT = '3mb';

/**
 * Body parsers for the import route, mounted in app.ts BEFORE the API-wide JSON parser (100 kB):
 * a schedule of 5,000 rows is larger than that. text/csv arrives as bytes (decoded strictly as UTF-8).
 */
export function unitImportBodyParsers(): Router {
  const router = Router();
  // router.use (not .post): middleware, not a route; the route itself declares its policy below.
  router.use(
    '/jobs/:jobId/units/import',
    express.json({ limit: IMPORT_BODY_LIMIT, strict: true }),
    express.raw({ type: 'text/csv', limit: IMPORT_BODY_LIMIT }),
  );
  return router;
}

async function loadUnit(jobId: string, unitId: string, transaction?: Transaction): Promise<Unit> {
  const unit = await Unit.findOne({ where: { id: unitId, jobId }, include: UNIT_INCLUDES, transaction });
  if (!unit) throw notFound('Unit not found.');
  return unit;
}

interface UnitListFilters {
  levelId?: string;
  spaceId?: string;
  systemId?: string;
  kind?: UnitKindKey;
  q?: string;
}

/** The register's filters as a where: one for the list and for units.csv. */
function unitWhere(jobId: string, query: UnitListFilters) {
  return {
    jobId,
    ...(query.levelId ? { levelId: query.levelId } : {}),
    ...(query.spaceId ? { spaceId: query.spaceId } : {}),
    ...(query.systemId ? { systemId: query.systemId } : {}),
    ...(query.kind ? { kind: query.kind } : {}),
    ...(query.q ? { tag: { [Op.iLike]: likeContains(query.q) } } : {}),
  };
}

export function unitsRouter(): Router {
  const router = Router();

  router.get('/jobs/:jobId/units', policy.jobMember(), validate({ query: unitListQuerySchema }), async (req, res) => {
    const query = valid<UnitListFilters & { limit?: number; cursor?: string }>(req.valid.query);
    const page = pageRequest(req, { sort: 'tag', value: 'text' });
    const rows = await Unit.findAll({
      where: {
        ...unitWhere(req.membership!.job.id, query),
        ...afterCursor('tag', page),
      },
      include: UNIT_LIST_INCLUDES,
      order: [['tag', 'ASC'], ['id', 'ASC']],
      limit: page.limit + 1,
      raw: true,
      nest: true,
    });
    const { rows: units, nextCursor } = finishPage(rows, page, (u) => u.tag);
    res.json({ items: units.map(presentUnit), nextCursor });
  });

  // The register's filters apply (limit and cursor are ignored: the export holds every matching unit).
  router.get('/jobs/:jobId/units.csv', policy.jobMember(), exportLimiter(), validate({ query: unitListQuerySchema }), async (req, res) => {
    const job = req.membership!.job;
    const query = valid<UnitListFilters>(req.valid.query);
    const units = await Unit.findAll({ where: unitWhere(job.id, query), include: UNIT_INCLUDES, order: [['tag', 'ASC'], ['id', 'ASC']] });
    await exportUnits(res, units, job.unitSystem, csvFileName('units', job.number));
  });

  router.post('/jobs/:jobId/units', policy.jobMember(['gc_manager']), validate({ body: createUnitSchema }), async (req, res) => {
    const body = valid<CreateUnitInput>(req.valid.body);
    const jobId = req.membership!.job.id;
    const capacity = optionalQuantity(body.capacity, 'capacity', 'capacity') ?? null;
    try {
      await idempotentWrite(req, res, async (transaction) => {
        const refs = {
          kind: body.kind,
          levelId: body.levelId,
          spaceId: body.spaceId ?? null,
          systemId: body.systemId ?? null,
          modelId: body.modelId ?? null,
        };
        await checkUnitRefs(jobId, refs, transaction);
        if (await tagTaken(jobId, body.tag, null, transaction)) throw duplicateTag(body.tag);
        const created = await Unit.create({ jobId, tag: body.tag, capacity, ...refs }, { transaction });
        const unit = await loadUnit(jobId, created.id, transaction);
        setEtag(res, unit.version);
        return { status: 201, body: presentUnit(unit) };
      });
    } catch (err) {
      if (err instanceof UniqueConstraintError) throw duplicateTag(body.tag);
      throw err;
    }
  });

  router.post('/jobs/:jobId/units/import', policy.jobMember(['gc_manager']), async (req, res) => {
    let text: string;
    let mapping: UnitImportInput['mapping'];
    let dryRun: boolean;
    if (Buffer.isBuffer(req.body)) {
      const query = unitImportQuerySchema.safeParse(req.query);
      if (!query.success) {
        const fields = zodFieldErrors(query.error, 'query');
        const first = Object.entries(fields)[0]!;
        throw badRequest(`${first[0]}: ${first[1]}`, fields);
      }
      text = decodeCsv(req.body);
      mapping = undefined;
      dryRun = query.data.dryRun ?? false;
    } else {
      const parsed = unitImportSchema.safeParse(req.body ?? {});
      if (!parsed.success) {
        const fields = zodFieldErrors(parsed.error);
        const first = Object.entries(fields)[0]!;
        throw badRequest(`${first[0]}: ${first[1]}`, fields);
      }
      text = parsed.data.csv;
      mapping = parsed.data.mapping;
      dryRun = parsed.data.dryRun ?? false;
    }
    const jobId = req.membership!.job.id;
    try {
      await idempotentWrite(req, res, async (transaction) => {
        const report = await importUnits(jobId, { text, mapping, dryRun }, transaction);
        return { status: report.committed ? 201 : 200, body: report };
      });
    } catch (err) {
      // Another import or a unit added meanwhile took one of the tags: nothing was imported.
      if (err instanceof UniqueConstraintError) {
        throw badRequest('A tag in the file was taken while importing; nothing was imported. Run the import again to see which.', {
          csv: 'Tag taken meanwhile.',
        });
      }
      throw err;
    }
  });

  router.get('/jobs/:jobId/units/:unitId', policy.jobMember(), validate({ params: unitParamsSchema }), async (req, res) => {
    const { unitId } = valid<{ unitId: string }>(req.valid.params);
    const unit = await loadUnit(req.membership!.job.id, unitId);
    setEtag(res, unit.version);
    res.json(presentUnit(unit));
  });

  router.patch(
    '/jobs/:jobId/units/:unitId',
    policy.jobMember(['gc_manager']),
    validate({ params: unitParamsSchema, body: updateUnitSchema }),
    async (req, res) => {
      const { unitId } = valid<{ unitId: string }>(req.valid.params);
      const body = valid<UpdateUnitInput>(req.valid.body);
      const jobId = req.membership!.job.id;
      const capacity = optionalQuantity(body.capacity, 'capacity', 'capacity');
      try {
        const unit = await inTransaction(req, async (transaction) => {
          const present = async (u: Unit) => presentUnit(await loadUnit(jobId, u.id, transaction));
          const unit = await lockForChange(req, Unit, { id: unitId, jobId }, transaction, 'Unit not found.', present);
          if (body.tag !== undefined && body.tag !== unit.tag) {
            if (await tagTaken(jobId, body.tag, unit.id, transaction)) throw duplicateTag(body.tag);
            unit.tag = body.tag;
          }
          if (body.kind !== undefined) unit.kind = body.kind;
          if (body.levelId !== undefined && body.levelId !== unit.levelId) {
            unit.levelId = body.levelId;
            // The pin was on the old level's plan: it means nothing on another level's.
            unit.pinX = null;
            unit.pinY = null;
          }
          if (body.pinX !== undefined && body.pinY !== undefined) {
            unit.pinX = body.pinX;
            unit.pinY = body.pinY;
          }
          if (body.spaceId !== undefined) unit.spaceId = body.spaceId;
          if (body.systemId !== undefined) unit.systemId = body.systemId;
          if (body.modelId !== undefined) unit.modelId = body.modelId;
          if (capacity !== undefined) unit.capacity = capacity;
          await checkUnitRefs(
            jobId,
            { kind: unit.kind, levelId: unit.levelId, spaceId: unit.spaceId, systemId: unit.systemId, modelId: unit.modelId },
            transaction,
          );
          unit.version += 1;
          await unit.save({ transaction });
          return loadUnit(jobId, unit.id, transaction);
        });
        setEtag(res, unit.version);
        res.json(presentUnit(unit));
      } catch (err) {
        if (err instanceof UniqueConstraintError && body.tag) throw duplicateTag(body.tag);
        throw err;
      }
    },
  );

  router.delete(
    '/jobs/:jobId/units/:unitId',
    policy.jobMember(['gc_manager']),
    validate({ params: unitParamsSchema }),
    async (req, res) => {
      const { unitId } = valid<{ unitId: string }>(req.valid.params);
      const jobId = req.membership!.job.id;
      await inTransaction(req, async (transaction) => {
        const unit = await lockForChange(req, Unit, { id: unitId, jobId }, transaction, 'Unit not found.', async (u) =>
          presentUnit(await loadUnit(jobId, u.id, transaction)),
        );
        await destroyOrConflict(unit, transaction, `Unit ${unit.tag}`);
      });
      res.status(204).end();
    },
  );

  return router;
}
