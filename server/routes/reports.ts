/**
 * PDF reports (docs/api-reports.md). GET only for the documents, so a plain link downloads them with
 * the session cookie; every read takes req.scope, so a subcontractor's report holds their own
 * company's findings only, and a level, system, company, walk or unit of another job is a 404.
 *   GET  /jobs/:jobId/reports/close-out.pdf?levelId&systemId&companyId   every role; small scopes only (409 report_too_large)
 *   GET  /jobs/:jobId/reports/crew-list.pdf?companyId&(levelId|walkId)   every role (a subcontractor: own company)
 *   GET  /jobs/:jobId/units/:unitId/sheet.pdf                            every role
 *   POST /jobs/:jobId/reports                                            every role → 202, built by the worker
 *   GET  /jobs/:jobId/reports/:reportId                                  the asker only (404 for anyone else)
 *   GET  /jobs/:jobId/reports/:reportId/report.pdf                       the asker only, once built, for 7 days
 */
import { Router, type Request, type Response } from 'express';
import rateLimit from 'express-rate-limit';
import {
  closeOutQuerySchema,
  createReportSchema,
  crewListQuerySchema,
  noReportQuerySchema,
  REPORT_DIRECT_MAX,
  reportParamsSchema,
  type CloseOutQuery,
  type CreateReportBody,
  type CrewListQuery,
} from '../../shared/schemas/reports';
import { jobParamsSchema, unitParamsSchema } from '../../shared/schemas/setup';
import { badRequest, conflict, notFound, tooManyRequests } from '../errors';
import { valid, validate } from '../middleware/validate';
import { policy } from '../policies';
import { CLOSE_OUT_STATUSES, writeCloseOut, type ReportAuthor } from '../reports/closeOut';
import { writeCrewList } from '../reports/crewList';
import { reportSize, resolveScope } from '../reports/data';
import type { ReportQueue } from '../reports/queue';
import { insertRun, loadOwnRun, markNotQueued, presentRun, runLabel } from '../reports/runs';
import { loadUnit, writeUnitSheet } from '../reports/unitSheet';
import { idempotentWrite } from '../services/idempotency';
import { sequelizeOf } from '../services/records';
import type { ObjectStore } from '../storage';

export interface ReportsRouterOptions {
  store: ObjectStore;
  queue: ReportQueue;
  log?: (message: string, err?: unknown) => void;
}

/** A report reads every photo it prints: a few a minute per person is plenty. */
export const REPORTS_PER_MINUTE = 20;

function reportLimiter() {
  return rateLimit({
    windowMs: 60_000,
    limit: REPORTS_PER_MINUTE,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => `report:${req.user?.id ?? 'anonymous'}`,
    handler: (_req, _res, next, options) =>
      next(tooManyRequests('Too many reports in a minute. Wait a moment and try again.', Math.ceil(options.windowMs / 1000))),
  });
}

/** A server-made file name: `close-out-<job>-<day>.pdf`, letters, digits and dashes only. */
export function pdfFileName(prefix: string, name: string | null | undefined, day = new Date().toISOString().slice(0, 10)): string {
  const safe = (name ?? '')
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .replace(/[^A-Za-z0-9-]+/g, '_')
    .replace(/^_+|_+$/g, '')
    .slice(0, 60);
  return `${prefix}-${safe || 'job'}-${day}.pdf`;
}

function authorOf(req: Request): ReportAuthor {
  return { name: req.user!.name, role: req.membership!.role };
}

/**
 * Sends a PDF written by `write`. Anything refused is refused before the first byte (404, 409 as
 * JSON); a failure once bytes are out can only cut the download, which the browser reports.
 */
async function sendPdf(res: Response, fileName: string, log: (m: string, e?: unknown) => void, write: (out: Response) => Promise<unknown>) {
  res.status(200);
  res.set('Content-Type', 'application/pdf');
  res.set('Content-Disposition', `attachment; filename="${fileName}"`);
  res.set('X-Content-Type-Options', 'nosniff');
  try {
    await write(res);
  } catch (err) {
    if (!res.headersSent) throw err;
    log(`${fileName} stopped while it was sent`, err);
    res.destroy(err instanceof Error ? err : undefined);
  }
}

export function reportsRouter(options: ReportsRouterOptions): Router {
  const router = Router();
  const log = options.log ?? ((m: string, e?: unknown) => console.error(m, e));

  router.get(
    '/jobs/:jobId/reports/close-out.pdf',
    policy.jobMember(),
    reportLimiter(),
    validate({ params: jobParamsSchema, query: closeOutQuerySchema }),
    async (req, res) => {
      const q = valid<CloseOutQuery>(req.valid.query);
      const sequelize = sequelizeOf(req);
      const scope = req.scope!;
      const place = await resolveScope(sequelize, scope, q);
      const size = await reportSize(sequelize, scope, place, CLOSE_OUT_STATUSES);
      if (size.findings > REPORT_DIRECT_MAX.findings || size.photos > REPORT_DIRECT_MAX.photos) {
        throw conflict(
          `This report holds ${size.findings} findings and ${size.photos} photos: ask for it to be built in the background (POST /reports) and get a link when it is ready.`,
          'report_too_large',
        );
      }
      await sendPdf(res, pdfFileName('close-out', req.membership!.job.name), log, (out) =>
        writeCloseOut(out, { sequelize, store: options.store, scope, place, author: authorOf(req), now: new Date() }),
      );
    },
  );

  router.get(
    '/jobs/:jobId/reports/crew-list.pdf',
    policy.jobMember(),
    reportLimiter(),
    validate({ params: jobParamsSchema, query: crewListQuerySchema }),
    async (req, res) => {
      const q = valid<CrewListQuery>(req.valid.query);
      const scope = req.scope!;
      // A subcontractor's list is their own company's; anyone else names the company.
      const companyId = q.companyId ?? scope.companyId ?? undefined;
      if (!companyId) throw badRequest('query.companyId: Choose the company whose crew gets the list.', { 'query.companyId': 'Choose the company whose crew gets the list.' });
      const sequelize = sequelizeOf(req);
      const place = await resolveScope(sequelize, scope, { ...q, companyId });
      await sendPdf(res, pdfFileName('crew-list', `${place.companyName ?? ''}-${place.walk?.levelName ?? place.levelName ?? ''}`), log, (out) =>
        writeCrewList(out, {
          sequelize,
          store: options.store,
          scope,
          place: { ...place, companyId, companyName: place.companyName ?? '' },
          author: authorOf(req),
          now: new Date(),
        }),
      );
    },
  );

  router.get(
    '/jobs/:jobId/units/:unitId/sheet.pdf',
    policy.jobMember(),
    reportLimiter(),
    validate({ params: unitParamsSchema, query: noReportQuerySchema }),
    async (req, res) => {
      const { unitId } = valid<{ unitId: string }>(req.valid.params);
      const sequelize = sequelizeOf(req);
      const unit = await loadUnit(sequelize, req.scope!.jobId, unitId);
      await sendPdf(res, pdfFileName('unit', unit.tag), log, (out) =>
        writeUnitSheet(out, { sequelize, store: options.store, scope: req.scope!, unitId, unit, author: authorOf(req), now: new Date() }),
      );
    },
  );

  router.post(
    '/jobs/:jobId/reports',
    policy.jobMember(),
    reportLimiter(),
    validate({ params: jobParamsSchema, body: createReportSchema }),
    async (req, res) => {
      const body = valid<CreateReportBody>(req.valid.body);
      const sequelize = sequelizeOf(req);
      const scope = req.scope!;
      const place = await resolveScope(sequelize, scope, body);
      const size = await reportSize(sequelize, scope, place, CLOSE_OUT_STATUSES);
      await idempotentWrite(req, res, async (transaction) => {
        const row = await insertRun(sequelize, transaction, {
          jobId: scope.jobId,
          userId: req.user!.id,
          kind: body.kind,
          place,
          viewerCompanyId: scope.companyId,
          findings: size.findings,
          photos: size.photos,
        });
        // Queued once the row is there for the worker to find; a queue that cannot be reached fails the run, not the request.
        transaction.afterCommit(() => {
          options.queue.send(row.id).catch(async (err: unknown) => {
            log(`report ${row.id} could not be queued`, err);
            await markNotQueued(sequelize, row.id).catch(() => undefined);
          });
        });
        return { status: 202, body: presentRun(row, await runLabel(sequelize, scope, row)) };
      });
    },
  );

  router.get(
    '/jobs/:jobId/reports/:reportId',
    policy.jobMember(),
    validate({ params: reportParamsSchema, query: noReportQuerySchema }),
    async (req, res) => {
      const { reportId } = valid<{ reportId: string }>(req.valid.params);
      const sequelize = sequelizeOf(req);
      const row = await loadOwnRun(sequelize, req.scope!.jobId, req.user!.id, reportId);
      if (!row) throw notFound('That report is not here: it may be another person’s, or the link is not complete.');
      res.json(presentRun(row, await runLabel(sequelize, req.scope!, row)));
    },
  );

  router.get(
    '/jobs/:jobId/reports/:reportId/report.pdf',
    policy.jobMember(),
    reportLimiter(),
    validate({ params: reportParamsSchema, query: noReportQuerySchema }),
    async (req, res) => {
      const { reportId } = valid<{ reportId: string }>(req.valid.params);
      const sequelize = sequelizeOf(req);
      const row = await loadOwnRun(sequelize, req.scope!.jobId, req.user!.id, reportId);
      if (!row) throw notFound('That report is not here: it may be another person’s, or the link is not complete.');
      const dto = presentRun(row, '');
      if (row.status !== 'done') throw conflict('The report is not built yet.', 'report_not_ready');
      if (!dto.download || !row.storage_key) throw notFound(`The report was kept for its 7 days and is gone: ask for it again.`);
      const obj = await options.store.get(row.storage_key);
      if (!obj) throw notFound('The report file is gone: ask for it again.');
      res.status(200);
      res.set('Content-Type', 'application/pdf');
      res.set('Content-Length', String(obj.length));
      res.set('Content-Disposition', `attachment; filename="${pdfFileName('close-out', req.membership!.job.name, new Date(row.created_at).toISOString().slice(0, 10))}"`);
      res.set('X-Content-Type-Options', 'nosniff');
      obj.body.on('error', (err) => {
        log(`report ${row.id} stopped while it was sent`, err);
        res.destroy(err);
      });
      obj.body.pipe(res);
    },
  );

  return router;
}
