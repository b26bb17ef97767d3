/**
 * Readiness for startup (units, systems) and for closing ceilings (levels) (docs/api-board.md).
 */
import type { Sequelize } from 'sequelize';
import {
  type ExcludedCeilingUnit,
  type LevelReadiness,
  type ReadinessBlocker,
  type ReadinessQuery,
  READINESS_LEVEL_BLOCKERS_MAX,
  READINESS_UNIT_BLOCKERS_MAX,
  type SystemReadiness,
  type UnitReadiness,
} from '../../../shared/schemas/board';
import { CEILING_UNIT_KINDS } from '../../../shared/rules/ceilings';
import type { ReadinessWithTests } from '../../../shared/schemas/testRecords';
import type { UnitKindKey } from '../../../shared/words';
import type { FindingScope } from '../findingQueries';
import { cachedStat, type StatTopic } from '../statCache';
import { Bind, companyCond, latestCheckJoin, num, select, selectTuned } from './common';
import { ceilingOf } from './levels';
import { loadTestFacts, withTests } from './testReadiness';

/** JSON of one blocker row (aliases f, `item` = where code and title are, bu = the finding's unit). */
const blockerJson = (item: string) => `json_build_object('findingId', f.id, 'number', f.number, 'code', ${item}.code, 'title', coalesce(f.title, ${item}.title),
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
  ceiling_units: string;
  ceiling_unchecked: string;
  ceiling_excluded: string;
  unchecked_units: { unitId: string; tag: string; version: number }[];
  excluded_units: ExcludedCeilingUnit[];
  blockers: ReadinessBlocker[];
  blockers_total: string | null;
}

/** What readiness reads (docs/api-board.md "Speed"); each table raises one of these topics. */
const READINESS_TOPICS: readonly StatTopic[] = ['structure', 'blockers', 'tests'];

/**
 * Readiness for startup (units, systems) and for closing ceilings (levels). With `levelId`: that
 * level, the systems with a unit on it, and its units without a system; with `systemId`: that
 * system and the levels it has units on. A system is always judged (and listed) with ALL its units.
 * Null when the given level or system is not on the job.
 *
 * Kept in the exact cache (statCache.ts) per job, company scope and filter, and served only while
 * none of what it reads changed: units, unit checks, levels, systems, catalogue items, the job's
 * companies and settings, the name of whoever excluded a unit (topic structure), the findings'
 * blocker columns (blockers) and test records (tests). A level's answer is computed on its own on a
 * miss (about a tenth of the job's), not cut from the job's.
 */
export async function loadReadiness(sequelize: Sequelize, scope: FindingScope, query: ReadinessQuery = {}): Promise<ReadinessWithTests | null> {
  // The answer depends on the caller only through the company scope: keyed by it, so a
  // subcontractor's answer is never served to anyone outside their company.
  const key = `readiness|${scope.companyId ?? 'all'}|${query.levelId ?? ''}|${query.systemId ?? ''}`;
  return cachedStat(sequelize, scope.jobId, READINESS_TOPICS, key, () => computeReadiness(sequelize, scope, query));
}

/** Readiness computed afresh in PostgreSQL (loadReadiness's definition; narrowed in SQL by the query). */
async function computeReadiness(sequelize: Sequelize, scope: FindingScope, query: ReadinessQuery = {}): Promise<ReadinessWithTests | null> {
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
             (coalesce(lc.complete, false) AND ub.unit_id IS NULL) AS ready,
             u.version, u.ceiling_excluded_reason, u.ceiling_excluded_by, u.ceiling_excluded_at
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
          FROM (SELECT f.id, f.number, f.severity, f.status, f.unit_id, f.catalogue_item_id, f.title, count(*) OVER () AS total
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
  // The kinds are the code's own constants (shared/rules/ceilings.ts), never request values.
  const ceilingKinds = `ARRAY[${CEILING_UNIT_KINDS.map((k) => `'${k}'`).join(', ')}]::text[]`;
  const levelsSql = `WITH ${unitState}, level_units AS (
      SELECT us.level_id, count(*) AS units_total, count(*) FILTER (WHERE us.ready) AS units_ready,
             count(*) FILTER (WHERE us.kind = ANY (${ceilingKinds})) AS ceiling_units,
             count(*) FILTER (WHERE us.kind = ANY (${ceilingKinds}) AND NOT us.checked AND us.ceiling_excluded_reason IS NULL) AS ceiling_unchecked,
             count(*) FILTER (WHERE us.kind = ANY (${ceilingKinds}) AND NOT us.checked AND us.ceiling_excluded_reason IS NOT NULL) AS ceiling_excluded,
             (array_agg(json_build_object('unitId', us.unit_id, 'tag', us.tag, 'version', us.version) ORDER BY us.tag, us.unit_id)
                FILTER (WHERE us.kind = ANY (${ceilingKinds}) AND NOT us.checked AND us.ceiling_excluded_reason IS NULL))[1:${READINESS_LEVEL_BLOCKERS_MAX}] AS unchecked_units,
             (array_agg(json_build_object('unitId', us.unit_id, 'tag', us.tag, 'version', us.version, 'reason', us.ceiling_excluded_reason,
                                          'by', json_build_object('id', ex.id, 'name', ex.name),
                                          'at', to_char(us.ceiling_excluded_at AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"'))
                        ORDER BY us.tag, us.unit_id)
                FILTER (WHERE us.kind = ANY (${ceilingKinds}) AND NOT us.checked AND us.ceiling_excluded_reason IS NOT NULL))[1:${READINESS_LEVEL_BLOCKERS_MAX}] AS excluded_units
        FROM unit_state us
        LEFT JOIN users ex ON ex.id = us.ceiling_excluded_by
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
           coalesce(lu.ceiling_units, 0) AS ceiling_units, coalesce(lu.ceiling_unchecked, 0) AS ceiling_unchecked,
           coalesce(lu.ceiling_excluded, 0) AS ceiling_excluded,
           coalesce(array_to_json(lu.unchecked_units), '[]'::json) AS unchecked_units,
           coalesce(array_to_json(lu.excluded_units), '[]'::json) AS excluded_units,
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

  const [unitRows, systemRows, levelRows, testFacts] = await Promise.all([
    selectTuned<UnitStateRow>(sequelize, unitsSql, b.values),
    selectTuned<SystemRow>(sequelize, systemsSql, b.values),
    selectTuned<LevelRow>(sequelize, levelsSql, b.values),
    loadTestFacts(sequelize, scope),
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
    ...ceilingOf({ ceilingUnits: num(l.ceiling_units), ceilingUnitsUnchecked: num(l.ceiling_unchecked), blockers: num(l.blockers_total) }),
    ceilingUnits: num(l.ceiling_units),
    ceilingUnitsUnchecked: num(l.ceiling_unchecked),
    uncheckedCeilingUnits: l.unchecked_units,
    ceilingUnitsExcluded: num(l.ceiling_excluded),
    excludedCeilingUnits: l.excluded_units,
    blockers: l.blockers,
    ...(num(l.blockers_total) > l.blockers.length ? { blockersTotal: num(l.blockers_total) } : {}),
    unitsTotal: num(l.units_total),
    unitsReady: num(l.units_ready),
  }));
  // Test records hold levels and systems back too (testReadiness.ts).
  return { ...withTests(testFacts, levels, systems), unitsWithoutSystem, companyScope: scope.companyId };
}
