/**
 * Digests and event mails: who is due, the once-per-period claim, building and sending.
 *
 * Once per period: before sending a scheduled digest a worker claims it with
 *   INSERT INTO digest_sends (user_id, period_key, ...) ON CONFLICT (user_id, period_key) DO NOTHING RETURNING id
 * in its own committed transaction; only the worker whose INSERT made the row sends. Two workers
 * (or two servers) racing for the same user and period: the second INSERT waits on the unique
 * index until the first commits, then does nothing. A process that dies after claiming and before
 * sending leaves the claim in place, so the digest is never sent twice (at most once per period).
 * The row is then marked sent_at (or failed_at when the outbox's retries all failed).
 *
 * The "send me a digest now" button does not use or consume the period: it is a trial.
 */
import type { Request } from 'express';
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import type { DigestSchedule } from '../../shared/digestSchedule';
import type { Env } from '../env';
import type { MailService } from '../mail';
import type { MailMessage } from '../mail/outbox';
import { buildDigestContent, companyFindings, findingsCounted, findingPath, type DigestContent, type DigestPeriod } from './content';
import { loadDigestRecipients, loadPreferences, type EffectivePreferences } from './preferences';
import { renderCriticalAssignment, renderDigest } from './render';
import { signUnsubscribeToken } from './unsubscribeToken';

/** The saved schedule a digest names (shared/digestSchedule.ts words it). */
export function scheduleOf(p: Pick<EffectivePreferences, 'digestFrequency' | 'digestWeekday' | 'digestHour' | 'timeZone'>): DigestSchedule {
  return { frequency: p.digestFrequency, weekday: p.digestWeekday, hour: p.digestHour, timeZone: p.timeZone };
}

export interface DueDigest {
  userId: string;
  period: DigestPeriod;
  periodKey: string;
}

export interface DigestSendResult {
  sent: boolean;
  claimed: boolean;
  to: string;
  subject: string;
  findings: number;
}

/** Local date (YYYY-MM-DD), hour (0–23) and ISO weekday (1 Monday … 7 Sunday) of `now` in a time zone. */
export function localClock(timeZone: string, now: Date): { date: string; hour: number; weekday: number } {
  const parts = new Intl.DateTimeFormat('en-CA', {
    timeZone,
    year: 'numeric',
    month: '2-digit',
    day: '2-digit',
    hour: '2-digit',
    hourCycle: 'h23',
    weekday: 'short',
  }).formatToParts(now);
  const get = (t: string) => parts.find((p) => p.type === t)?.value ?? '';
  const weekdays: Record<string, number> = { Mon: 1, Tue: 2, Wed: 3, Thu: 4, Fri: 5, Sat: 6, Sun: 7 };
  return { date: `${get('year')}-${get('month')}-${get('day')}`, hour: Number(get('hour')) % 24, weekday: weekdays[get('weekday')] ?? 1 };
}

/**
 * The period a user's digest is due for at `now`, or null. Due from the chosen local hour until the
 * end of that local day (a server that was down at 07:00 catches up at its next hourly run); weekly
 * only on the chosen weekday. The key names the local date: "daily:2026-12-01", "weekly:2026-11-30".
 */
export function duePeriod(p: Pick<EffectivePreferences, 'digestFrequency' | 'digestHour' | 'digestWeekday' | 'timeZone'>, now: Date): { period: DigestPeriod; periodKey: string } | null {
  if (p.digestFrequency === 'off') return null;
  let clock: ReturnType<typeof localClock>;
  try {
    clock = localClock(p.timeZone, now);
  } catch {
    clock = localClock('UTC', now);
  }
  if (clock.hour < p.digestHour) return null;
  if (p.digestFrequency === 'weekly') {
    if (clock.weekday !== p.digestWeekday) return null;
    return { period: 'weekly', periodKey: `weekly:${clock.date}` };
  }
  return { period: 'daily', periodKey: `daily:${clock.date}` };
}

export interface DigestService {
  /** Digests due at `now` that nobody has claimed yet (the hourly job enqueues one send per entry). */
  dueDigests(now?: Date): Promise<DueDigest[]>;
  /** Claims (user, period) and sends if this caller's claim made the row; otherwise sends nothing. */
  sendScheduled(due: DueDigest, claimedBy: string, now?: Date): Promise<DigestSendResult>;
  /** "Send me a digest now": a digest of the chosen period (weekly, else daily), built now (no claim); the caller sends it. */
  prepareNow(userId: string, req?: Request, now?: Date): Promise<{ message: MailMessage; findings: number } | null>;
  /** Mails each subcontractor of the company on the job (preference on) after the transaction commits. */
  notifyCriticalAssignment(input: CriticalAssignmentInput, transaction: Transaction, req?: Request): Promise<void>;
  unsubscribeToken(userId: string, list: 'digest' | 'critical'): string;
  /** Public origin for links (env.publicOrigin): never the request's Host header. */
  origin(): string;
}

export interface CriticalAssignmentInput {
  jobId: string;
  findingId: string;
  companyId: string;
  severity: string;
  how: 'logged' | 'reassigned';
  /** The person who made the change gets no mail about it. */
  actorId: string;
}

export interface DigestServiceOptions {
  sequelize: Sequelize;
  mail: MailService;
  env: Env;
  log: (message: string, err?: unknown) => void;
}

export function createDigestService(options: DigestServiceOptions): DigestService {
  const { sequelize, mail, env, log } = options;

  const service: DigestService = {
    origin() {
      return env.publicOrigin;
    },

    unsubscribeToken(userId, list) {
      return signUnsubscribeToken(env.sessionSecrets, userId, list);
    },

    async dueDigests(now = new Date()) {
      const recipients = await loadDigestRecipients(sequelize);
      const due: DueDigest[] = [];
      for (const p of recipients) {
        const d = duePeriod(p, now);
        if (d) due.push({ userId: p.userId, ...d });
      }
      if (due.length === 0) return due;
      const claimed = await sequelize.query<{ user_id: string; period_key: string }>(
        `SELECT user_id, period_key FROM digest_sends WHERE user_id = ANY($1::uuid[]) AND period_key = ANY($2::text[])`,
        { bind: [due.map((d) => d.userId), Array.from(new Set(due.map((d) => d.periodKey)))], type: QueryTypes.SELECT },
      );
      const taken = new Set(claimed.map((c) => `${c.user_id}|${c.period_key}`));
      return due.filter((d) => !taken.has(`${d.userId}|${d.periodKey}`));
    },

    async sendScheduled(due, claimedBy, now = new Date()) {
      const prefs = await loadPreferences(sequelize, due.userId);
      const empty = { sent: false, claimed: false, to: prefs?.email ?? '', subject: '', findings: 0 };
      // Changed since the hourly job listed it (say weekly to daily): the mail would name a schedule
      // that is no longer chosen. Nothing is claimed; the next hourly run lists the new choice.
      if (!prefs || prefs.digestFrequency !== due.period) return empty;
      const claim = await sequelize.transaction(async (transaction) =>
        sequelize.query<{ id: string }>(
          `INSERT INTO digest_sends (id, user_id, period_key, claimed_at, claimed_by)
           VALUES (gen_random_uuid(), $1, $2, now(), $3)
           ON CONFLICT (user_id, period_key) DO NOTHING
           RETURNING id`,
          { bind: [due.userId, due.periodKey, claimedBy.slice(0, 80)], type: QueryTypes.SELECT, transaction },
        ),
      );
      if (claim.length === 0) return empty;
      const id = claim[0]!.id;
      try {
        const result = await buildAndSend(prefs, due.period, 'scheduled', undefined, now);
        await sequelize.query(`UPDATE digest_sends SET ${result.sent ? 'sent_at' : 'failed_at'} = now() WHERE id = $1`, { bind: [id] });
        return { ...result, claimed: true };
      } catch (err) {
        log(`digest for user ${due.userId} (${due.periodKey}) failed`, err);
        await sequelize.query(`UPDATE digest_sends SET failed_at = now() WHERE id = $1`, { bind: [id] }).catch(() => undefined);
        return { ...empty, claimed: true };
      }
    },

    async prepareNow(userId, req, now = new Date()) {
      const prefs = await loadPreferences(sequelize, userId);
      if (!prefs) return null;
      // The period the person chose (weekly covers the last seven days); daily when digests are off.
      return build(prefs, prefs.digestFrequency === 'weekly' ? 'weekly' : 'daily', 'now', req, now);
    },

    async notifyCriticalAssignment(input, transaction) {
      if (input.severity !== 'critical') return;
      // The reads run in a savepoint of the write's transaction (they see the finding as it will
      // be committed); if one fails, only the savepoint rolls back: a mail never fails the write.
      let messages: MailMessage[] = [];
      try {
        messages = await sequelize.transaction({ transaction }, (savepoint) => criticalAssignmentMails(input, savepoint));
      } catch (err) {
        log(`critical-assignment mail for finding ${input.findingId} not prepared`, err);
        return;
      }
      for (const message of messages) mail.outbox.sendAfterCommit(transaction, message);
    },
  };

  async function criticalAssignmentMails(input: CriticalAssignmentInput, transaction: Transaction): Promise<MailMessage[]> {
    const recipients = await sequelize.query<{ user_id: string }>(
      `SELECT u.id AS user_id
         FROM job_members m JOIN users u ON u.id = m.user_id
        WHERE m.job_id = $1 AND m.role = 'subcontractor' AND m.company_id = $2 AND u.id <> $3
          AND u.disabled_at IS NULL AND u.email_confirmed_at IS NOT NULL
        ORDER BY u.id`,
      { bind: [input.jobId, input.companyId, input.actorId], type: QueryTypes.SELECT, transaction },
    );
    if (recipients.length === 0) return [];
    const [job] = await sequelize.query<{ name: string; time_zone: string; company_name: string }>(
      `SELECT j.name, j.time_zone, c.name AS company_name FROM jobs j, companies c WHERE j.id = $1 AND c.id = $2`,
      { bind: [input.jobId, input.companyId], type: QueryTypes.SELECT, transaction },
    );
    if (!job) return [];
    const origin = service.origin();
    const now = new Date();
    const since = new Date(now.getTime() - 24 * 60 * 60 * 1000);
    const { items } = await companyFindings(sequelize, { id: input.jobId, timeZone: job.time_zone }, input.companyId, since, now, transaction, input.findingId);
    const finding = items.find((f) => f.findingId === input.findingId);
    if (!finding) return [];
    const messages: MailMessage[] = [];
    for (const r of recipients) {
      const prefs = await loadPreferences(sequelize, r.user_id, transaction);
      if (!prefs || !prefs.criticalAssignmentMail) continue;
      messages.push(
        renderCriticalAssignment(
          { user: { name: prefs.name, email: prefs.email }, jobName: job.name, companyName: job.company_name, finding, how: input.how },
          { origin, unsubscribeToken: service.unsubscribeToken(prefs.userId, 'critical') },
        ),
      );
    }
    return messages;
  }

  async function build(prefs: EffectivePreferences, period: DigestPeriod, trigger: 'scheduled' | 'now', req: Request | undefined, now: Date) {
    const content: DigestContent | null = await buildDigestContent(sequelize, prefs.userId, period, now);
    if (!content) return null;
    const message = renderDigest(content, {
      origin: service.origin(),
      timeZone: prefs.timeZone,
      unsubscribeToken: service.unsubscribeToken(prefs.userId, 'digest'),
      trigger,
      schedule: scheduleOf(prefs),
    });
    return { message, findings: findingsCounted(content) };
  }

  async function buildAndSend(prefs: EffectivePreferences, period: DigestPeriod, trigger: 'scheduled' | 'now', req: Request | undefined, now: Date) {
    const built = await build(prefs, period, trigger, req, now);
    if (!built) return { sent: false, to: prefs.email, subject: '', findings: 0 };
    const sent = await mail.outbox.sendMail(built.message);
    return { sent, to: prefs.email, subject: built.message.subject, findings: built.findings };
  }

  return service;
}

export { findingPath };
