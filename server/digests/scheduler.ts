/**
 * Digest scheduling with pg-boss (state in PostgreSQL, schema "pgboss"). Started by
 * server/index.ts when DIGEST_SCHEDULER is on (the default for `npm start`); never by createApp,
 * so API tests run without it unless a test starts it.
 *
 * - queue "digest-hourly": a cron schedule "0 * * * *" (UTC; pg-boss keeps one schedule per name,
 *   so several servers share it) whose job lists the digests due now (server/digests/service.ts
 *   duePeriod: the user's local hour has come, in their time zone) and sends one "digest-send" job
 *   per user and period;
 * - queue "digest-send" (policy "short": at most one queued job per singletonKey
 *   "<user>:<period>"): claims the period in digest_sends and sends. The claim, not the queue,
 *   is what guarantees at most one digest per user and period across workers and restarts.
 */
import PgBoss from 'pg-boss';
import type { DigestService, DueDigest } from './service';

export const HOURLY_QUEUE = 'digest-hourly';
export const SEND_QUEUE = 'digest-send';
export const HOURLY_CRON = '0 * * * *';

export interface DigestScheduler {
  boss: PgBoss;
  /** Runs what the hourly job runs: enqueues one send per digest due now. */
  enqueueDue(now?: Date): Promise<number>;
  stop(): Promise<void>;
}

export interface SchedulerOptions {
  connectionString: string;
  digests: DigestService;
  log: (message: string, err?: unknown) => void;
  /** Create the cron schedule (default true); tests that only want the queues pass false. */
  schedule?: boolean;
  /** Seconds between polls of the send queue (pg-boss default 2). */
  pollingIntervalSeconds?: number;
}

export async function startDigestScheduler(options: SchedulerOptions): Promise<DigestScheduler> {
  const { digests, log } = options;
  const boss = new PgBoss({ connectionString: options.connectionString, schema: 'pgboss', max: 4, application_name: 'trimout-digests' });
  boss.on('error', (err) => log('pg-boss error', err));
  await boss.start();
  await boss.createQueue(HOURLY_QUEUE, { name: HOURLY_QUEUE, policy: 'singleton', retryLimit: 2, expireInMinutes: 30 });
  await boss.createQueue(SEND_QUEUE, { name: SEND_QUEUE, policy: 'short', retryLimit: 3, retryDelay: 60, retryBackoff: true, expireInMinutes: 15 });

  async function enqueueDue(now = new Date()): Promise<number> {
    const due = await digests.dueDigests(now);
    let queued = 0;
    for (const d of due) {
      const id = await boss.send(SEND_QUEUE, d as unknown as object, { singletonKey: `${d.userId}:${d.periodKey}` });
      if (id) queued += 1;
    }
    return queued;
  }

  const workOptions = { pollingIntervalSeconds: options.pollingIntervalSeconds ?? 2 };
  await boss.work(HOURLY_QUEUE, workOptions, async () => {
    await enqueueDue();
  });
  await boss.work<DueDigest>(SEND_QUEUE, workOptions, async (jobs) => {
    for (const job of jobs) {
      await digests.sendScheduled(job.data, `pg-boss:${job.id}`);
    }
  });
  if (options.schedule !== false) {
    await boss.schedule(HOURLY_QUEUE, HOURLY_CRON, {}, { tz: 'UTC', singletonKey: 'hourly' });
  }

  return {
    boss,
    enqueueDue,
    async stop() {
      await boss.stop({ graceful: true, wait: true, timeout: 10_000 });
    },
  };
}
