/**
 * CSV exports (docs/api-exports.md). GET only: a plain link downloads them with the session cookie.
 * GET /jobs/:jobId/findings.csv?<the findings list's query>   every role; subcontractor: own company's rows
 * GET /jobs/:jobId/scorecards.csv                              GC manager, inspector
 * (GET /jobs/:jobId/units.csv lives with the units routes: server/routes/units.ts.)
 *
 * Each is rate limited per user (csvSafe.ts exportLimiter), answers `Cache-Control: no-store`,
 * a server-made file name, UTF-8 with a byte-order mark, and cells made safe by csvSafe.ts.
 */
import { Router } from 'express';
import { noExportQuerySchema } from '../../shared/schemas/exports';
import { findingListQuerySchema, type FindingListQueryParsed } from '../../shared/schemas/findings';
import { jobParamsSchema } from '../../shared/schemas/setup';
import { TRADES } from '../../shared/words';
import { valid, validate } from '../middleware/validate';
import { policy } from '../policies';
import { loadScorecards } from '../services/board';
import { findingsCsvQuery } from '../services/csvFindings';
import { csvFileName, exportLimiter } from '../services/csvSafe';
import { sendRecordsAsCsv, streamQueryAsCsv } from '../services/csvStream';
import { findingFiltersOf } from '../services/findingQueries';
import { sequelizeOf } from '../services/records';

export interface ExportsRouterOptions {
  /** Links in the files are built on this origin (env.publicOrigin), never on the request's Host header. */
  publicOrigin: string;
  log?: (message: string, err?: unknown) => void;
}

export function exportsRouter(options: ExportsRouterOptions): Router {
  const router = Router();
  const log = options.log ?? ((m: string, e?: unknown) => console.error(m, e));

  router.get(
    '/jobs/:jobId/findings.csv',
    policy.jobMember(),
    exportLimiter(),
    validate({ params: jobParamsSchema, query: findingListQuerySchema }),
    async (req, res) => {
      const q = valid<FindingListQueryParsed>(req.valid.query);
      const { job } = req.membership!;
      const query = findingsCsvQuery(
        { jobId: job.id, unitSystem: job.unitSystem, origin: options.publicOrigin },
        req.scope!,
        findingFiltersOf(q),
        q.sort ?? '-number',
        csvFileName('findings', job.name),
      );
      const outcome = await streamQueryAsCsv(sequelizeOf(req), res, query);
      if (outcome.error) log(`findings.csv for job ${job.id} stopped after ${outcome.rows} rows`, outcome.error);
    },
  );

  router.get(
    '/jobs/:jobId/scorecards.csv',
    policy.jobMember(['gc_manager', 'inspector']),
    exportLimiter(),
    validate({ params: jobParamsSchema, query: noExportQuerySchema }),
    async (req, res) => {
      const { job } = req.membership!;
      const { companies } = await loadScorecards(sequelizeOf(req), req.scope!);
      await sendRecordsAsCsv(res, csvFileName('scorecards', job.name), [
        [...SCORECARDS_CSV_HEADER],
        ...companies.map((c) => [
          c.name,
          (c.trades ?? (c.trade ? [c.trade] : [])).map((t) => TRADE_LABELS.get(t) ?? t).join(', '),
          c.open,
          c.overdue,
          c.fixesWaiting,
          c.accepted,
          c.acceptedFirstPass,
          // A fraction (0.75 = 75 %), four decimals; empty when nothing was accepted yet.
          c.firstPassRate === null ? null : Math.round(c.firstPassRate * 10_000) / 10_000,
          c.medianDaysToAccept,
          c.returns,
        ]),
      ]);
    },
  );

  return router;
}

const TRADE_LABELS = new Map<string, string>(TRADES.map((t) => [t.key, t.label]));

export const SCORECARDS_CSV_HEADER = [
  'Company',
  'Trades',
  'Open',
  'Overdue',
  'Fixes waiting',
  'Accepted',
  'Accepted first pass',
  'First-pass rate',
  'Median days to accept',
  'Returns',
] as const;
