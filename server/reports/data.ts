/**
 * What the reports read. Every statement carries the caller's scope in its WHERE: the job, and for
 * a subcontractor the company their membership is for (`scope.companyId`, as every finding read
 * does: server/services/findingQueries.ts), so another company's finding, photo or tag never
 * reaches a report. Request values arrive only as bound parameters.
 */
import { QueryTypes, type Sequelize } from 'sequelize';
import type { RuleResult } from '../../shared/calc/rules';
import type { QuantityKind } from '../../shared/catalogue/types';
import type { FindingStatus, Severity, UnitKindKey } from '../../shared/words';
import { notFound } from '../errors';
import type { FindingScope } from '../services/findingQueries';

export interface ReportScopeInput {
  levelId?: string;
  systemId?: string;
  companyId?: string;
  walkId?: string;
}

/** The scope resolved to names (each checked to be on the job; 404 otherwise). */
export interface ResolvedScope extends ReportScopeInput {
  levelName?: string;
  systemName?: string;
  companyName?: string;
  walk?: { id: string; levelId: string; levelName: string; inspector: string; startedAt: string };
}

async function one<T extends object>(sequelize: Sequelize, sql: string, bind: unknown[]): Promise<T | undefined> {
  const rows = await sequelize.query<T>(sql, { bind, type: QueryTypes.SELECT });
  return rows[0];
}

/**
 * Checks every id of the query against the job (and a subcontractor's own company): a level,
 * system, company or walk of another job answers 404, like any out-of-scope record.
 */
export async function resolveScope(sequelize: Sequelize, scope: FindingScope, input: ReportScopeInput): Promise<ResolvedScope> {
  const out: ResolvedScope = { ...input };
  if (input.levelId) {
    const r = await one<{ name: string }>(sequelize, 'SELECT name FROM levels WHERE job_id = $1 AND id = $2', [scope.jobId, input.levelId]);
    if (!r) throw notFound('That level is not on this job.');
    out.levelName = r.name;
  }
  if (input.systemId) {
    const r = await one<{ name: string }>(sequelize, 'SELECT name FROM systems WHERE job_id = $1 AND id = $2', [scope.jobId, input.systemId]);
    if (!r) throw notFound('That system is not on this job.');
    out.systemName = r.name;
  }
  if (input.companyId) {
    // A subcontractor may name only the company their membership is for.
    if (scope.companyId && scope.companyId !== input.companyId) throw notFound('That company is not on this job.');
    const r = await one<{ name: string }>(
      sequelize,
      `SELECT c.name FROM companies c
        WHERE c.id = $2 AND (EXISTS (SELECT 1 FROM job_companies jc WHERE jc.job_id = $1 AND jc.company_id = c.id)
                             OR EXISTS (SELECT 1 FROM findings f WHERE f.job_id = $1 AND f.company_id = c.id))`,
      [scope.jobId, input.companyId],
    );
    if (!r) throw notFound('That company is not on this job.');
    out.companyName = r.name;
  }
  if (input.walkId) {
    const r = await one<{ level_id: string; level_name: string; inspector: string; started_at: Date }>(
      sequelize,
      `SELECT w.level_id, l.name AS level_name, u.name AS inspector, w.started_at
         FROM walks w JOIN levels l ON l.id = w.level_id JOIN users u ON u.id = w.inspector_id
        WHERE w.job_id = $1 AND w.id = $2`,
      [scope.jobId, input.walkId],
    );
    if (!r) throw notFound('That walk is not on this job.');
    out.walk = { id: input.walkId, levelId: r.level_id, levelName: r.level_name, inspector: r.inspector, startedAt: new Date(r.started_at).toISOString() };
  }
  return out;
}

/** WHERE conditions on findings f (with units u joined) for the caller's scope and the report's scope. */
export function findingScopeSql(scope: FindingScope, input: ReportScopeInput, bind: unknown[], alias = 'f'): string {
  const add = (v: unknown) => `$${bind.push(v)}`;
  const conds = [`${alias}.job_id = ${add(scope.jobId)}`];
  if (scope.companyId) conds.push(`${alias}.company_id = ${add(scope.companyId)}`);
  if (input.companyId) conds.push(`${alias}.company_id = ${add(input.companyId)}`);
  if (input.levelId) conds.push(`${alias}.level_id = ${add(input.levelId)}`);
  if (input.walkId) conds.push(`${alias}.walk_id = ${add(input.walkId)}`);
  if (input.systemId) conds.push(`${alias}.unit_id IN (SELECT su.id FROM units su WHERE su.job_id = $1 AND su.system_id = ${add(input.systemId)})`);
  return conds.join(' AND ');
}

/** The order a report lists findings in: level, space, unit tag, number (a walk's order on site). */
export const REPORT_ORDER_SQL = `l.position, l.name, s.name NULLS LAST, u.tag NULLS LAST, f.number`;

export interface ReportFindingRow {
  id: string;
  number: number;
  level_name: string;
  space_name: string | null;
  unit_tag: string | null;
  unit_kind: UnitKindKey | null;
  system_name: string | null;
  code: string;
  title: string;
  severity: Severity;
  status: FindingStatus;
  company_id: string;
  company_name: string;
  logged_by_name: string;
  logged_on: string;
  due_on: string;
  closed_on: string | null;
  closed_by_name: string | null;
  measured_text: string | null;
  rule_result: RuleResult | null;
  quantity: QuantityKind | null;
  note: string;
  return_count: number;
  fix_guidance: string | null;
  caution: string | null;
  fix_note: string | null;
  fix_on: string | null;
  fix_by_name: string | null;
  fix_measured_text: string | null;
  defect_photo_key: string | null;
  defect_thumb_key: string | null;
  defect_photo_id: string | null;
  /** Print copies (server/services/photos.ts PRINT_SIZE) of the photos above; null where none was made yet. */
  defect_print_key: string | null;
  fix_photo_key: string | null;
  fix_photo_id: string | null;
  fix_print_key: string | null;
  /** The first photo of the latest re-inspection that took photos, and that re-inspection's verdict, day and inspector. */
  reinspection_photo_key: string | null;
  reinspection_photo_id: string | null;
  reinspection_print_key: string | null;
  reinspection_kind: 'accepted' | 'returned' | null;
  reinspection_on: string | null;
  reinspection_by_name: string | null;
}

/**
 * The print copy of photo `p` with marks `pm` (LEFT JOIN photo_marks pm): the marked copy's while
 * marks exist, else the photo's own; null until one is made (server/services/printCopies.ts).
 */
export const PRINT_KEY_SQL = 'CASE WHEN pm.marked_key IS NOT NULL THEN pm.marked_print_key ELSE p.print_key END';

/**
 * The ids of the findings a report prints, in report order. Ids only, so even a large job's list
 * is small; the rows are read in batches (findingRows) as the pages are written.
 */
export async function findingIds(
  sequelize: Sequelize,
  scope: FindingScope,
  input: ReportScopeInput,
  statuses: readonly FindingStatus[],
): Promise<string[]> {
  const bind: unknown[] = [];
  const where = findingScopeSql(scope, input, bind);
  const rows = await sequelize.query<{ id: string }>(
    `SELECT f.id FROM findings f
       JOIN levels l ON l.id = f.level_id
       LEFT JOIN units u ON u.id = f.unit_id
       LEFT JOIN spaces s ON s.id = coalesce(f.space_id, u.space_id)
      WHERE ${where} AND f.status = ANY ($${bind.push(statuses)}::text[])
      ORDER BY ${REPORT_ORDER_SQL}`,
    { bind, type: QueryTypes.SELECT },
  );
  return rows.map((r) => r.id);
}

/**
 * The findings of `ids` with what a report prints about each, in report order. The scope is
 * applied again here: an id list can never widen what the caller sees.
 */
export async function findingRows(sequelize: Sequelize, scope: FindingScope, ids: readonly string[]): Promise<ReportFindingRow[]> {
  if (ids.length === 0) return [];
  const bind: unknown[] = [];
  const where = findingScopeSql(scope, {}, bind);
  const tz = `$${bind.push(scope.timeZone)}`;
  const day = (expr: string) => `to_char((${expr}) AT TIME ZONE ${tz}, 'YYYY-MM-DD')`;
  return sequelize.query<ReportFindingRow>(
    `SELECT f.id, f.number, l.name AS level_name, s.name AS space_name, u.tag AS unit_tag, u.kind AS unit_kind, sy.name AS system_name,
            ci.code, coalesce(f.title, ci.title) AS title, f.severity, f.status, f.company_id, c.name AS company_name,
            lb.name AS logged_by_name, ${day('f.logged_at')} AS logged_on, to_char(f.due_on, 'YYYY-MM-DD') AS due_on,
            ${day('closing.at')} AS closed_on, cu.name AS closed_by_name,
            f.measured_text, f.rule_result, ci.measured_rule->>'quantity' AS quantity, f.note, f.return_count,
            ci.fix_guidance, ci.caution,
            fx.note AS fix_note, ${day('fx.submitted_at')} AS fix_on, fu.name AS fix_by_name, fx.measured_text AS fix_measured_text,
            dp.storage_key AS defect_photo_key, dp.thumb_key AS defect_thumb_key, dp.id AS defect_photo_id, dp.print_key AS defect_print_key,
            xp.storage_key AS fix_photo_key, xp.id AS fix_photo_id, xp.print_key AS fix_print_key,
            rp.storage_key AS reinspection_photo_key, rp.id AS reinspection_photo_id, rp.print_key AS reinspection_print_key,
            ri.kind AS reinspection_kind, ${day('ri.at')} AS reinspection_on, ru.name AS reinspection_by_name
       FROM findings f
       JOIN levels l ON l.id = f.level_id
       LEFT JOIN units u ON u.id = f.unit_id
       LEFT JOIN spaces s ON s.id = coalesce(f.space_id, u.space_id)
       LEFT JOIN systems sy ON sy.id = u.system_id
       JOIN catalogue_items ci ON ci.id = f.catalogue_item_id
       JOIN companies c ON c.id = f.company_id
       JOIN users lb ON lb.id = f.logged_by
       LEFT JOIN LATERAL (SELECT e.at, e.actor_id FROM finding_events e
                           WHERE e.finding_id = f.id AND e.kind IN ('accepted', 'closed_on_walk', 'closed')
                           ORDER BY e.at DESC, e.id DESC LIMIT 1) closing ON f.status = 'closed'
       LEFT JOIN users cu ON cu.id = closing.actor_id
       LEFT JOIN LATERAL (SELECT x.* FROM fixes x WHERE x.finding_id = f.id ORDER BY x.submitted_at DESC, x.id DESC LIMIT 1) fx ON true
       LEFT JOIN users fu ON fu.id = fx.submitted_by
       -- A photo marked up prints as its marked copy (what the app and the mails show); the original stays in the store.
       -- The print copy is the marked copy's while marks exist (null until made: never the unmarked photo's).
       LEFT JOIN LATERAL (SELECT p.id, coalesce(pm.marked_key, p.storage_key) AS storage_key, coalesce(pm.marked_thumb_key, p.thumb_key) AS thumb_key,
                                 ${PRINT_KEY_SQL} AS print_key
                            FROM photos p LEFT JOIN photo_marks pm ON pm.photo_id = p.id
                           WHERE p.finding_id = f.id AND p.stage = 'finding' ORDER BY p.created_at, p.id LIMIT 1) dp ON true
       LEFT JOIN LATERAL (SELECT p.id, coalesce(pm.marked_key, p.storage_key) AS storage_key, ${PRINT_KEY_SQL} AS print_key
                            FROM photos p LEFT JOIN photo_marks pm ON pm.photo_id = p.id
                           WHERE p.fix_id = fx.id ORDER BY p.created_at, p.id LIMIT 1) xp ON true
       -- A re-inspection's photos are named by its accepted / returned event (photos.stage 'reinspection').
       LEFT JOIN LATERAL (SELECT e.kind, e.at, e.actor_id, e.photo_ids FROM finding_events e
                           WHERE e.finding_id = f.id AND e.kind IN ('accepted', 'returned') AND cardinality(e.photo_ids) > 0
                           ORDER BY e.at DESC, e.id DESC LIMIT 1) ri ON true
       LEFT JOIN users ru ON ru.id = ri.actor_id
       LEFT JOIN LATERAL (SELECT p.id, coalesce(pm.marked_key, p.storage_key) AS storage_key, ${PRINT_KEY_SQL} AS print_key
                            FROM photos p LEFT JOIN photo_marks pm ON pm.photo_id = p.id
                           WHERE p.finding_id = f.id AND p.stage = 'reinspection' AND p.id = ANY (ri.photo_ids)
                           ORDER BY p.created_at, p.id LIMIT 1) rp ON true
      WHERE ${where} AND f.id = ANY ($${bind.push(ids)}::uuid[])
      ORDER BY ${REPORT_ORDER_SQL}`,
    { bind, type: QueryTypes.SELECT },
  );
}

/** How many findings and photos a report of this scope prints (the size decides: at once or in the background). */
export async function reportSize(
  sequelize: Sequelize,
  scope: FindingScope,
  input: ReportScopeInput,
  statuses: readonly FindingStatus[],
): Promise<{ findings: number; photos: number }> {
  const bind: unknown[] = [];
  const where = findingScopeSql(scope, input, bind);
  const [r] = await sequelize.query<{ findings: string; photos: string }>(
    `SELECT count(*) AS findings,
            count(*) FILTER (WHERE EXISTS (SELECT 1 FROM photos p WHERE p.finding_id = f.id AND p.stage = 'finding'))
          + count(*) FILTER (WHERE EXISTS (SELECT 1 FROM photos p JOIN fixes x ON x.id = p.fix_id WHERE x.finding_id = f.id))
          + count(*) FILTER (WHERE EXISTS (SELECT 1 FROM photos p WHERE p.finding_id = f.id AND p.stage = 'reinspection')) AS photos
       FROM findings f
      WHERE ${where} AND f.status = ANY ($${bind.push(statuses)}::text[])`,
    { bind, type: QueryTypes.SELECT },
  );
  return { findings: Number(r?.findings ?? 0), photos: Number(r?.photos ?? 0) };
}

export interface JobFacts {
  name: string;
  number: string | null;
  address: string | null;
  timeZone: string;
  unitSystem: 'imperial' | 'metric';
}

export async function jobFacts(sequelize: Sequelize, jobId: string): Promise<JobFacts> {
  const r = await one<{ name: string; number: string | null; address: string | null; time_zone: string; unit_system: 'imperial' | 'metric' }>(
    sequelize,
    'SELECT name, number, address, time_zone, unit_system FROM jobs WHERE id = $1',
    [jobId],
  );
  if (!r) throw notFound('Job not found.');
  return { name: r.name, number: r.number, address: r.address, timeZone: r.time_zone, unitSystem: r.unit_system };
}

export interface StatusCounts {
  level_name: string;
  open: number;
  fix_submitted: number;
  closed: number;
  voided: number;
  critical: number;
  major: number;
  minor: number;
}

/** Findings by status, and by severity (voided left out), per level, in the report's scope. */
export async function countsPerLevel(sequelize: Sequelize, scope: FindingScope, input: ReportScopeInput): Promise<StatusCounts[]> {
  const bind: unknown[] = [];
  const where = findingScopeSql(scope, input, bind);
  const rows = await sequelize.query<Record<keyof StatusCounts, string>>(
    `SELECT l.name AS level_name,
            count(*) FILTER (WHERE f.status = 'open') AS open,
            count(*) FILTER (WHERE f.status = 'fix_submitted') AS fix_submitted,
            count(*) FILTER (WHERE f.status = 'closed') AS closed,
            count(*) FILTER (WHERE f.status = 'voided') AS voided,
            count(*) FILTER (WHERE f.status <> 'voided' AND f.severity = 'critical') AS critical,
            count(*) FILTER (WHERE f.status <> 'voided' AND f.severity = 'major') AS major,
            count(*) FILTER (WHERE f.status <> 'voided' AND f.severity = 'minor') AS minor
       FROM findings f JOIN levels l ON l.id = f.level_id
      WHERE ${where}
      GROUP BY l.id, l.position, l.name ORDER BY l.position, l.name`,
    { bind, type: QueryTypes.SELECT },
  );
  return rows.map((r) => ({
    level_name: r.level_name,
    open: Number(r.open),
    fix_submitted: Number(r.fix_submitted),
    closed: Number(r.closed),
    voided: Number(r.voided),
    critical: Number(r.critical),
    major: Number(r.major),
    minor: Number(r.minor),
  }));
}

/** Units in the report's place (level, system; a walk's level) and how many have a complete latest check. */
export async function unitCoverage(sequelize: Sequelize, jobId: string, input: ReportScopeInput): Promise<{ units: number; checked: number }> {
  const bind: unknown[] = [jobId];
  const conds = ['u.job_id = $1'];
  if (input.levelId) conds.push(`u.level_id = $${bind.push(input.levelId)}`);
  if (input.systemId) conds.push(`u.system_id = $${bind.push(input.systemId)}`);
  const [r] = await sequelize.query<{ units: string; checked: string }>(
    `SELECT count(*) AS units,
            count(*) FILTER (WHERE (SELECT uc.complete FROM unit_checks uc WHERE uc.unit_id = u.id
                                     ORDER BY uc.checked_at DESC, uc.id DESC LIMIT 1)) AS checked
       FROM units u WHERE ${conds.join(' AND ')}`,
    { bind, type: QueryTypes.SELECT },
  );
  return { units: Number(r?.units ?? 0), checked: Number(r?.checked ?? 0) };
}

/** The ids of the systems with a unit on `levelId` (test records of those systems belong to a level's report). */
export async function systemsOnLevel(sequelize: Sequelize, jobId: string, levelId: string): Promise<Set<string>> {
  const rows = await sequelize.query<{ system_id: string }>(
    'SELECT DISTINCT system_id FROM units WHERE job_id = $1 AND level_id = $2 AND system_id IS NOT NULL',
    { bind: [jobId, levelId], type: QueryTypes.SELECT },
  );
  return new Set(rows.map((r) => r.system_id));
}
