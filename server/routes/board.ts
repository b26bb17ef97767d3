/**
 * The GC's view of a job. Definitions of every number: docs/api-board.md.
 * GET /jobs/:jobId/board         every role (subcontractor: their company's findings only)
 * GET /jobs/:jobId/board/systems every role: each system's levels, refrigerant verdict and records start-up waits for
 * GET /jobs/:jobId/readiness     every role (subcontractor: blockers from their company only); ?levelId&systemId
 * GET /jobs/:jobId/scorecards    GC manager, inspector
 * GET /jobs/:jobId/recurring     every role (subcontractor: their company's findings only)
 * GET /jobs/:jobId/trend         every role (subcontractor: their company's findings only); ?levelId&days
 */
import { Router, type Request, type Response } from 'express';
import { readinessQuerySchema, trendQuerySchema, type ReadinessQuery, type TrendQuery } from '../../shared/schemas/board';
import { jobParamsSchema } from '../../shared/schemas/setup';
import { notFound } from '../errors';
import { valid, validate } from '../middleware/validate';
import { policy } from '../policies';
import { loadBoard, loadFloorSystems, loadReadiness, loadRecurring, loadScorecards, loadTrend } from '../services/board';
import { sequelizeOf } from '../services/records';
import { writeJson } from '../services/statCache';

const SCORECARD_ROLES = ['gc_manager', 'inspector'] as const;

/**
 * res.json for figures that may come from the exact cache: their JSON and entity tag are written
 * once per cached value (statCache.ts writeJson), not on every request; the answer is the same
 * bytes, type and ETag (Express's own etag function, so If-None-Match still gives 304).
 */
function sendJson(req: Request, res: Response, value: unknown): void {
  const etagFn = req.app.get('etag fn') as ((body: Buffer, encoding?: string) => string) | undefined;
  const { body, etag } = writeJson(value, etagFn ? (b) => etagFn(b) : undefined);
  res.type('json');
  if (etag && !res.get('ETag')) res.set('ETag', etag);
  res.send(body);
}

export function boardRouter(): Router {
  const router = Router();

  router.get('/jobs/:jobId/board', policy.jobMember(), validate({ params: jobParamsSchema }), async (req, res) => {
    res.json(await loadBoard(sequelizeOf(req), req.scope!));
  });

  router.get('/jobs/:jobId/board/systems', policy.jobMember(), validate({ params: jobParamsSchema }), async (req, res) => {
    res.json(await loadFloorSystems(sequelizeOf(req), req.scope!));
  });

  router.get('/jobs/:jobId/readiness', policy.jobMember(), validate({ params: jobParamsSchema, query: readinessQuerySchema }), async (req, res) => {
    const query = valid<ReadinessQuery>(req.valid.query);
    const body = await loadReadiness(sequelizeOf(req), req.scope!, query);
    if (!body) throw notFound('Level or system not found on this job.');
    sendJson(req, res, body);
  });

  router.get('/jobs/:jobId/scorecards', policy.jobMember(SCORECARD_ROLES), validate({ params: jobParamsSchema }), async (req, res) => {
    res.json(await loadScorecards(sequelizeOf(req), req.scope!));
  });

  router.get('/jobs/:jobId/recurring', policy.jobMember(), validate({ params: jobParamsSchema }), async (req, res) => {
    sendJson(req, res, await loadRecurring(sequelizeOf(req), req.scope!));
  });

  router.get('/jobs/:jobId/trend', policy.jobMember(), validate({ params: jobParamsSchema, query: trendQuerySchema }), async (req, res) => {
    const query = valid<TrendQuery>(req.valid.query);
    const body = await loadTrend(sequelizeOf(req), req.scope!, query);
    if (!body) throw notFound('Level not found.');
    res.json(body);
  });

  return router;
}
