/**
 * The levels board: per level in building order, open / critical / major / fix submitted / closed
 * counts and their total (the three statuses partition it), unresolved and overdue, units checked
 * and ceiling blockers, and the job's totals (docs/api-board.md).
 */
import type { Sequelize } from 'sequelize';
import type { BoardCounts, BoardLevelRow, BoardResponse } from '../../../shared/schemas/board';
import { CEILING_UNIT_KINDS, ceilingState, type CeilingFacts } from '../../../shared/rules/ceilings';
import { todayIn } from '../../../shared/rules/dates';
import { daysWaiting } from '../../../shared/rules/waiting';
import { cachedStat, readStatVersions, type StatVersions } from '../statCache';
import type { FindingScope } from '../findingQueries';
import { latestCheckJoin, loadTallies, loadUnresolvedFigures, loadWaitingFixes, num, select } from './common';
import { levelTests, loadTestFacts } from './testReadiness';

/** The ceiling verdict of a level: its state, and "ready" as a flag for the screens that only need that. */
export function ceilingOf(facts: CeilingFacts) {
  const state = ceilingState(facts);
  return { ceilingState: state, ceilingReady: state === 'ready' };
}

const COUNT_KEYS = ['open', 'openCritical', 'openMajor', 'fixSubmitted', 'closed', 'total', 'unresolved', 'overdue', 'unitsTotal', 'unitsChecked'] as const;

interface CoverageRow {
  level_id: string;
  name: string;
  position: number;
  units_total: number;
  units_checked: number;
  /** Units in or above the ceiling (shared/rules/ceilings.ts), those of them not checked (nor excluded), and those excluded instead. */
  ceiling_units: number;
  ceiling_unchecked: number;
  ceiling_excluded: number;
}

/** The job's levels in building order with their units and checked units (cached on topic structure). */
async function loadCoverage(sequelize: Sequelize, jobId: string, versions?: StatVersions): Promise<CoverageRow[]> {
  return cachedStat(sequelize, jobId, ['structure'], 'coverage-with-ceiling-exclusions', async () => {
    const rows = await select<{
      level_id: string;
      name: string;
      position: number;
      units_total: string | null;
      units_checked: string | null;
      ceiling_units: string | null;
      ceiling_unchecked: string | null;
      ceiling_excluded: string | null;
    }>(
      sequelize,
      `WITH uc AS (
        SELECT u.level_id, count(*) AS units_total, count(*) FILTER (WHERE lc.complete) AS units_checked,
               count(*) FILTER (WHERE u.kind = ANY ($2::text[])) AS ceiling_units,
               count(*) FILTER (WHERE u.kind = ANY ($2::text[]) AND NOT coalesce(lc.complete, false) AND u.ceiling_excluded_reason IS NULL) AS ceiling_unchecked,
               count(*) FILTER (WHERE u.kind = ANY ($2::text[]) AND NOT coalesce(lc.complete, false) AND u.ceiling_excluded_reason IS NOT NULL) AS ceiling_excluded
          FROM units u
          ${latestCheckJoin('u')}
         WHERE u.job_id = $1
         GROUP BY u.level_id
      )
      SELECT lv.id AS level_id, lv.name, lv.position, uc.units_total, uc.units_checked, uc.ceiling_units, uc.ceiling_unchecked, uc.ceiling_excluded
        FROM levels lv LEFT JOIN uc ON uc.level_id = lv.id
       WHERE lv.job_id = $1
       ORDER BY lv.position, lv.id`,
      [jobId, CEILING_UNIT_KINDS],
    );
    return rows.map((r) => ({
      level_id: r.level_id,
      name: r.name,
      position: r.position,
      units_total: num(r.units_total),
      units_checked: num(r.units_checked),
      ceiling_units: num(r.ceiling_units),
      ceiling_unchecked: num(r.ceiling_unchecked),
      ceiling_excluded: num(r.ceiling_excluded),
    }));
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
  const now = new Date();
  const today = todayIn(scope.timeZone, now);
  const versions = await readStatVersions(sequelize, scope.jobId);
  const [coverage, tallies, unresolved, waiting, testFacts] = await Promise.all([
    loadCoverage(sequelize, scope.jobId, versions),
    loadTallies(sequelize, scope.jobId, scope.companyId),
    loadUnresolvedFigures(sequelize, scope.jobId, today, versions),
    loadWaitingFixes(sequelize, scope.jobId),
    // Units, systems and the job's companies (structure) and test records (tests), per company scope.
    cachedStat(sequelize, scope.jobId, ['structure', 'tests'], `testFacts|${scope.companyId ?? 'all'}`, () => loadTestFacts(sequelize, scope), versions),
  ]);
  // The oldest fix waiting for the inspector per level (in the caller's scope), and in the job.
  const oldestByLevel = new Map<string, Date>();
  let oldest: Date | null = null;
  for (const w of waiting) {
    if (scope.companyId && w.companyId !== scope.companyId) continue;
    const prev = oldestByLevel.get(w.levelId);
    if (!prev || w.oldestSubmittedAt < prev) oldestByLevel.set(w.levelId, w.oldestSubmittedAt);
    if (!oldest || w.oldestSubmittedAt < oldest) oldest = w.oldestSubmittedAt;
  }
  const waitedDays = (since: Date | null | undefined) => (since ? daysWaiting(since, scope.timeZone, now) : null);
  const zero = () => ({ open: 0, open_critical: 0, open_major: 0, fix_submitted: 0, closed: 0, total: 0, overdue: 0, ceiling_blockers: 0 });
  const perLevel = new Map<string, ReturnType<typeof zero>>();
  const at = (levelId: string) => {
    let c = perLevel.get(levelId);
    if (!c) perLevel.set(levelId, (c = zero()));
    return c;
  };
  for (const t of tallies) {
    const c = at(t.level_id);
    // The total counts every status but voided by itself (not as the sum of the three below), so a
    // status outside open / fix submitted / closed would show as a row that does not add up.
    if (t.status !== 'voided') c.total += t.n;
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
  const levels: BoardLevelRow[] = rows.map((r) => {
    const ceilingTestBlockers = levelTests(testFacts, r.level_id).testBlockers.length;
    return {
    levelId: r.level_id,
    name: r.name,
    position: r.position,
    open: num(r.open),
    openCritical: num(r.open_critical),
    openMajor: num(r.open_major),
    fixSubmitted: num(r.fix_submitted),
    closed: num(r.closed),
    total: num(r.total),
    unresolved: num(r.open) + num(r.fix_submitted),
    overdue: num(r.overdue),
    unitsTotal: num(r.units_total),
    unitsChecked: num(r.units_checked),
    ceilingBlockers: num(r.ceiling_blockers),
    ceilingUnits: r.ceiling_units,
    ceilingUnitsUnchecked: r.ceiling_unchecked,
    ceilingUnitsExcluded: r.ceiling_excluded,
    longestWaitDays: waitedDays(oldestByLevel.get(r.level_id)),
    ceilingTestBlockers,
    // Test records the level waits for (testReadiness.ts) block its ceilings as findings do.
    ...ceilingOf({ ceilingUnits: r.ceiling_units, ceilingUnitsUnchecked: r.ceiling_unchecked, blockers: num(r.ceiling_blockers) + ceilingTestBlockers }),
    };
  });
  const totals = Object.fromEntries(COUNT_KEYS.map((k) => [k, 0])) as unknown as BoardCounts;
  for (const l of levels) for (const k of COUNT_KEYS) totals[k] += l[k];
  return { levels, totals, longestWaitDays: waitedDays(oldest), today, companyScope: scope.companyId };
}
