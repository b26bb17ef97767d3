/**
 * The background queue of large reports, on pg-boss in the same database as the digests (schema
 * "pgboss", queue "report-build"). The API only sends (`send`, after the run's row committed);
 * the worker (`startWorker`, server/index.ts, or a test) builds. pg-boss is started on first use,
 * so an app that never builds a large report opens no connection for it.
 *
 * Every hour the worker also removes built files past their keeping time (runs.ts).
 */
import PgBoss from 'pg-boss';
import { buildRun, sweepExpiredReports, type BuildDeps } from './runs';

export const REPORT_QUEUE = 'report-build';

export interface ReportQueue {
  send(runId: string): Promise<void>;
  /** Starts building queued runs in this process. */
  startWorker(deps: BuildDeps, options?: { pollingIntervalSeconds?: number }): Promise<void>;
  stop(): Promise<void>;
}

export function createReportQueue(options: { connectionString: string; log: (message: string, err?: unknown) => void }): ReportQueue {
  let boss: PgBoss | undefined;
  let starting: Promise<PgBoss> | undefined;
  let sweepTimer: NodeJS.Timeout | undefined;

  function started(): Promise<PgBoss> {
    starting ??= (async () => {
      const b = new PgBoss({ connectionString: options.connectionString, schema: 'pgboss', max: 3, application_name: 'trimout-reports' });
      b.on('error', (err) => options.log('pg-boss error (reports)', err));
      await b.start();
      // One report at a time per worker; an hour is far longer than any report should take.
      await b.createQueue(REPORT_QUEUE, { name: REPORT_QUEUE, policy: 'standard', retryLimit: 1, retryDelay: 30, expireInMinutes: 60 });
      boss = b;
      return b;
    })();
    return starting;
  }

  return {
    async send(runId) {
      const b = await started();
      await b.send(REPORT_QUEUE, { runId });
    },
    async startWorker(deps, workOptions = {}) {
      const b = await started();
      await b.work<{ runId: string }>(REPORT_QUEUE, { pollingIntervalSeconds: workOptions.pollingIntervalSeconds ?? 2, batchSize: 1 }, async (jobs) => {
        for (const job of jobs) await buildRun(deps, job.data.runId);
      });
      const sweep = () => {
        void sweepExpiredReports(deps.sequelize, deps.store)
          .then((n) => n > 0 && deps.log(`removed ${n} report file(s) past their keeping time`))
          .catch((err: unknown) => deps.log('removing old report files failed', err));
      };
      sweep();
      sweepTimer = setInterval(sweep, 60 * 60 * 1000);
      sweepTimer.unref();
    },
    async stop() {
      if (sweepTimer) clearInterval(sweepTimer);
      if (starting) await starting.catch(() => undefined);
      await boss?.stop({ graceful: true, wait: true, timeout: 10_000 });
      boss = undefined;
      starting = undefined;
    },
  };
}
