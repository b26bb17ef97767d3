/**
 * The GC's view of a job (issue 7): levels board, readiness, company scorecards, recurring
 * defects and the open-findings trend. Every number is computed in PostgreSQL (GROUP BY,
 * FILTER (WHERE ...), window functions, percentile_cont), or read from the trigger-kept tallies;
 * Node only adds up those few rows and shapes them into the response types of
 * shared/schemas/board.ts. Heavy figures go through the exact cache of statCache.ts.
 * Definitions: docs/api-board.md.
 *
 * Scope: `scope.companyId` (set for a subcontractor) is a condition in the SQL WHERE of every
 * finding read here, exactly as in findingQueries.ts, so a subcontractor's numbers cover only
 * their company's findings. Request values only ever arrive as bound parameters.
 *
 * Shared definitions (the same as the findings list, server/services/findingQueries.ts):
 *   overdue   = status open or fix_submitted AND due_on < today in the job's time zone (todayIn)
 *   checked   = the unit's latest unit check (checked_at DESC, id DESC) is complete (walkUnits.ts)
 *   voided findings are never counted.
 */
import { QueryTypes, type Sequelize } from 'sequelize';
import {
  DEFAULT_RECURRING_THRESHOLDS,
  TREND_DAYS_DEFAULT,
  type BoardCounts,
  type BoardLevelRow,
  type BoardResponse,
  type CompanyScorecard,
  type LevelReadiness,
  type ReadinessBlocker,
  type ReadinessQuery,
  type ReadinessResponse,
  READINESS_LEVEL_BLOCKERS_MAX,
  READINESS_UNIT_BLOCKERS_MAX,
  type RecurringDefect,
  type RecurringResponse,
  type RecurringThresholdsView,
  type ScorecardsResponse,
  type SystemReadiness,
  type TrendQuery,
  type TrendResponse,
  type UnitReadiness,
} from '../../shared/schemas/board';
import type { UnitKindKey } from '../../shared/words';
import { addDays, todayIn } from './findings';
import { cachedStat, readStatVersions, type StatVersions } from './statCache';
import type { FindingScope } from './findingQueries';

/** Bound parameters of one statement; $1 is always the job. */
class Bind {
  readonly values: unknown[];
  constructor(jobId: string) {
    this.values = [jobId];
  }
  add(value: unknown): string {
    return `$${this.values.push(value)}`;
  }
}

/** " AND f.company_id = $n" for a subcontractor, "" otherwise. */
function companyCond(b: Bind, scope: FindingScope, alias = 'f'): string {
  return scope.companyId ? ` AND ${alias}.company_id = ${b.add(scope.companyId)}::uuid` : '';
}


/** Each unit's latest check (walkUnits.ts: ORDER BY checked_at DESC, id DESC) on the job; $1 = job. */
const LATEST_CHECK_CTE = `latest_check AS (
      SELECT DISTINCT ON (uc.unit_id) uc.unit_id, uc.complete
        FROM unit_checks uc
       WHERE uc.job_id = $1
       ORDER BY uc.unit_id, uc.checked_at DESC, uc.id DESC
    )`;

/**
 * The unit's latest check (same order as LATEST_CHECK_CTE), as a LATERAL join on `alias` (a units
 * row): one probe of unit_checks_unit_latest per unit instead of sorting all the job's checks.
 */
const latestCheckJoin = (alias: string) => `LEFT JOIN LATERAL (
        SELECT uc.complete FROM unit_checks uc
         WHERE uc.unit_id = ${alias}.id AND uc.job_id = $1
         ORDER BY uc.checked_at DESC, uc.id DESC
         LIMIT 1
      ) lc ON true`;

const num = (v: unknown): number => (v === null || v === undefined ? 0 : Number(v));

async function select<T extends object>(sequelize: Sequelize, sql: string, bind: unknown[]): Promise<T[]> {
  return sequelize.query<T>(sql, { bind, type: QueryTypes.SELECT });
}

/**
 * One of the big statements, in its own transaction with planner settings for many clients at
 * once: no parallel workers (starting them cost more than the whole scan on the 100,000-finding
 * bench job, and under load they only take CPU from other requests), no JIT (compiling costs
 * more than it saves at this size), and work_mem for the sorts to stay in memory.
 * Checked with EXPLAIN (ANALYZE, BUFFERS); see docs/api-board.md "Speed".
 */
async function selectTuned<T extends object>(sequelize: Sequelize, sql: string, bind: unknown[]): Promise<T[]> {
  return sequelize.transaction(async (transaction) => {
    await sequelize.query(`SET LOCAL max_parallel_workers_per_gather = 0; SET LOCAL jit = off; SET LOCAL work_mem = '16MB'`, { transaction });
    return sequelize.query<T>(sql, { bind, type: QueryTypes.SELECT, transaction });
  });
}

// ---------------------------------------------------------------------------------------------
// Levels board
// ---------------------------------------------------------------------------------------------

const COUNT_KEYS = ['open', 'openCritical', 'openMajor', 'fixSubmitted', 'closed', 'overdue', 'unitsTotal', 'unitsChecked'] as const;


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
              count(*) FILTER (WHERE f.due_on < $2::date) AS overdue,
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

interface CoverageRow {
  level_id: string;
  name: string;
  position: number;
  units_total: number;
  units_checked: number;
}

/** The job's levels in building order with their units and checked units (cached on topic structure). */
async function loadCoverage(sequelize: Sequelize, jobId: string, versions?: StatVersions): Promise<CoverageRow[]> {
  return cachedStat(sequelize, jobId, ['structure'], 'coverage', async () => {
    const rows = await select<{ level_id: string; name: string; position: number; units_total: string | null; units_checked: string | null }>(
      sequelize,
      `WITH uc AS (
        SELECT u.level_id, count(*) AS units_total, count(*) FILTER (WHERE lc.complete) AS units_checked
          FROM units u
          ${latestCheckJoin('u')}
         WHERE u.job_id = $1
         GROUP BY u.level_id
      )
      SELECT lv.id AS level_id, lv.name, lv.position, uc.units_total, uc.units_checked
        FROM levels lv LEFT JOIN uc ON uc.level_id = lv.id
       WHERE lv.job_id = $1
       ORDER BY lv.position, lv.id`,
      [jobId],
    );
    return rows.map((r) => ({ level_id: r.level_id, name: r.name, position: r.position, units_total: num(r.units_total), units_checked: num(r.units_checked) }));
  }, versions);
}

/**
 * The levels board: one row per level in building order, and the job's totals. Status and
 * severity counts come from the live tallies; overdue and ceiling blockers from
 * loadUnresolvedFigures; units and checked units from loadCoverage. The definitions are the
 * findings list's (docs/api-board.md); tests/server/routes/board.test.ts checks every cell
 * against counts made from the findings themselves.
 */
export async function loadBoard(sequelize: Sequelize, scope: FindingScope): Promise<BoardResponse> {
  const today = todayIn(scope.timeZone);
  const versions = await readStatVersions(sequelize, scope.jobId);
  const [coverage, tallies, unresolved] = await Promise.all([
    loadCoverage(sequelize, scope.jobId, versions),
    loadTallies(sequelize, scope.jobId, scope.companyId),
    loadUnresolvedFigures(sequelize, scope.jobId, today, versions),
  ]);
  const zero = () => ({ open: 0, open_critical: 0, open_major: 0, fix_submitted: 0, closed: 0, overdue: 0, ceiling_blockers: 0 });
  const perLevel = new Map<string, ReturnType<typeof zero>>();
  const at = (levelId: string) => {
    let c = perLevel.get(levelId);
    if (!c) perLevel.set(levelId, (c = zero()));
    return c;
  };
  for (const t of tallies) {
    const c = at(t.level_id);
    if (t.status === 'open') {
      c.open += t.n;
      if (t.severity === 'critical') c.open_critical += t.n;
      if (t.severity === 'major') c.open_major += t.n;
    } else if (t.status === 'fix_submitted') c.fix_submitted += t.n;
    else if (t.status === 'closed') c.closed += t.n;
  }
  for (const u of unresolved) {
    if (scope.companyId && u.companyId !== scope.companyId) continue;
    const c = at(u.levelId);
    c.overdue += u.overdue;
    c.ceiling_blockers += u.ceilingBlockers;
  }
  const rows = coverage.map((lv) => ({ ...lv, ...(perLevel.get(lv.level_id) ?? zero()) }));
  const levels: BoardLevelRow[] = rows.map((r) => ({
    levelId: r.level_id,
    name: r.name,
    position: r.position,
    open: num(r.open),
    openCritical: num(r.open_critical),
    openMajor: num(r.open_major),
    fixSubmitted: num(r.fix_submitted),
    closed: num(r.closed),
    overdue: num(r.overdue),
    unitsTotal: num(r.units_total),
    unitsChecked: num(r.units_checked),
    ceilingBlockers: num(r.ceiling_blockers),
    ceilingReady: num(r.ceiling_blockers) === 0,
  }));
  const totals = Object.fromEntries(COUNT_KEYS.map((k) => [k, 0])) as unknown as BoardCounts;
  for (const l of levels) for (const k of COUNT_KEYS) totals[k] += l[k];
  return { levels, totals, today, companyScope: scope.companyId };
}

// ---------------------------------------------------------------------------------------------
// Readiness
// ---------------------------------------------------------------------------------------------

/** JSON of one blocker row (aliases f, `item` = where code and title are, bu = the finding's unit). */
const blockerJson = (item: string) => `json_build_object('findingId', f.id, 'number', f.number, 'code', ${item}.code, 'title', ${item}.title,
  'severity', f.severity, 'status', f.status, 'unitId', f.unit_id, 'unitTag', bu.tag)`;

interface UnitStateRow {
  unit_id: string;
  tag: string;
  kind: UnitKindKey;
  level_id: string;
  system_id: string | null;
  checked: boolean;
  ready: boolean;
  blockers: ReadinessBlocker[];
  blockers_total: string | null;
}
interface SystemRow {
  system_id: string;
  name: string;
  units_total: string;
  units_ready: string;
  units_unchecked: string;
}
interface LevelRow {
  level_id: string;
  name: string;
  position: number;
  units_total: string;
  units_ready: string;
  blockers: ReadinessBlocker[];
  blockers_total: string | null;
}

/**
 * Readiness for startup (units, systems) and for closing ceilings (levels). With `levelId`: that
 * level, the systems with a unit on it, and its units without a system; with `systemId`: that
 * system and the levels it has units on. A system is always judged (and listed) with ALL its units.
 * Null when the given level or system is not on the job.
 */
export async function loadReadiness(sequelize: Sequelize, scope: FindingScope, query: ReadinessQuery = {}): Promise<ReadinessResponse | null> {
  const b = new Bind(scope.jobId);
  const company = companyCond(b, scope);
  const levelRef = query.levelId ? `${b.add(query.levelId)}::uuid` : null;
  const systemRef = query.systemId ? `${b.add(query.systemId)}::uuid` : null;
  if (query.levelId || query.systemId) {
    const [found] = await select<{ level_ok: boolean; system_ok: boolean }>(
      sequelize,
      `SELECT ($2::uuid IS NULL OR EXISTS (SELECT 1 FROM levels WHERE job_id = $1 AND id = $2::uuid)) AS level_ok,
              ($3::uuid IS NULL OR EXISTS (SELECT 1 FROM systems WHERE job_id = $1 AND id = $3::uuid)) AS system_ok`,
      [scope.jobId, query.levelId ?? null, query.systemId ?? null],
    );
    if (!found?.level_ok || !found.system_ok) return null;
  }

  // Every unit's state: checked (latest check, one index probe per unit), blocked (has an
  // unresolved critical / major finding in scope: index-only on the partial index
  // findings_unit_blocking), ready.
  const blocking = `f.job_id = $1 AND f.unit_id IS NOT NULL AND f.status IN ('open', 'fix_submitted')
         AND f.severity IN ('critical', 'major')${company}`;
  const unitState = `
    unit_blockers AS (
      SELECT f.unit_id FROM findings f WHERE ${blocking} GROUP BY f.unit_id
    ), unit_state AS (
      SELECT u.id AS unit_id, u.tag, u.kind, u.level_id, u.system_id,
             coalesce(lc.complete, false) AS checked,
             (ub.unit_id IS NOT NULL) AS blocked,
             (coalesce(lc.complete, false) AND ub.unit_id IS NULL) AS ready
        FROM units u
        ${latestCheckJoin('u')}
        LEFT JOIN unit_blockers ub ON ub.unit_id = u.id
       WHERE u.job_id = $1
    )`;

  // Which systems and levels are shown.
  const systemConds = ['s.job_id = $1'];
  if (systemRef) systemConds.push(`s.id = ${systemRef}`);
  if (levelRef) systemConds.push(`EXISTS (SELECT 1 FROM units lu WHERE lu.system_id = s.id AND lu.level_id = ${levelRef})`);
  const levelConds = ['lv.job_id = $1'];
  if (levelRef) levelConds.push(`lv.id = ${levelRef}`);
  if (systemRef) levelConds.push(`EXISTS (SELECT 1 FROM units su WHERE su.level_id = lv.id AND su.system_id = ${systemRef})`);
  const unitConds = [`us.system_id IN (SELECT s.id FROM systems s WHERE ${systemConds.join(' AND ')})`];
  if (!systemRef) unitConds.push(levelRef ? `(us.system_id IS NULL AND us.level_id = ${levelRef})` : 'us.system_id IS NULL');

  // A blocked unit's first READINESS_UNIT_BLOCKERS_MAX blockers (by number) and their total: the
  // partial index findings_unit_blocking read in order for that unit, stopping early.
  const unitsSql = `WITH ${unitState}
    SELECT us.unit_id, us.tag, us.kind, us.level_id, us.system_id, us.checked, us.ready,
           coalesce(ub.blockers, '[]'::json) AS blockers, ub.total AS blockers_total
      FROM unit_state us
      LEFT JOIN LATERAL (
        SELECT max(f.total) AS total, json_agg(${blockerJson('ci')} ORDER BY f.number) AS blockers
          FROM (SELECT f.id, f.number, f.severity, f.status, f.unit_id, f.catalogue_item_id, count(*) OVER () AS total
                  FROM findings f
                 WHERE ${blocking} AND f.unit_id = us.unit_id
                 ORDER BY f.number
                 LIMIT ${READINESS_UNIT_BLOCKERS_MAX}) f
          JOIN catalogue_items ci ON ci.id = f.catalogue_item_id
          JOIN units bu ON bu.id = f.unit_id
      ) ub ON us.blocked
     WHERE ${unitConds.join(' OR ')}
     ORDER BY us.tag, us.unit_id`;
  const systemsSql = `WITH ${unitState}
    SELECT s.id AS system_id, s.name,
           count(us.unit_id) AS units_total,
           count(us.unit_id) FILTER (WHERE us.ready) AS units_ready,
           count(us.unit_id) FILTER (WHERE NOT us.checked) AS units_unchecked
      FROM systems s LEFT JOIN unit_state us ON us.system_id = s.id
     WHERE ${systemConds.join(' AND ')}
     GROUP BY s.id, s.name
     ORDER BY s.name, s.id`;
  const levelsSql = `WITH ${unitState}, level_units AS (
      SELECT us.level_id, count(*) AS units_total, count(*) FILTER (WHERE us.ready) AS units_ready
        FROM unit_state us
       GROUP BY us.level_id
    ), ceiling_items AS (
      SELECT ci.id FROM catalogue_items ci WHERE ci.job_id = $1 AND ci.needs_ceiling_access
    ), ceiling_counts AS (
      -- Index-only on the partial index findings_job_level_unresolved, as on the board.
      SELECT f.level_id, count(*) AS total
        FROM findings f
       WHERE f.job_id = $1 AND f.status IN ('open', 'fix_submitted')${company}
         AND f.catalogue_item_id IN (SELECT id FROM ceiling_items)
       GROUP BY f.level_id
    )
    SELECT lv.id AS level_id, lv.name, lv.position,
           coalesce(lu.units_total, 0) AS units_total, coalesce(lu.units_ready, 0) AS units_ready,
           coalesce(cb.blockers, '[]'::json) AS blockers, cc.total AS blockers_total
      FROM levels lv
      LEFT JOIN level_units lu ON lu.level_id = lv.id
      LEFT JOIN ceiling_counts cc ON cc.level_id = lv.id
      -- The first READINESS_LEVEL_BLOCKERS_MAX by number: findings_job_level_number in order, stopping early.
      LEFT JOIN LATERAL (
        SELECT json_agg(${blockerJson('ci')} ORDER BY f.number) AS blockers
          FROM (SELECT f.* FROM findings f
                 WHERE f.job_id = $1 AND f.level_id = lv.id AND f.status IN ('open', 'fix_submitted')${company}
                   AND f.catalogue_item_id IN (SELECT id FROM ceiling_items)
                 ORDER BY f.number
                 LIMIT ${READINESS_LEVEL_BLOCKERS_MAX}) f
          JOIN catalogue_items ci ON ci.id = f.catalogue_item_id
          LEFT JOIN units bu ON bu.id = f.unit_id
      ) cb ON cc.total > 0
     WHERE ${levelConds.join(' AND ')}
     ORDER BY lv.position, lv.id`;

  const [unitRows, systemRows, levelRows] = await Promise.all([
    selectTuned<UnitStateRow>(sequelize, unitsSql, b.values),
    selectTuned<SystemRow>(sequelize, systemsSql, b.values),
    selectTuned<LevelRow>(sequelize, levelsSql, b.values),
  ]);

  const unitDto = (r: UnitStateRow): UnitReadiness => ({
    unitId: r.unit_id,
    tag: r.tag,
    kind: r.kind,
    levelId: r.level_id,
    systemId: r.system_id,
    checked: Boolean(r.checked),
    ready: Boolean(r.ready),
    blockers: r.blockers,
    ...(num(r.blockers_total) > r.blockers.length ? { blockersTotal: num(r.blockers_total) } : {}),
  });
  const bySystem = new Map<string, UnitReadiness[]>();
  const unitsWithoutSystem: UnitReadiness[] = [];
  for (const r of unitRows) {
    const dto = unitDto(r);
    if (r.system_id === null) unitsWithoutSystem.push(dto);
    else bySystem.set(r.system_id, [...(bySystem.get(r.system_id) ?? []), dto]);
  }
  const systems: SystemReadiness[] = systemRows.map((s) => ({
    systemId: s.system_id,
    name: s.name,
    unitsTotal: num(s.units_total),
    unitsReady: num(s.units_ready),
    unitsUnchecked: num(s.units_unchecked),
    ready: num(s.units_total) > 0 && num(s.units_ready) === num(s.units_total),
    units: bySystem.get(s.system_id) ?? [],
  }));
  const levels: LevelReadiness[] = levelRows.map((l) => ({
    levelId: l.level_id,
    name: l.name,
    position: l.position,
    ceilingReady: l.blockers.length === 0,
    blockers: l.blockers,
    ...(num(l.blockers_total) > l.blockers.length ? { blockersTotal: num(l.blockers_total) } : {}),
    unitsTotal: num(l.units_total),
    unitsReady: num(l.units_ready),
  }));
  return { systems, levels, unitsWithoutSystem, companyScope: scope.companyId };
}

// ---------------------------------------------------------------------------------------------
// Company scorecards
// ---------------------------------------------------------------------------------------------

interface ScorecardRow {
  company_id: string;
  name: string;
  trades: string[];
  accepted: string;
  accepted_first_pass: string;
  median_days: string | number | null;
  returns: string;
}

/**
 * One row per company on the job (by name). Only GC managers and inspectors see it, so it is
 * never company-scoped; `scope.companyId` is honoured anyway (a subcontractor would see their row).
 *
 * Assignment episodes come from finding_events: a finding's history is cut into segments at
 * each 'reassigned' and 'reopened' event; a segment starts at the finding's logged_at (the first)
 * or at that event, and belongs to the company assigned then (the `to` company of the latest
 * reassignment, else the `from` company of the first reassignment, else the finding's company).
 * An 'accepted' event ends its segment: days = accepted.at - segment start; first pass = no
 * 'returned' event in the segment. 'returned' events count for the segment's company.
 * Voided findings are left out.
 */
export async function loadScorecards(sequelize: Sequelize, scope: FindingScope): Promise<ScorecardsResponse> {
  const today = todayIn(scope.timeZone);
  const versions = await readStatVersions(sequelize, scope.jobId);
  const [hist, tallies, unresolved] = await Promise.all([
    cachedStat(sequelize, scope.jobId, ['structure', 'shape', 'history'], `scorecards|${scope.companyId ?? '*'}`, () => loadScorecardHistory(sequelize, scope), versions),
    loadTallies(sequelize, scope.jobId, scope.companyId),
    loadUnresolvedFigures(sequelize, scope.jobId, today, versions),
  ]);
  const live = new Map<string, { open: number; overdue: number; fixesWaiting: number }>();
  const at = (companyId: string) => {
    let c = live.get(companyId);
    if (!c) live.set(companyId, (c = { open: 0, overdue: 0, fixesWaiting: 0 }));
    return c;
  };
  for (const t of tallies) {
    if (t.status === 'open') at(t.company_id).open += t.n;
    if (t.status === 'fix_submitted') at(t.company_id).fixesWaiting += t.n;
  }
  for (const u of unresolved) if (!scope.companyId || u.companyId === scope.companyId) at(u.companyId).overdue += u.overdue;
  const companies: CompanyScorecard[] = hist.map((r) => {
    const accepted = num(r.accepted);
    const firstPass = num(r.accepted_first_pass);
    const now = live.get(r.company_id);
    return {
      companyId: r.company_id,
      name: r.name,
      trade: r.trades[0] ?? null,
      trades: r.trades,
      open: now?.open ?? 0,
      overdue: now?.overdue ?? 0,
      fixesWaiting: now?.fixesWaiting ?? 0,
      accepted,
      acceptedFirstPass: firstPass,
      firstPassRate: accepted === 0 ? null : firstPass / accepted,
      medianDaysToAccept: r.median_days === null ? null : Math.round(Number(r.median_days) * 10) / 10,
      returns: num(r.returns),
    };
  });
  return { companies };
}

/**
 * The history half of the scorecards (accepted fixes, first pass, median days, returns) and the
 * job's companies, from the events: changes only with an accepted / returned / reassigned /
 * reopened event or a finding's shape, so it is cached on those topics by loadScorecards.
 */
async function loadScorecardHistory(sequelize: Sequelize, scope: FindingScope): Promise<ScorecardRow[]> {
  const b = new Bind(scope.jobId);
  const companyJc = companyCond(b, scope, 'jc');
  const sql = `
    WITH special AS (
      -- Findings with a return, reassignment or reopening (few): only these need the windows below.
      SELECT DISTINCT e.finding_id
        FROM finding_events e
       WHERE e.job_id = $1 AND e.kind IN ('returned', 'reassigned', 'reopened')
    ), ev AS (
      -- One pass over each such finding's events in order, read in that order (no sort) from the
      -- partial index finding_events_job_assignment: the latest segment start so far, the companies
      -- of its reassignments so far / in all, and the running count of returns. Events alone: the
      -- finding's columns are joined after the windows (each window is one finding's events, so
      -- leaving out a voided finding afterwards is the same as before).
      SELECT e.finding_id, e.id, e.at, e.kind,
             max(e.at) FILTER (WHERE e.kind IN ('reassigned', 'reopened')) OVER upto AS seg_event_at,
             array_agg(e."to" ->> 'companyId') FILTER (WHERE e.kind = 'reassigned') OVER upto AS reassigned_to,
             array_agg(e."from" ->> 'companyId') FILTER (WHERE e.kind = 'reassigned') OVER whole AS reassigned_from,
             count(*) FILTER (WHERE e.kind = 'returned') OVER upto AS returns_so_far
        FROM finding_events e
       WHERE e.job_id = $1 AND e.kind IN ('accepted', 'returned', 'reassigned', 'reopened')
         AND e.finding_id IN (SELECT finding_id FROM special)
      WINDOW upto AS (PARTITION BY e.finding_id ORDER BY e.at, e.id ROWS UNBOUNDED PRECEDING),
             whole AS (PARTITION BY e.finding_id ORDER BY e.at, e.id ROWS BETWEEN UNBOUNDED PRECEDING AND UNBOUNDED FOLLOWING)
    ), ev_seg AS (
      SELECT ev.*,
             ev.returns_so_far - coalesce(max(ev.returns_so_far) FILTER (WHERE ev.kind IN ('reassigned', 'reopened'))
               OVER (PARTITION BY ev.finding_id ORDER BY ev.at, ev.id ROWS UNBOUNDED PRECEDING), 0) AS returns_in_seg
        FROM ev
    ), seg AS (
      -- Only accepted and returned events are counted below; narrow rows (days precomputed) for the sort.
      SELECT s.kind = 'accepted' AS accepted,
             (extract(epoch FROM (s.at - coalesce(s.seg_event_at, f.logged_at))) / 86400.0)::float8 AS days,
             coalesce(s.reassigned_to[cardinality(s.reassigned_to)]::uuid, s.reassigned_from[1]::uuid, f.company_id) AS company_id,
             s.returns_in_seg
        FROM ev_seg s
        JOIN findings f ON f.id = s.finding_id
       WHERE f.job_id = $1 AND f.status <> 'voided' AND s.kind IN ('accepted', 'returned')
      UNION ALL
      -- Every other finding: its accepted events, in one segment from logging, for its company, no returns.
      SELECT true AS accepted, (extract(epoch FROM (e.at - f.logged_at)) / 86400.0)::float8 AS days, f.company_id, 0 AS returns_in_seg
        FROM finding_events e
        JOIN findings f ON f.id = e.finding_id
       WHERE e.job_id = $1 AND e.kind = 'accepted' AND f.job_id = $1 AND f.status <> 'voided'
         AND NOT EXISTS (SELECT 1 FROM special sp WHERE sp.finding_id = e.finding_id)
    ), hist AS (
      SELECT company_id,
             count(*) FILTER (WHERE accepted) AS accepted,
             count(*) FILTER (WHERE accepted AND returns_in_seg = 0) AS accepted_first_pass,
             percentile_cont(0.5) WITHIN GROUP (ORDER BY days) FILTER (WHERE accepted) AS median_days,
             count(*) FILTER (WHERE NOT accepted) AS returns
        FROM seg
       GROUP BY company_id
    )
    SELECT c.id AS company_id, c.name, jc.trades,
           coalesce(hist.accepted, 0) AS accepted, coalesce(hist.accepted_first_pass, 0) AS accepted_first_pass,
           hist.median_days, coalesce(hist.returns, 0) AS returns
      FROM job_companies jc
      JOIN companies c ON c.id = jc.company_id
      LEFT JOIN hist ON hist.company_id = jc.company_id
     WHERE jc.job_id = $1${companyJc}
     ORDER BY c.name, c.id`;
  return selectTuned<ScorecardRow>(sequelize, sql, b.values);
}

// ---------------------------------------------------------------------------------------------
// Recurring defects
// ---------------------------------------------------------------------------------------------

/** The job's thresholds, defaults filled in. */
export function recurringThresholdsOf(stored: Partial<RecurringThresholdsView> | null | undefined): RecurringThresholdsView {
  return {
    minUnits: typeof stored?.minUnits === 'number' ? stored.minUnits : DEFAULT_RECURRING_THRESHOLDS.minUnits,
    minShare: typeof stored?.minShare === 'number' ? stored.minShare : DEFAULT_RECURRING_THRESHOLDS.minShare,
  };
}

interface RecurringRow {
  catalogue_item_id: string;
  code: string;
  title: string;
  unit_count: string;
  checked_units: string;
  share: number;
  recurring_since: Date;
  by_level: { levelId: string; name: string; count: number }[];
  by_company: { companyId: string; name: string; count: number }[];
}

/**
 * Defect types found on at least minUnits distinct units AND on at least minShare of the looked-at
 * units of the kinds the type applies to: share = unitCount / checkedUnits, where checkedUnits =
 * units of those kinds whose latest check is complete, plus the units the type was found on that
 * are not among them (a unit a finding was logged on was looked at), so the share never exceeds 1. Findings without a unit and voided findings are left out. For a
 * subcontractor every count covers their company's findings only (the denominator stays the
 * job's checked units). recurringSince = logged_at of the finding that brought the distinct-unit
 * count to minUnits (each unit counted at its first finding of the type), given the share holds now.
 */
export async function loadRecurring(sequelize: Sequelize, scope: FindingScope): Promise<RecurringResponse> {
  // Depends on the findings' shape (type, unit, company, logged time, voided) and the structure
  // (units, checks, thresholds, names), not on fixes or re-inspections.
  return cachedStat(sequelize, scope.jobId, ['structure', 'shape'], `recurring|${scope.companyId ?? '*'}`, () => computeRecurring(sequelize, scope));
}

async function computeRecurring(sequelize: Sequelize, scope: FindingScope): Promise<RecurringResponse> {
  const [job] = await select<{ recurring_thresholds: Partial<RecurringThresholdsView> | null }>(
    sequelize,
    `SELECT recurring_thresholds FROM jobs WHERE id = $1`,
    [scope.jobId],
  );
  const thresholds = recurringThresholdsOf(job?.recurring_thresholds);
  const b = new Bind(scope.jobId);
  const company = companyCond(b, scope);
  const minUnits = b.add(thresholds.minUnits);
  const minShare = b.add(String(thresholds.minShare));
  const sql = `
    WITH ${LATEST_CHECK_CTE}, checked_by_kind AS MATERIALIZED (
      SELECT u.kind, count(*) AS n
        FROM units u JOIN latest_check lc ON lc.unit_id = u.id AND lc.complete
       WHERE u.job_id = $1
       GROUP BY u.kind
    ), per_unit_company AS MATERIALIZED (
      SELECT f.catalogue_item_id, f.unit_id, f.company_id, min(f.logged_at) AS first_at
        FROM findings f
       WHERE f.job_id = $1 AND f.status <> 'voided' AND f.unit_id IS NOT NULL${company}
       GROUP BY f.catalogue_item_id, f.unit_id, f.company_id
    ), first_per_unit AS MATERIALIZED (
      SELECT catalogue_item_id, unit_id, min(first_at) AS first_at
        FROM per_unit_company
       GROUP BY catalogue_item_id, unit_id
    ), ranked AS (
      SELECT catalogue_item_id, first_at,
             row_number() OVER (PARTITION BY catalogue_item_id ORDER BY first_at, unit_id) AS nth,
             count(*) OVER (PARTITION BY catalogue_item_id) AS unit_count
        FROM first_per_unit
    ), looked_at AS (
      -- Per type, in one pass: the units it was found on that are not checked units of its kinds.
      SELECT fu2.catalogue_item_id, count(*) AS n
        FROM first_per_unit fu2
        JOIN units u2 ON u2.id = fu2.unit_id
        JOIN catalogue_items ci2 ON ci2.id = fu2.catalogue_item_id
        LEFT JOIN latest_check lc2 ON lc2.unit_id = u2.id
       WHERE NOT (coalesce(lc2.complete, false) AND u2.kind = ANY (ci2.unit_kinds))
       GROUP BY fu2.catalogue_item_id
    ), shares AS (
      SELECT r.catalogue_item_id, r.unit_count, r.first_at AS recurring_since, ci.code, ci.title,
             coalesce((SELECT sum(k.n) FROM checked_by_kind k WHERE k.kind = ANY (ci.unit_kinds)), 0)
             + coalesce(la.n, 0) AS checked_units
        FROM ranked r
        JOIN catalogue_items ci ON ci.id = r.catalogue_item_id
        LEFT JOIN looked_at la ON la.catalogue_item_id = r.catalogue_item_id
       WHERE r.nth = ${minUnits}::int
    ), recurring AS MATERIALIZED (
      SELECT s.*, s.unit_count::numeric / greatest(s.checked_units, 1) AS share
        FROM shares s
    ), by_level AS (
      SELECT x.catalogue_item_id, json_agg(json_build_object('levelId', x.level_id, 'name', x.name, 'count', x.n) ORDER BY x.position, x.level_id) AS list
        FROM (SELECT fu.catalogue_item_id, u.level_id, lv.name, lv.position, count(*) AS n
                FROM first_per_unit fu
                JOIN recurring r ON r.catalogue_item_id = fu.catalogue_item_id AND r.share >= ${minShare}::numeric
                JOIN units u ON u.id = fu.unit_id
                JOIN levels lv ON lv.id = u.level_id
               GROUP BY fu.catalogue_item_id, u.level_id, lv.name, lv.position) x
       GROUP BY x.catalogue_item_id
    ), by_company AS (
      SELECT y.catalogue_item_id, json_agg(json_build_object('companyId', y.company_id, 'name', y.name, 'count', y.n) ORDER BY y.name, y.company_id) AS list
        FROM (SELECT pc.catalogue_item_id, pc.company_id, c.name, count(*) AS n
                FROM per_unit_company pc
                JOIN recurring r ON r.catalogue_item_id = pc.catalogue_item_id AND r.share >= ${minShare}::numeric
                JOIN companies c ON c.id = pc.company_id
               GROUP BY pc.catalogue_item_id, pc.company_id, c.name) y
       GROUP BY y.catalogue_item_id
    )
    SELECT r.catalogue_item_id, r.code, r.title, r.unit_count, r.checked_units, r.share::float8 AS share, r.recurring_since,
           bl.list AS by_level, bc.list AS by_company
      FROM recurring r
      LEFT JOIN by_level bl ON bl.catalogue_item_id = r.catalogue_item_id
      LEFT JOIN by_company bc ON bc.catalogue_item_id = r.catalogue_item_id
     WHERE r.share >= ${minShare}::numeric
     ORDER BY r.unit_count DESC, r.code, r.catalogue_item_id`;
  const rows = await selectTuned<RecurringRow>(sequelize, sql, b.values);
  const items: RecurringDefect[] = rows.map((r) => ({
    catalogueItemId: r.catalogue_item_id,
    code: r.code,
    title: r.title,
    unitCount: num(r.unit_count),
    checkedUnits: num(r.checked_units),
    share: Number(r.share),
    recurringSince: new Date(r.recurring_since).toISOString(),
    byLevel: (r.by_level ?? []).map((x) => ({ ...x, count: Number(x.count) })),
    byCompany: (r.by_company ?? []).map((x) => ({ ...x, count: Number(x.count) })),
  }));
  return { thresholds, items, companyScope: scope.companyId };
}

// ---------------------------------------------------------------------------------------------
// Trend
// ---------------------------------------------------------------------------------------------

/**
 * Daily counts of findings in status open and fix_submitted at the end of each day (job time
 * zone), for `days` days ending today. Rebuilt from finding_events: every event whose `to` has a
 * status moves the finding from `from.status` (null for 'logged') to `to.status`, as every write
 * path records them (routes/correction.ts, routes/findings.ts, the demo seed); the count at the
 * end of a day is the running sum (window function) of those moves up to that day, and moves
 * before the first day all land on the first day.
 * The level and company are the finding's current ones. Null when `levelId` is not on the job.
 */
export async function loadTrend(sequelize: Sequelize, scope: FindingScope, query: TrendQuery = {}): Promise<TrendResponse | null> {
  const days = query.days ?? TREND_DAYS_DEFAULT;
  const today = todayIn(scope.timeZone);
  const start = addDays(today, -(days - 1));
  const yesterday = addDays(today, -1);
  if (query.levelId) {
    const [ok] = await select<{ ok: boolean }>(sequelize, `SELECT EXISTS (SELECT 1 FROM levels WHERE job_id = $1 AND id = $2::uuid) AS ok`, [
      scope.jobId,
      query.levelId,
    ]);
    if (!ok?.ok) return null;
  }
  // The days before today only change with a back-dated event or a finding moved to another
  // level or company (topics past, moved), so they are cached; today's moves are added live.
  // Right after midnight an event dated just before it may still be committing: no cache then.
  const pastStart = start < today ? start : yesterday;
  const computePast = () => trendSeries(sequelize, scope, query.levelId, pastStart, yesterday);
  const past =
    minutesIntoDay(scope.timeZone) < 5
      ? await computePast()
      : await cachedStat(
          sequelize,
          scope.jobId,
          ['structure', 'moved', 'past'],
          `trend|${scope.companyId ?? '*'}|${query.levelId ?? '*'}|${scope.timeZone}|${pastStart}|${yesterday}`,
          computePast,
        );
  const moves = await trendSeries(sequelize, scope, query.levelId, today, today, { onlyFrom: today });
  const base = past.length ? past[past.length - 1]! : { open: 0, fixSubmitted: 0 };
  const delta = moves[0] ?? { open: 0, fixSubmitted: 0 };
  const points = past.filter((p) => p.date >= start).map((p) => ({ ...p }));
  points.push({ date: today, open: base.open + delta.open, fixSubmitted: base.fixSubmitted + delta.fixSubmitted });
  return { levelId: query.levelId ?? null, points, companyScope: scope.companyId };
}

/** Minutes since midnight now in `timeZone`. */
function minutesIntoDay(timeZone: string): number {
  const parts = new Intl.DateTimeFormat('en-GB', { timeZone, hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }).formatToParts(new Date());
  const get = (type: string) => Number(parts.find((p) => p.type === type)?.value ?? 0);
  return get('hour') * 60 + get('minute');
}

/**
 * Counts of findings in status open and fix_submitted at the end of each day from `from` to `to`
 * (job time zone), from the events: every event whose `to` has a status moves the finding from
 * `from.status` (null for 'logged') to `to.status`, as every write path records them; the count
 * at the end of a day is the running sum of those moves up to that day, and moves before `from`
 * all land on `from`. With `onlyFrom`, only the moves dated on or after that day are summed (the
 * change over those days, read from finding_events_job_at). The level and company are the
 * finding's current ones.
 */
async function trendSeries(
  sequelize: Sequelize,
  scope: FindingScope,
  levelId: string | undefined,
  from: string,
  to: string,
  options: { onlyFrom?: string } = {},
): Promise<{ date: string; open: number; fixSubmitted: number }[]> {
  const b = new Bind(scope.jobId);
  const tz = b.add(scope.timeZone);
  const startRef = `${b.add(from)}::date`;
  const todayRef = `${b.add(to)}::date`;
  const levelCond = levelId ? ` AND f.level_id = ${b.add(levelId)}::uuid` : '';
  const company = companyCond(b, scope);
  const since = options.onlyFrom ? ` AND e.at >= (${b.add(options.onlyFrom)}::date::timestamp AT TIME ZONE ${tz})` : '';
  // The finding's level and company are needed only to filter; the job-wide trend reads events alone.
  const join = levelCond || company ? `JOIN findings f ON f.id = e.finding_id AND f.job_id = $1${levelCond}${company}` : '';
  const sql = `
    WITH per_day AS (
      SELECT greatest((e.at AT TIME ZONE ${tz})::date, ${startRef}) AS day,
             sum((e."to" ->> 'status' = 'open')::int - (coalesce(e."from" ->> 'status', '') = 'open')::int) AS d_open,
             sum((e."to" ->> 'status' = 'fix_submitted')::int - (coalesce(e."from" ->> 'status', '') = 'fix_submitted')::int) AS d_fix
        FROM finding_events e ${join}
       WHERE e.job_id = $1 AND (e."to" ->> 'status') IS NOT NULL AND (e.at AT TIME ZONE ${tz})::date <= ${todayRef}${since}
       GROUP BY 1
    ), days AS (
      SELECT d::date AS day FROM generate_series(${startRef}, ${todayRef}, interval '1 day') AS d
    )
    SELECT to_char(days.day, 'YYYY-MM-DD') AS date,
           sum(coalesce(per_day.d_open, 0)) OVER (ORDER BY days.day) AS open,
           sum(coalesce(per_day.d_fix, 0)) OVER (ORDER BY days.day) AS fix_submitted
      FROM days LEFT JOIN per_day ON per_day.day = days.day
     ORDER BY days.day`;
  const rows = await select<{ date: string; open: string; fix_submitted: string }>(sequelize, sql, b.values);
  return rows.map((r) => ({ date: r.date, open: num(r.open), fixSubmitted: num(r.fix_submitted) }));
}
