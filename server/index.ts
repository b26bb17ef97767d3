/** The only file that listens. */
import { createApp } from './app';
import { connect } from './db';
import { loadEnv } from './env';
import { createMailService } from './mail';
import { startFakeSmtp, type FakeSmtp } from './mail/fakeSmtp';
import type { DigestService } from './digests/service';
import { startDigestScheduler, type DigestScheduler } from './digests/scheduler';
import { pruneIdempotencyKeys } from './services/idempotency';
import { pruneRateLimitHits } from './services/rateLimitStore';
import { reapOrphanUploads, REAP_INTERVAL_MINUTES } from './services/pendingUploads';
import { createObjectStore } from './storage';
import { sweepUploadFolders } from './middleware/upload';
import { createReportQueue } from './reports/queue';

export async function startServer(envSource: NodeJS.ProcessEnv = process.env) {
  const env = loadEnv(envSource);
  // Without SMTP_URL (development only: production refuses to start), mail goes to a fake
  // SMTP server in this process, on 127.0.0.1:MAIL_PORT, readable at /mailbox.
  let fake: FakeSmtp | undefined;
  if (!env.SMTP_URL && env.NODE_ENV !== 'production') fake = await startFakeSmtp({ port: env.MAIL_PORT });
  const log = (m: string, e?: unknown) => console.error(m, e);
  const mail = createMailService({ env, fake, log });
  const db = connect(env.DATABASE_URL);
  const objectStore = createObjectStore(env);
  // Large reports are built by a pg-boss worker in this process (server/reports/queue.ts).
  const reportQueue = createReportQueue({ connectionString: env.DATABASE_URL, log });
  const { app, close } = createApp({ env, db, mail, log, objectStore, reportQueue });
  await reportQueue
    .startWorker({ sequelize: db.sequelize, store: objectStore, mail, log })
    .catch((err: unknown) => log('report worker did not start (large reports will wait)', err));
  // Digests: pg-boss keeps its state in PostgreSQL (schema pgboss); an hourly job sends what is due.
  let scheduler: DigestScheduler | undefined;
  if (env.DIGEST_SCHEDULER) {
    scheduler = await startDigestScheduler({ connectionString: env.DATABASE_URL, digests: app.get('digests') as DigestService, log }).catch(
      (err: unknown) => {
        log('digest scheduler did not start (digests will not be sent on schedule)', err);
        return undefined;
      },
    );
  }
  // Housekeeping: idempotency keys are kept IDEMPOTENCY_RETENTION_DAYS (7), pruned at start and every 6 h.
  const prune = () => {
    void pruneIdempotencyKeys(db.sequelize).catch((err: unknown) => log('pruning idempotency keys failed', err));
    void pruneRateLimitHits(db.sequelize).catch((err: unknown) => log('pruning rate-limit counts failed', err));
  };
  prune();
  const pruneTimer = setInterval(prune, 6 * 60 * 60 * 1000);
  pruneTimer.unref();
  // Uploads stored by a write that never committed (a crash, a kill): reaped at start and every
  // REAP_INTERVAL_MINUTES once their pending row is old enough (server/services/pendingUploads.ts).
  // Temporary folders of requests the process died in are swept with them.
  const reap = () => {
    void reapOrphanUploads(db.sequelize, objectStore)
      .then((r) => r.deleted > 0 && log(`removed ${r.deleted} orphaned upload(s) of writes that never committed`))
      .catch((err: unknown) => log('reaping orphaned uploads failed', err));
    void sweepUploadFolders().catch((err: unknown) => log('sweeping temporary upload folders failed', err));
  };
  reap();
  const reapTimer = setInterval(reap, REAP_INTERVAL_MINUTES * 60 * 1000);
  reapTimer.unref();
  const server = await new Promise<import('node:http').Server>((resolve, reject) => {
    const s = app.listen(env.PORT, env.HOST, () => resolve(s));
    s.on('error', reject);
  });
  const address = server.address();
  const port = typeof address === 'object' && address ? address.port : env.PORT;
  return {
    url: `http://${env.HOST}:${port}`,
    /** Where caught mails are read, when the fake SMTP server is in use. */
    mailboxUrl: fake ? `http://${env.HOST}:${port}/mailbox` : undefined,
    async stop() {
      clearInterval(pruneTimer);
      clearInterval(reapTimer);
      const closed = new Promise<void>((resolve) => server.close(() => resolve()));
      server.closeIdleConnections();
      await closed;
      await scheduler?.stop();
      await reportQueue.stop();
      await mail.outbox.idle();
      await close();
      await db.close();
      await fake?.close();
    },
  };
}

if (require.main === module) {
  startServer()
    .then(({ url, stop }) => {
      console.log(`Trimout API listening on ${url}`);
      const shutdown = () => {
        stop().then(
          () => process.exit(0),
          () => process.exit(1),
        );
      };
      process.once('SIGINT', shutdown);
      process.once('SIGTERM', shutdown);
    })
    .catch((err: unknown) => {
      console.error(err instanceof Error ? err.message : err);
      process.exit(1);
    });
}
