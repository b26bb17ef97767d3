/**
 * Units: indoor units known by their tag (unique within the job).
 * GET    /jobs/:jobId/units?levelId&spaceId&systemId&kind&q&limit&cursor   all roles
 * GET    /jobs/:jobId/units.csv?levelId&spaceId&systemId&kind&q            all roles; the register as CSV
 * POST   /jobs/:jobId/units                                                 GC manager (Idempotency-Key)
 * POST   /jobs/:jobId/units/import                                          GC manager; CSV (text/csv or JSON {csv, mapping, dryRun,
 *                                                                           kindValues, createPlaces, removeMissing, fileName})
 * GET    /jobs/:jobId/units/imports                                         GC manager; the last 20 imports, each with whether it can be undone
 * POST   /jobs/:jobId/units/imports/:importId/undo                          GC manager; 409 while a unit has a check or finding
 * POST   /jobs/:jobId/units/delete { unitIds }                              GC manager; all or none, same rule
 * GET    /jobs/:jobId/units/:unitId                                         all roles
 * PATCH  /jobs/:jobId/units/:unitId                                         GC manager (If-Match); also pinX/pinY (plan pin)
 * DELETE /jobs/:jobId/units/:unitId                                         GC manager (If-Match)
 * PUT    /jobs/:jobId/units/:unitId/ceiling-exclusion { reason }           GC manager (If-Match); excluded from the ceiling rule
 * DELETE /jobs/:jobId/units/:unitId/ceiling-exclusion                      GC manager (If-Match); counted again
 * Reads and writes: server/services/units.ts; the import: services/unitImport.ts.
 */
import express, { Router } from 'express';
import type { z } from 'zod';
import {
  bulkDeleteUnitsSchema,
  ceilingExclusionSchema,
  createUnitSchema,
  unitImportParamsSchema,
  undoImportSchema,
  unitListQuerySchema,
  unitParamsSchema,
  updateUnitSchema,
} from '../../shared/schemas/setup';
import { excludeFromCeilingRule, liftCeilingExclusion, type CeilingExclusionContext } from '../commands/ceilingExclusion';
import { valid, validate } from '../middleware/validate';
import { policy } from '../policies';
import { presentUnit } from '../presenters/unit';
import { csvFileName, exportLimiter } from '../services/csvSafe';
import { idempotentWrite } from '../services/idempotency';
import { pageRequest } from '../services/paging';
import { inTransaction, setupWrite } from '../services/records';
import { exportUnits } from '../services/unitExport';
import { importRequestOf, importUnitsOrRefuse } from '../services/unitImport';
import { listImports, undoImport } from '../services/unitImportRecords';
import { changeUnit, createUnit, deleteUnit, deleteUnits, listUnits, loadUnit, unitsForExport } from '../services/units';
import { setEtag } from '../services/versioning';

/** The context of the ceiling-exclusion commands from a GC manager's request. */
function exclusionContext(req: express.Request, transaction: CeilingExclusionContext['transaction']): CeilingExclusionContext {
  return { ...setupWrite(req, transaction), actor: { id: req.user!.id, name: req.user!.name }, clock: () => new Date() };
}

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

export function unitsRouter(): Router {
  const router = Router();

  router.get('/jobs/:jobId/units', policy.jobMember(), validate({ query: unitListQuerySchema }), async (req, res) => {
    const query = valid<z.infer<typeof unitListQuerySchema>>(req.valid.query);
    const page = pageRequest(req, { sort: 'tag', value: 'text' });
    res.json(await listUnits(req.membership!.job.id, query, page));
  });

  // The register's filters apply (limit and cursor are ignored: the export holds every matching unit).
  router.get('/jobs/:jobId/units.csv', policy.jobMember(), exportLimiter(), validate({ query: unitListQuerySchema }), async (req, res) => {
    const job = req.membership!.job;
    const query = valid<z.infer<typeof unitListQuerySchema>>(req.valid.query);
    await exportUnits(res, await unitsForExport(job.id, query), job.unitSystem, csvFileName('units', job.number));
  });

  router.post('/jobs/:jobId/units', policy.jobMember(['gc_manager']), validate({ body: createUnitSchema }), async (req, res) => {
    const body = valid<z.infer<typeof createUnitSchema>>(req.valid.body);
    await idempotentWrite(req, res, async (transaction) => {
      const unit = await createUnit(setupWrite(req, transaction), body);
      setEtag(res, unit.version);
      return { status: 201, body: presentUnit(unit) };
    });
  });

  // Two body forms (text/csv or JSON), so the shared schemas are applied by importRequestOf, not validate().
  router.post('/jobs/:jobId/units/import', policy.jobMember(['gc_manager']), async (req, res) => {
    const options = importRequestOf(req.body, req.query);
    await idempotentWrite(req, res, async (transaction) => {
      const report = await importUnitsOrRefuse({ jobId: req.membership!.job.id, actorId: req.user!.id, transaction }, options);
      return { status: report.committed ? 201 : 200, body: report };
    });
  });

  router.get('/jobs/:jobId/units/imports', policy.jobMember(['gc_manager']), async (req, res) => {
    res.json({ items: await listImports(req.membership!.job.id) });
  });

  router.post('/jobs/:jobId/units/imports/:importId/undo', policy.jobMember(['gc_manager']), validate({ params: unitImportParamsSchema, body: undoImportSchema }), async (req, res) => {
    const { importId } = valid<z.infer<typeof unitImportParamsSchema>>(req.valid.params);
    await idempotentWrite(req, res, async (transaction) => ({
      status: 200,
      body: await undoImport({ jobId: req.membership!.job.id, actorId: req.user!.id, transaction }, importId),
    }));
  });

  // All or none; a unit with a check or a finding refuses the delete (409 units_in_use).
  router.post('/jobs/:jobId/units/delete', policy.jobMember(['gc_manager']), validate({ body: bulkDeleteUnitsSchema }), async (req, res) => {
    const { unitIds } = valid<z.infer<typeof bulkDeleteUnitsSchema>>(req.valid.body);
    await idempotentWrite(req, res, async (transaction) => ({ status: 200, body: await deleteUnits(setupWrite(req, transaction), unitIds) }));
  });

  router.get('/jobs/:jobId/units/:unitId', policy.jobMember(), validate({ params: unitParamsSchema }), async (req, res) => {
    const { unitId } = valid<z.infer<typeof unitParamsSchema>>(req.valid.params);
    const unit = await loadUnit(req.membership!.job.id, unitId);
    setEtag(res, unit.version);
    res.json(presentUnit(unit));
  });

  router.patch(
    '/jobs/:jobId/units/:unitId',
    policy.jobMember(['gc_manager']),
    validate({ params: unitParamsSchema, body: updateUnitSchema }),
    async (req, res) => {
      const { unitId } = valid<z.infer<typeof unitParamsSchema>>(req.valid.params);
      const body = valid<z.infer<typeof updateUnitSchema>>(req.valid.body);
      const unit = await inTransaction(req, (transaction) => changeUnit(setupWrite(req, transaction), unitId, body, req.user!.id));
      setEtag(res, unit.version);
      res.json(presentUnit(unit));
    },
  );

  router.delete('/jobs/:jobId/units/:unitId', policy.jobMember(['gc_manager']), validate({ params: unitParamsSchema }), async (req, res) => {
    const { unitId } = valid<z.infer<typeof unitParamsSchema>>(req.valid.params);
    await inTransaction(req, (transaction) => deleteUnit(setupWrite(req, transaction), unitId));
    res.status(204).end();
  });

  router.put(
    '/jobs/:jobId/units/:unitId/ceiling-exclusion',
    policy.jobMember(['gc_manager']),
    validate({ params: unitParamsSchema, body: ceilingExclusionSchema }),
    async (req, res) => {
      const { unitId } = valid<z.infer<typeof unitParamsSchema>>(req.valid.params);
      const { reason } = valid<z.infer<typeof ceilingExclusionSchema>>(req.valid.body);
      const result = await inTransaction(req, (transaction) => excludeFromCeilingRule(exclusionContext(req, transaction), unitId, reason));
      setEtag(res, result.version);
      res.json(result);
    },
  );

  router.delete('/jobs/:jobId/units/:unitId/ceiling-exclusion', policy.jobMember(['gc_manager']), validate({ params: unitParamsSchema }), async (req, res) => {
    const { unitId } = valid<z.infer<typeof unitParamsSchema>>(req.valid.params);
    const result = await inTransaction(req, (transaction) => liftCeilingExclusion(exclusionContext(req, transaction), unitId));
    setEtag(res, result.version);
    res.json(result);
  });

  return router;
}
