/**
 * A level's units with their state at a glance, and the level's coverage (units whose current
 * unit check is complete, of all units on the level). One SQL statement each; the unit's current
 * check is its latest (checked_at, id). Filters are bound parameters, never request text in SQL.
 *
 * States (shared/schemas/findings.ts UNIT_WALK_STATES):
 *   open_findings when the unit has an open or fix-submitted finding, whatever its checks;
 *   else not_checked (no check), in_progress (latest check not complete) or checked_ok.
 */
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import type { Coverage, UnitWalkState, WalkUnitDto } from '../../shared/schemas/findings';
import type { Severity, UnitKindKey } from '../../shared/words';
import { likeContains } from './records';
import { SEVERITY_BY_RANK, SEVERITY_RANK_SQL } from './findings';

interface WalkUnitRow {
  id: string;
  tag: string;
  kind: UnitKindKey;
  model_name: string | null;
  space_id: string | null;
  space_name: string | null;
  system_id: string | null;
  system_name: string | null;
  check_id: string | null;
  checked_at: Date | null;
  complete: boolean | null;
  checker_id: string | null;
  checker_name: string | null;
  open_findings: string | number;
  worst: number | null;
  state: UnitWalkState;
}

export interface WalkUnitFilters {
  spaceId?: string;
  systemId?: string;
  kind?: string;
  q?: string;
  state?: UnitWalkState;
  unitId?: string;
}

/** The rows of units on one level with their state; `where` adds conditions on those rows. */
function baseQuery(): string {
  return `
    WITH lvl_units AS (
      SELECT u.* FROM units u WHERE u.job_id = $1 AND u.level_id = $2
    ), latest AS (
      SELECT DISTINCT ON (uc.unit_id) uc.unit_id, uc.id, uc.checked_at, uc.complete, uc.checked_by
        FROM unit_checks uc JOIN lvl_units lu ON lu.id = uc.unit_id
       ORDER BY uc.unit_id, uc.checked_at DESC, uc.id DESC
    ), open_f AS (
      SELECT f.unit_id, count(*) AS n, min(${SEVERITY_RANK_SQL('f.severity')}) AS worst
        FROM findings f
       WHERE f.job_id = $1 AND f.level_id = $2 AND f.unit_id IS NOT NULL AND f.status IN ('open', 'fix_submitted')
       GROUP BY f.unit_id
    ), rows AS (
      SELECT u.id, u.tag, u.kind, m.name AS model_name, u.space_id, s.name AS space_name,
             u.system_id, sy.name AS system_name,
             l.id AS check_id, l.checked_at, l.complete, l.checked_by AS checker_id, cu.name AS checker_name,
             coalesce(o.n, 0) AS open_findings, o.worst,
             CASE WHEN coalesce(o.n, 0) > 0 THEN 'open_findings'
                  WHEN l.id IS NULL THEN 'not_checked'
                  WHEN NOT l.complete THEN 'in_progress'
                  ELSE 'checked_ok' END AS state
        FROM lvl_units u
        LEFT JOIN unit_models m ON m.id = u.model_id
        LEFT JOIN spaces s ON s.id = u.space_id
        LEFT JOIN systems sy ON sy.id = u.system_id
        LEFT JOIN latest l ON l.unit_id = u.id
        LEFT JOIN users cu ON cu.id = l.checked_by
        LEFT JOIN open_f o ON o.unit_id = u.id
    )`;
}

function filterSql(filters: WalkUnitFilters, bind: unknown[], withState: boolean): string {
  const conds: string[] = [];
  const add = (sql: (n: number) => string, value: unknown) => {
    bind.push(value);
    conds.push(sql(bind.length));
  };
  if (filters.unitId) add((n) => `id = $${n}`, filters.unitId);
  if (filters.spaceId) add((n) => `space_id = $${n}`, filters.spaceId);
  if (filters.systemId) add((n) => `system_id = $${n}`, filters.systemId);
  if (filters.kind) add((n) => `kind = $${n}`, filters.kind);
  if (filters.q) add((n) => `tag ILIKE $${n}`, likeContains(filters.q));
  if (withState && filters.state) add((n) => `state = $${n}`, filters.state);
  return conds.length ? `WHERE ${conds.join(' AND ')}` : '';
}

function present(row: WalkUnitRow): WalkUnitDto {
  return {
    id: row.id,
    tag: row.tag,
    kind: row.kind,
    modelName: row.model_name,
    spaceId: row.space_id,
    spaceName: row.space_name,
    systemId: row.system_id,
    systemName: row.system_name,
    state: row.state,
    openFindings: Number(row.open_findings),
    worstSeverity: row.worst === null ? null : ((SEVERITY_BY_RANK[Number(row.worst)] ?? null) as Severity | null),
    lastCheck:
      row.check_id && row.checked_at && row.checker_id
        ? {
            id: row.check_id,
            checkedAt: new Date(row.checked_at).toISOString(),
            checkedBy: { id: row.checker_id, name: row.checker_name ?? '' },
            complete: Boolean(row.complete),
          }
        : null,
  };
}

/** One page of a level's units (ordered by tag, id), after (tag, id) of the cursor. */
export async function walkUnitsPage(
  sequelize: Sequelize,
  jobId: string,
  levelId: string,
  filters: WalkUnitFilters,
  page: { limit: number; after: { value: string | number; id: string } | null },
  transaction?: Transaction,
): Promise<WalkUnitDto[]> {
  const bind: unknown[] = [jobId, levelId];
  let where = filterSql(filters, bind, true);
  if (page.after) {
    bind.push(String(page.after.value), page.after.id);
    const a = bind.length - 1;
    where += `${where ? ' AND' : 'WHERE'} (tag > $${a} OR (tag = $${a} AND id > $${a + 1}))`;
  }
  bind.push(page.limit + 1);
  const rows = await sequelize.query<WalkUnitRow>(`${baseQuery()} SELECT * FROM rows ${where} ORDER BY tag, id LIMIT $${bind.length}`, {
    bind,
    type: QueryTypes.SELECT,
    transaction,
  });
  return rows.map(present);
}

/** Counts per state over the filters (except state): total, checked, not checked, in progress, with open findings. */
export async function walkUnitCounts(
  sequelize: Sequelize,
  jobId: string,
  levelId: string,
  filters: WalkUnitFilters,
  transaction?: Transaction,
): Promise<Coverage & { notChecked: number }> {
  const bind: unknown[] = [jobId, levelId];
  const where = filterSql(filters, bind, false);
  const [row] = await sequelize.query<Record<string, string>>(
    `${baseQuery()}
     SELECT count(*) AS total,
            count(*) FILTER (WHERE complete IS TRUE) AS checked,
            count(*) FILTER (WHERE check_id IS NULL) AS not_checked,
            count(*) FILTER (WHERE complete IS FALSE) AS in_progress,
            count(*) FILTER (WHERE open_findings > 0) AS with_open
       FROM rows ${where}`,
    { bind, type: QueryTypes.SELECT, transaction },
  );
  return {
    total: Number(row?.total ?? 0),
    checked: Number(row?.checked ?? 0),
    notChecked: Number(row?.not_checked ?? 0),
    inProgress: Number(row?.in_progress ?? 0),
    withOpenFindings: Number(row?.with_open ?? 0),
  };
}

/** The level's coverage, whatever the filters. */
export async function levelCoverage(sequelize: Sequelize, jobId: string, levelId: string, transaction?: Transaction): Promise<Coverage> {
  const c = await walkUnitCounts(sequelize, jobId, levelId, {}, transaction);
  return { checked: c.checked, total: c.total, withOpenFindings: c.withOpenFindings, inProgress: c.inProgress };
}

/** One unit's state (same rules as the level list). */
export async function walkUnitState(
  sequelize: Sequelize,
  jobId: string,
  levelId: string,
  unitId: string,
  transaction?: Transaction,
): Promise<WalkUnitDto | null> {
  const [unit] = await walkUnitsPage(sequelize, jobId, levelId, { unitId }, { limit: 1, after: null }, transaction);
  return unit ?? null;
}
