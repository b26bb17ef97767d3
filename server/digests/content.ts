/**
 * What a digest says, read from the database (raw SQL, bound parameters only).
 *
 * Subcontractor: per job where they are a subcontractor member, the unresolved findings (open or
 * fix submitted) of the company that membership is for (job_members.company_id, which may differ
 * from job to job and from the person's home company), each in one section: overdue (past due in the job's time zone),
 * returned (open again after a re-inspection returned it, with the latest return reason), new
 * (logged, or reassigned to the company, since the period began), then the rest.
 * The company scope is in the SQL WHERE, as for every other read of findings.
 *
 * GC manager: per job where they are a GC manager, per level the unresolved count now and at the
 * start of the period (rebuilt from finding_events: each finding's status is the "to.status" of its
 * last event at or before that moment), overdue per company, and defect types that became
 * recurring during the period (server/digests/recurring.ts).
 */
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import type { FindingStatus, Severity } from '../../shared/words';
import { todayIn } from '../../shared/rules/dates';
import { isOverdue } from '../../shared/rules/due';
import { overdueSql } from '../services/findingQueries';
import { levelTests, loadTestFacts } from '../services/board/testReadiness';
import { newRecurring, type NewRecurring } from './recurring';

export type DigestPeriod = 'daily' | 'weekly';

export interface DigestFinding {
  findingId: string;
  jobId: string;
  number: number;
  code: string;
  title: string;
  severity: Severity;
  status: FindingStatus;
  dueOn: string;
  overdue: boolean;
  levelName: string;
  spaceName: string | null;
  unitTag: string | null;
  loggedAt: Date;
  isNew: boolean;
  returnCount: number;
  /** The reason of the latest return, when the finding is open after a return. */
  returnReason: string | null;
  /** App path: /jobs/<job>/findings/<finding>. */
  path: string;
}

export interface SubcontractorJobDigest {
  jobId: string;
  jobName: string;
  /** The company the membership is for: whose findings these are. */
  company: { id: string; name: string };
  today: string;
  unresolved: number;
  overdue: DigestFinding[];
  returned: DigestFinding[];
  fresh: DigestFinding[];
  rest: DigestFinding[];
}

export interface LevelCount {
  levelId: string;
  name: string;
  now: number;
  before: number;
  change: number;
}

/** A level whose ceilings wait for test records, counted by what is wrong with them. */
export interface LevelTestsWaiting {
  levelId: string;
  name: string;
  missing: number;
  failed: number;
  awaitingWitness: number;
}

export interface ManagerJobDigest {
  jobId: string;
  jobName: string;
  today: string;
  levels: LevelCount[];
  /** Levels whose ceilings wait for test records (pressure tests, drain tests), in building order. */
  testsWaiting: LevelTestsWaiting[];
  totals: { now: number; before: number; change: number };
  overdueByCompany: { companyId: string; name: string; overdue: number }[];
  newRecurring: NewRecurring[];
}

export interface DigestContent {
  user: { id: string; name: string; email: string };
  company: { id: string; name: string };
  since: Date;
  until: Date;
  period: DigestPeriod;
  subcontractorJobs: SubcontractorJobDigest[];
  managerJobs: ManagerJobDigest[];
}

interface JobRow {
  job_id: string;
  name: string;
  time_zone: string;
  role: string;
  company_id: string;
  company_name: string;
}

interface FindingSqlRow {
  id: string;
  job_id: string;
  number: number;
  code: string;
  title: string;
  severity: Severity;
  status: FindingStatus;
  due_on: string;
  level_name: string;
  level_position: number;
  space_name: string | null;
  unit_tag: string | null;
  logged_at: Date;
  return_count: number;
  is_new: boolean;
  last_status_kind: string | null;
  return_reason: string | null;
}

const SEVERITY_ORDER: Record<Severity, number> = { critical: 1, major: 2, minor: 3 };

export function findingPath(jobId: string, findingId: string): string {
  return `/jobs/${encodeURIComponent(jobId)}/findings/${encodeURIComponent(findingId)}`;
}

/** A company's unresolved findings on one job, with their "new" and "returned" marks. */
export async function companyFindings(
  sequelize: Sequelize,
  job: { id: string; timeZone: string },
  companyId: string,
  since: Date,
  now: Date,
  transaction?: Transaction,
  /** Only this finding (the event mail). */
  onlyFindingId: string | null = null,
): Promise<{ today: string; items: DigestFinding[] }> {
  const today = todayIn(job.timeZone || 'UTC', now);
  const rows = await sequelize.query<FindingSqlRow>(
    `SELECT f.id, f.job_id, f.number, c.code, coalesce(f.title, c.title) AS title, f.severity, f.status, to_char(f.due_on, 'YYYY-MM-DD') AS due_on,
            l.name AS level_name, l.position AS level_position, s.name AS space_name, u.tag AS unit_tag,
            f.logged_at, f.return_count,
            (f.logged_at >= $3 OR EXISTS (
               SELECT 1 FROM finding_events r WHERE r.finding_id = f.id AND r.kind = 'reassigned'
                  AND r.at >= $3 AND r."to"->>'companyId' = $2::text)) AS is_new,
            last.kind AS last_status_kind,
            (SELECT e.reason FROM finding_events e WHERE e.finding_id = f.id AND e.kind = 'returned'
              ORDER BY e.at DESC, e.id DESC LIMIT 1) AS return_reason
       FROM findings f
       JOIN catalogue_items c ON c.id = f.catalogue_item_id
       JOIN levels l ON l.id = f.level_id
       LEFT JOIN spaces s ON s.id = f.space_id
       LEFT JOIN units u ON u.id = f.unit_id
       LEFT JOIN LATERAL (
         SELECT e.kind FROM finding_events e
          WHERE e.finding_id = f.id AND e."to" ? 'status'
          ORDER BY e.at DESC, e.id DESC LIMIT 1) last ON true
      WHERE f.job_id = $1 AND f.company_id = $2::uuid AND f.status IN ('open', 'fix_submitted') AND f.logged_at <= $4
        AND ($5::uuid IS NULL OR f.id = $5::uuid)
      ORDER BY f.due_on, f.number`,
    { bind: [job.id, companyId, since, now, onlyFindingId], type: QueryTypes.SELECT, transaction },
  );
  const items = rows.map<DigestFinding>((r) => {
    const returnedOpen = r.status === 'open' && r.last_status_kind === 'returned';
    return {
      findingId: r.id,
      jobId: r.job_id,
      number: Number(r.number),
      code: r.code,
      title: r.title,
      severity: r.severity,
      status: r.status,
      dueOn: r.due_on,
      overdue: isOverdue({ status: r.status, dueOn: r.due_on }, today),
      levelName: r.level_name,
      spaceName: r.space_name,
      unitTag: r.unit_tag,
      loggedAt: new Date(r.logged_at),
      isNew: Boolean(r.is_new),
      returnCount: Number(r.return_count),
      returnReason: returnedOpen ? r.return_reason : null,
      path: findingPath(r.job_id, r.id),
    };
  });
  return { today, items };
}

function bySeverityThenDue(a: DigestFinding, b: DigestFinding): number {
  return SEVERITY_ORDER[a.severity] - SEVERITY_ORDER[b.severity] || a.dueOn.localeCompare(b.dueOn) || a.number - b.number;
}

/** Splits a company's findings into the digest's sections; each finding appears once. */
export function sections(items: DigestFinding[]): Pick<SubcontractorJobDigest, 'overdue' | 'returned' | 'fresh' | 'rest'> {
  const overdue = items.filter((f) => f.overdue).sort((a, b) => a.dueOn.localeCompare(b.dueOn) || bySeverityThenDue(a, b));
  const returned = items.filter((f) => !f.overdue && f.returnReason !== null).sort(bySeverityThenDue);
  const fresh = items.filter((f) => !f.overdue && f.returnReason === null && f.isNew).sort(bySeverityThenDue);
  const rest = items.filter((f) => !f.overdue && f.returnReason === null && !f.isNew).sort(bySeverityThenDue);
  return { overdue, returned, fresh, rest };
}

/** Per level: unresolved now and at `before`, rebuilt from each finding's events. */
export async function levelCounts(sequelize: Sequelize, jobId: string, before: Date, now: Date): Promise<LevelCount[]> {
  const rows = await sequelize.query<{ level_id: string; name: string; now: number; before: number }>(
    `SELECT l.id AS level_id, l.name,
            (SELECT count(*) FROM findings f WHERE f.level_id = l.id AND f.job_id = $1
                AND f.status IN ('open', 'fix_submitted'))::int AS now,
            (SELECT count(*) FROM findings f
               JOIN LATERAL (
                 SELECT e."to"->>'status' AS status FROM finding_events e
                  WHERE e.finding_id = f.id AND e.at <= $2 AND e."to" ? 'status'
                  ORDER BY e.at DESC, e.id DESC LIMIT 1) s ON true
              WHERE f.level_id = l.id AND f.job_id = $1 AND f.logged_at <= $2
                AND s.status IN ('open', 'fix_submitted'))::int AS before
       FROM levels l
      WHERE l.job_id = $1
      ORDER BY l.position, l.name`,
    { bind: [jobId, before], type: QueryTypes.SELECT },
  );
  void now;
  return rows.map((r) => ({ levelId: r.level_id, name: r.name, now: Number(r.now), before: Number(r.before), change: Number(r.now) - Number(r.before) }));
}

/** The levels whose ceilings wait for test records (the readiness rule of services/board/testReadiness.ts). */
export async function levelTestsWaiting(sequelize: Sequelize, jobId: string, timeZone: string): Promise<LevelTestsWaiting[]> {
  const facts = await loadTestFacts(sequelize, { jobId, timeZone, companyId: null });
  const levels = await sequelize.query<{ id: string; name: string }>(`SELECT id, name FROM levels WHERE job_id = $1 ORDER BY position, name, id`, {
    bind: [jobId],
    type: QueryTypes.SELECT,
  });
  return levels.flatMap((l) => {
    const { testBlockers } = levelTests(facts, l.id);
    if (testBlockers.length === 0) return [];
    const count = (state: string) => testBlockers.filter((b) => b.state === state).length;
    return [{ levelId: l.id, name: l.name, missing: count('missing'), failed: count('failed'), awaitingWitness: count('awaiting_witness') }];
  });
}

export async function overdueByCompany(sequelize: Sequelize, jobId: string, today: string) {
  const rows = await sequelize.query<{ company_id: string; name: string; overdue: number }>(
    `SELECT c.id AS company_id, c.name, count(*)::int AS overdue
       FROM findings f JOIN companies c ON c.id = f.company_id
      WHERE f.job_id = $1 AND ${overdueSql('$2::date')}
      GROUP BY c.id, c.name
      ORDER BY count(*) DESC, c.name`,
    { bind: [jobId, today], type: QueryTypes.SELECT },
  );
  return rows.map((r) => ({ companyId: r.company_id, name: r.name, overdue: Number(r.overdue) }));
}

export const PERIOD_MS: Record<DigestPeriod, number> = { daily: 24 * 60 * 60 * 1000, weekly: 7 * 24 * 60 * 60 * 1000 };

/** Everything one user's digest says, for the period ending `now`. */
export async function buildDigestContent(
  sequelize: Sequelize,
  userId: string,
  period: DigestPeriod,
  now: Date = new Date(),
): Promise<DigestContent | null> {
  const [user] = await sequelize.query<{ id: string; name: string; email: string; company_id: string; company_name: string }>(
    `SELECT u.id, u.name, u.email, u.company_id, c.name AS company_name
       FROM users u JOIN companies c ON c.id = u.company_id
      WHERE u.id = $1 AND u.disabled_at IS NULL`,
    { bind: [userId], type: QueryTypes.SELECT },
  );
  if (!user) return null;
  const since = new Date(now.getTime() - PERIOD_MS[period]);
  const jobs = await sequelize.query<JobRow>(
    `SELECT j.id AS job_id, j.name, j.time_zone, m.role, m.company_id, c.name AS company_name
       FROM job_members m JOIN jobs j ON j.id = m.job_id JOIN companies c ON c.id = m.company_id
      WHERE m.user_id = $1 AND m.role IN ('gc_manager', 'subcontractor')
      ORDER BY j.name, j.id`,
    { bind: [userId], type: QueryTypes.SELECT },
  );
  const subcontractorJobs: SubcontractorJobDigest[] = [];
  const managerJobs: ManagerJobDigest[] = [];
  for (const job of jobs) {
    const timeZone = job.time_zone || 'UTC';
    if (job.role === 'subcontractor') {
      const { today, items } = await companyFindings(sequelize, { id: job.job_id, timeZone }, job.company_id, since, now);
      subcontractorJobs.push({
        jobId: job.job_id,
        jobName: job.name,
        company: { id: job.company_id, name: job.company_name },
        today,
        unresolved: items.length,
        ...sections(items),
      });
    } else {
      const today = todayIn(timeZone, now);
      const levels = await levelCounts(sequelize, job.job_id, since, now);
      const totals = levels.reduce((t, l) => ({ now: t.now + l.now, before: t.before + l.before, change: t.change + l.change }), { now: 0, before: 0, change: 0 });
      managerJobs.push({
        jobId: job.job_id,
        jobName: job.name,
        today,
        levels,
        totals,
        testsWaiting: await levelTestsWaiting(sequelize, job.job_id, timeZone),
        overdueByCompany: await overdueByCompany(sequelize, job.job_id, today),
        newRecurring: await newRecurring(sequelize, { id: job.job_id, timeZone }, since, now),
      });
    }
  }
  return {
    user: { id: user.id, name: user.name, email: user.email },
    company: { id: user.company_id, name: user.company_name },
    since,
    until: now,
    period,
    subcontractorJobs,
    managerJobs,
  };
}

/** How many findings a digest is about (the number the "send now" answer reports). */
export function findingsCounted(content: DigestContent): number {
  return content.subcontractorJobs.reduce((n, j) => n + j.unresolved, 0) + content.managerJobs.reduce((n, j) => n + j.totals.now, 0);
}
