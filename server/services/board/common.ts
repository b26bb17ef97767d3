/**
 * What the board reports share: bound parameters, the company condition, the latest-check SQL,
 * the tuned statement runner, and the two figures both the levels board and the scorecards read
 * (live tallies, unresolved figures).
 *
 * Scope: `scope.companyId` (set for a subcontractor) is a condition in the SQL WHERE of every
 * finding read by the board reports, exactly as in findingQueries.ts, so a subcontractor's numbers
 * cover only their company's findings. Request values only ever arrive as bound parameters.
 *
 * Shared definitions (the same as the findings list, server/services/findingQueries.ts):
 *   overdue   = status open (new or returned) AND due_on < today in the job's time zone (todayIn);
 *               a fix waiting for re-inspection is not overdue (shared/rules/due.ts isOverdue)
 *   checked   = the unit's latest unit check (checked_at DESC, id DESC) is complete (walkUnits.ts)
 *   voided findings are never counted.
 */
import { QueryTypes, type Sequelize } from 'sequelize';
import { cachedStat, type StatVersions } from '../statCache';
import { overdueSql, type FindingScope } from '../findingQueries';

/** Bound parameters of one statement; $1 is always the job. */
export class Bind {
  readonly values: unknown[];
  constructor(jobId: string) {
    this.values = [jobId];
  }
  add(value: unknown): string {
    return `$${this.values.push(value)}`;
  }
}

/** " AND f.company_id = $n" for a subcontractor, "" otherwise. */
export function companyCond(b: Bind, scope: FindingScope, alias = 'f'): string {
  return scope.companyId ? ` AND ${alias}.company_id = ${b.add(scope.companyId)}::uuid` : '';
}

/** Each unit's latest check (walkUnits.ts: ORDER BY checked_at DESC, id DESC) on the job; $1 = job. */
export const LATEST_CHECK_CTE = `latest_check AS (
      SELECT DISTINCT ON (uc.unit_id) uc.unit_id, uc.complete
        FROM unit_checks uc
       WHERE uc.job_id = $1
       ORDER BY uc.unit_id, uc.checked_at DESC, uc.id DESC
    )`;

/**
 * The unit's latest check (same order as LATEST_CHECK_CTE), as a LATERAL join on `alias` (a units
 * row): one probe of unit_checks_unit_latest per unit instead of sorting all the job's checks.
 */
export const latestCheckJoin = (alias: string) => `LEFT JOIN LATERAL (
        SELECT uc.complete FROM unit_checks uc
         WHERE uc.unit_id = ${alias}.id AND uc.job_id = $1
         ORDER BY uc.checked_at DESC, uc.id DESC
         LIMIT 1
      ) lc ON true`;

export const num = (v: unknown): number => (v === null || v === undefined ? 0 : Number(v));

export async function select<T extends object>(sequelize: Sequelize, sql: string, bind: unknown[]): Promise<T[]> {
  return sequelize.query<T>(sql, { bind, type: QueryTypes.SELECT });
}

/**
 * One of the big statements, in its own transaction with planner settings for many clients at
 * once: no parallel workers (starting them cost more than the whole scan on the 100,000-finding
 * bench job, and under load they only take CPU from other requests), no JIT (compiling costs
 * more than it saves at this size), and work_mem for the sorts to stay in memory.
 * Checked with EXPLAIN (ANALYZE, BUFFERS); see docs/api-board.md "Speed".
 */
export async function selectTuned<T extends object>(sequelize: Sequelize, sql: string, bind: unknown[]): Promise<T[]> {
  return sequelize.transaction(async (transaction) => {
    await sequelize.query(`SET LOCAL max_parallel_workers_per_gather = 0; SET LOCAL jit = off; SET LOCAL work_mem = '16MB'`, { transaction });
    return sequelize.query<T>(sql, { bind, type: QueryTypes.SELECT, transaction });
  });
}

/**
 * Overdue and ceiling-blocking counts of the job's unresolved findings per (level, company,
 * severity), for every caller (a subcontractor's scope is applied by the callers), cached while no
 * unresolved finding and no catalogue flag changed (topics unresolved, structure) on `today`.
 * Index-only on the partial index findings_job_unresolved_level_company.
 */
export interface UnresolvedFigure {
  levelId: string;
  companyId: string;
  severity: string;
  unresolved: number;
  overdue: number;
  ceilingBlockers: number;
}
export async function loadUnresolvedFigures(sequelize: Sequelize, jobId: string, today: string, versions?: StatVersions): Promise<UnresolvedFigure[]> {
  return cachedStat(sequelize, jobId, ['structure', 'unresolved'], `unresolved|${today}`, async () => {
    const rows = await select<{ level_id: string; company_id: string; severity: string; unresolved: string; overdue: string; ceiling: string }>(
      sequelize,
      `SELECT f.level_id, f.company_id, f.severity, count(*) AS unresolved,
              count(*) FILTER (WHERE ${overdueSql('$2::date')}) AS overdue,
              count(*) FILTER (WHERE f.catalogue_item_id IN (
                SELECT ci.id FROM catalogue_items ci WHERE ci.job_id = $1 AND ci.needs_ceiling_access)) AS ceiling
         FROM findings f
        WHERE f.job_id = $1 AND f.status IN ('open', 'fix_submitted')
        GROUP BY f.level_id, f.company_id, f.severity`,
      [jobId, today],
    );
    return rows.map((r) => ({
      levelId: r.level_id,
      companyId: r.company_id,
      severity: r.severity,
      unresolved: num(r.unresolved),
      overdue: num(r.overdue),
      ceilingBlockers: num(r.ceiling),
    }));
  }, versions);
}

/** The live tally rows (migration 20261202010100) of the job, or of one company. */
export async function loadTallies(
  sequelize: Sequelize,
  jobId: string,
  companyId: string | null,
): Promise<{ level_id: string; company_id: string; status: string; severity: string; n: number }[]> {
  const rows = await select<{ level_id: string; company_id: string; status: string; severity: string; n: number }>(
    sequelize,
    `SELECT level_id, company_id, status, severity, n FROM finding_tallies
      WHERE job_id = $1 AND n <> 0${companyId ? ' AND company_id = $2::uuid' : ''}`,
    companyId ? [jobId, companyId] : [jobId],
  );
  return rows.map((r) => ({ ...r, n: Number(r.n) }));
}

/** Fixes waiting for re-inspection per level and company: how many, and when the oldest was submitted. */
export interface WaitingFixes {
  levelId: string;
  companyId: string;
  count: number;
  /** The earliest of their latest fixes' submission times. */
  oldestSubmittedAt: Date;
}

/**
 * Fixes waiting for the inspector per level and company ($1 = the job), index-only on the partial
 * indexes findings_job_fix_submitted and finding_events_fix_submitted_at (migration 20261205000000).
 */
export const WAITING_FIXES_SQL = `SELECT f.level_id, f.company_id, count(*) AS n, min(lf.submitted_at) AS oldest
       FROM findings f
       -- The latest fix_submitted event (read backwards): the history is the record of when the
       -- fix was submitted, for every way a finding reached this status.
       JOIN LATERAL (SELECT e.at AS submitted_at FROM finding_events e
                      WHERE e.finding_id = f.id AND e.kind = 'fix_submitted' ORDER BY e.at DESC LIMIT 1) lf ON true
      WHERE f.job_id = $1 AND f.status = 'fix_submitted'
      GROUP BY f.level_id, f.company_id`;

/**
 * The job's findings waiting for re-inspection, grouped by level and company, with the oldest
 * wait (the latest fix of each, since a returned finding waits again from its new fix). Not cached:
 * the days are counted from it on the job's clock at each request (shared/rules/waiting.ts), and
 * it reads only fix-submitted findings and one index probe each into fixes.
 */
export async function loadWaitingFixes(sequelize: Sequelize, jobId: string): Promise<WaitingFixes[]> {
  const rows = await select<{ level_id: string; company_id: string; n: string; oldest: Date }>(sequelize, WAITING_FIXES_SQL, [jobId]);
  return rows.map((r) => ({ levelId: r.level_id, companyId: r.company_id, count: num(r.n), oldestSubmittedAt: new Date(r.oldest) }));
}
