/**
 * Recurring defects: defect types found on many of the looked-at units (docs/api-board.md).
 */
import type { Sequelize } from 'sequelize';
import { DEFAULT_RECURRING_THRESHOLDS } from '../../../shared/schemas/setup';
import {
  type RecurringDefect,
  type RecurringResponse,
  type RecurringThresholdsView,
} from '../../../shared/schemas/board';
import { normalisedTitleSql } from '../../../shared/rules/somethingElse';
import { cachedStat } from '../statCache';
import type { FindingScope } from '../findingQueries';
import { Bind, companyCond, LATEST_CHECK_CTE, num, select, selectTuned } from './common';

/** The job's thresholds, defaults filled in. */
export function recurringThresholdsOf(stored: Partial<RecurringThresholdsView> | null | undefined): RecurringThresholdsView {
  return {
    minUnits: typeof stored?.minUnits === 'number' ? stored.minUnits : DEFAULT_RECURRING_THRESHOLDS.minUnits,
    minShare: typeof stored?.minShare === 'number' ? stored.minShare : DEFAULT_RECURRING_THRESHOLDS.minShare,
  };
}

interface RecurringRow {
  defect_key: string;
  catalogue_item_id: string;
  code: string;
  title: string;
  unit_count: string;
  checked_units: string;
  share: number;
  recurring_since: Date;
  by_level: { levelId: string; name: string; count: number }[];
  by_company: { companyId: string; name: string; count: number }[];
  by_crew: { companyId: string; companyName: string; crewId: string | null; name: string | null; count: number }[];
}

/**
 * Defect types found on at least minUnits distinct units AND on at least minShare of the looked-at
 * units of the kinds the type applies to: share = unitCount / checkedUnits, where checkedUnits =
 * units of those kinds whose latest check is complete, plus the units the type was found on that
 * are not among them (a unit a finding was logged on was looked at), so the share never exceeds 1. Findings without a unit and voided findings are left out. For a
 * subcontractor every count covers their company's findings only (the denominator stays the
 * job's checked units). recurringSince = logged_at of the finding that brought the distinct-unit
 * count to minUnits (each unit counted at its first finding of the type), given the share holds now.
 * byCrew splits each company's units by the crew that installed them (units.installed_by_crew_id),
 * counting a crew only when it is a crew of the company the finding is assigned to: a habit is the
 * crew's when its own company answers for it. Units with no such crew are counted under
 * "crew not recorded" (crewId null) of that company, so a company's crews add up to its count.
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
  // A type of the catalogue recurs as itself; "Something else" recurs by its normalised title.
  const defectKey = `CASE WHEN ci0.is_other THEN 'other:' || ${normalisedTitleSql('f.title')} ELSE f.catalogue_item_id::text END`;
  const sql = `
    WITH ${LATEST_CHECK_CTE}, checked_by_kind AS MATERIALIZED (
      SELECT u.kind, count(*) AS n
        FROM units u JOIN latest_check lc ON lc.unit_id = u.id AND lc.complete
       WHERE u.job_id = $1
       GROUP BY u.kind
    ), per_unit_company AS MATERIALIZED (
      SELECT ${defectKey} AS defect_key, f.catalogue_item_id, f.unit_id, f.company_id, min(f.logged_at) AS first_at,
             (array_agg(f.title ORDER BY f.logged_at, f.id))[1] AS first_title
        FROM findings f JOIN catalogue_items ci0 ON ci0.id = f.catalogue_item_id
       WHERE f.job_id = $1 AND f.status <> 'voided' AND f.unit_id IS NOT NULL${company}
       GROUP BY 1, f.catalogue_item_id, f.unit_id, f.company_id
    ), first_per_unit AS MATERIALIZED (
      SELECT defect_key, catalogue_item_id, unit_id, min(first_at) AS first_at,
             (array_agg(first_title ORDER BY first_at))[1] AS first_title
        FROM per_unit_company
       GROUP BY defect_key, catalogue_item_id, unit_id
    ), ranked AS (
      SELECT defect_key, catalogue_item_id, first_at, first_title,
             row_number() OVER (PARTITION BY defect_key ORDER BY first_at, unit_id) AS nth,
             count(*) OVER (PARTITION BY defect_key) AS unit_count,
             first_value(first_title) OVER (PARTITION BY defect_key ORDER BY first_at, unit_id) AS shown_title
        FROM first_per_unit
    ), looked_at AS (
      -- Per defect, in one pass: the units it was found on that are not checked units of its kinds
      -- (the other type applies to every kind).
      SELECT fu2.defect_key, count(*) AS n
        FROM first_per_unit fu2
        JOIN units u2 ON u2.id = fu2.unit_id
        JOIN catalogue_items ci2 ON ci2.id = fu2.catalogue_item_id
        LEFT JOIN latest_check lc2 ON lc2.unit_id = u2.id
       WHERE NOT (coalesce(lc2.complete, false) AND (ci2.is_other OR u2.kind = ANY (ci2.unit_kinds)))
       GROUP BY fu2.defect_key
    ), shares AS (
      SELECT r.defect_key, r.catalogue_item_id, r.unit_count, r.first_at AS recurring_since, ci.code,
             CASE WHEN ci.is_other THEN r.shown_title ELSE ci.title END AS title,
             coalesce((SELECT sum(k.n) FROM checked_by_kind k WHERE ci.is_other OR k.kind = ANY (ci.unit_kinds)), 0)
             + coalesce(la.n, 0) AS checked_units
        FROM ranked r
        JOIN catalogue_items ci ON ci.id = r.catalogue_item_id
        LEFT JOIN looked_at la ON la.defect_key = r.defect_key
       WHERE r.nth = ${minUnits}::int
    ), recurring AS MATERIALIZED (
      SELECT s.*, s.unit_count::numeric / greatest(s.checked_units, 1) AS share
        FROM shares s
    ), by_level AS (
      SELECT x.defect_key, json_agg(json_build_object('levelId', x.level_id, 'name', x.name, 'count', x.n) ORDER BY x.position, x.level_id) AS list
        FROM (SELECT fu.defect_key, u.level_id, lv.name, lv.position, count(*) AS n
                FROM first_per_unit fu
                JOIN recurring r ON r.defect_key = fu.defect_key AND r.share >= ${minShare}::numeric
                JOIN units u ON u.id = fu.unit_id
                JOIN levels lv ON lv.id = u.level_id
               GROUP BY fu.defect_key, u.level_id, lv.name, lv.position) x
       GROUP BY x.defect_key
    ), by_company AS (
      SELECT y.defect_key, json_agg(json_build_object('companyId', y.company_id, 'name', y.name, 'count', y.n) ORDER BY y.name, y.company_id) AS list
        FROM (SELECT pc.defect_key, pc.company_id, c.name, count(*) AS n
                FROM per_unit_company pc
                JOIN recurring r ON r.defect_key = pc.defect_key AND r.share >= ${minShare}::numeric
                JOIN companies c ON c.id = pc.company_id
               GROUP BY pc.defect_key, pc.company_id, c.name) y
       GROUP BY y.defect_key
    ), by_crew AS (
      SELECT z.defect_key,
             json_agg(json_build_object('companyId', z.company_id, 'companyName', z.company_name, 'crewId', z.crew_id, 'name', z.crew_name, 'count', z.n)
                      ORDER BY z.company_name, z.company_id, z.crew_id IS NULL, lower(z.crew_name), z.crew_id) AS list
        FROM (SELECT pc.defect_key, pc.company_id, c.name AS company_name, cr.id AS crew_id, cr.name AS crew_name, count(*) AS n
                FROM per_unit_company pc
                JOIN recurring r ON r.defect_key = pc.defect_key AND r.share >= ${minShare}::numeric
                JOIN companies c ON c.id = pc.company_id
                JOIN units u ON u.id = pc.unit_id
                LEFT JOIN crews cr ON cr.id = u.installed_by_crew_id AND cr.company_id = pc.company_id
               GROUP BY pc.defect_key, pc.company_id, c.name, cr.id, cr.name) z
       GROUP BY z.defect_key
    )
    SELECT r.defect_key, r.catalogue_item_id, r.code, r.title, r.unit_count, r.checked_units, r.share::float8 AS share, r.recurring_since,
           bl.list AS by_level, bc.list AS by_company, bw.list AS by_crew
      FROM recurring r
      LEFT JOIN by_level bl ON bl.defect_key = r.defect_key
      LEFT JOIN by_company bc ON bc.defect_key = r.defect_key
      LEFT JOIN by_crew bw ON bw.defect_key = r.defect_key
     WHERE r.share >= ${minShare}::numeric
     ORDER BY r.unit_count DESC, r.code, r.title, r.defect_key`;
  const rows = await selectTuned<RecurringRow>(sequelize, sql, b.values);
  const items: RecurringDefect[] = rows.map((r) => ({
    key: r.defect_key,
    catalogueItemId: r.catalogue_item_id,
    code: r.code,
    title: r.title,
    unitCount: num(r.unit_count),
    checkedUnits: num(r.checked_units),
    share: Number(r.share),
    recurringSince: new Date(r.recurring_since).toISOString(),
    byLevel: (r.by_level ?? []).map((x) => ({ ...x, count: Number(x.count) })),
    byCompany: (r.by_company ?? []).map((x) => ({ ...x, count: Number(x.count) })),
    byCrew: (r.by_crew ?? []).map((x) => ({ ...x, count: Number(x.count) })),
  }));
  return { thresholds, items, companyScope: scope.companyId };
}
