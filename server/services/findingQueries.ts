/**
 * Reading findings: the list (filters, allowlisted sorts, keyset cursor, counts), one finding's
 * detail (photos, events), and the photos a caller may see. A subcontractor's company scope is
 * a condition in the SQL WHERE of every query here (`scope.companyId`), so another company's
 * finding is simply not found. Request values only ever arrive as bound parameters.
 */
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import type {
  FindingDetail,
  FindingDto,
  FindingEventKind,
  FindingListQueryParsed,
  FindingListResponse,
  FindingSort,
} from '../../shared/schemas/findings';
import { todayIn } from '../../shared/rules/dates';
import { FINDING_STATUSES, SEVERITIES, type FindingStatus, type Severity, type UnitKindKey } from '../../shared/words';
import { presentEvent } from '../presenters/event';
import { presentFinding, presentFindingDetail, type FindingRow } from '../presenters/finding';
import { presentPhoto, type PhotoRow } from '../presenters/photo';
import type { CursorValueKind, ListOrder, PageRequest } from './paging';
import { likeContains } from './records';
import { SEVERITY_RANK_SQL } from './findings';
import { responsibleSql } from './testScope';

/**
 * The overdue rule of shared/rules/due.ts (isOverdue) as SQL, for every read that counts or
 * filters overdue findings: open (new or returned) and due before `today` (a date expression).
 */
export function overdueSql(today: string, alias = 'f'): string {
  return `(${alias}.status = 'open' AND ${alias}.due_on < ${today})`;
}

export type { FindingRow };

/** Who is asking: the job, its time zone (for "overdue"), and for a subcontractor their company. */
export interface FindingScope {
  jobId: string;
  timeZone: string;
  /** Set for subcontractors: the company their membership of the job is for (policy.jobMember); only its findings exist for them. */
  companyId: string | null;
}

export interface FindingFilters {
  levelId?: string;
  spaceId?: string;
  unitId?: string;
  kind?: UnitKindKey;
  status?: FindingStatus[];
  severity?: Severity[];
  companyId?: string;
  catalogueItemId?: string;
  overdue?: boolean;
  q?: string;
}



/** `value`: what the sort key is, so paging checks a cursor's value before the `cast` sees it. */
const SORTS: Record<FindingSort, { expr: string; key: string; desc: boolean; cast: string; value: CursorValueKind }> = {
  number: { expr: 'f.number', key: 'f.number', desc: false, cast: 'int', value: 'int' },
  '-number': { expr: 'f.number', key: 'f.number', desc: true, cast: 'int', value: 'int' },
  dueOn: { expr: 'f.due_on', key: `to_char(f.due_on, 'YYYY-MM-DD')`, desc: false, cast: 'date', value: 'date' },
  '-dueOn': { expr: 'f.due_on', key: `to_char(f.due_on, 'YYYY-MM-DD')`, desc: true, cast: 'date', value: 'date' },
  loggedAt: {
    expr: 'f.logged_at',
    key: `to_char(f.logged_at AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.US"Z"')`,
    desc: false,
    cast: 'timestamptz',
    value: 'timestamp',
  },
  '-loggedAt': {
    expr: 'f.logged_at',
    key: `to_char(f.logged_at AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.US"Z"')`,
    desc: true,
    cast: 'timestamptz',
    value: 'timestamp',
  },
  severity: { expr: SEVERITY_RANK_SQL('f.severity'), key: SEVERITY_RANK_SQL('f.severity'), desc: false, cast: 'int', value: 'int' },
  '-severity': { expr: SEVERITY_RANK_SQL('f.severity'), key: SEVERITY_RANK_SQL('f.severity'), desc: true, cast: 'int', value: 'int' },
};

/** The list's order for paging (server/services/paging.ts): its sort and the type of its cursor value. */
export function findingListOrder(sort: FindingSort): ListOrder {
  return { sort, value: SORTS[sort].value };
}

/** ORDER BY for a list sort (the list's keyset order; the CSV export uses the same). */
export function orderBySql(sort: FindingSort): string {
  const s = SORTS[sort];
  const dir = s.desc ? 'DESC' : 'ASC';
  return `${s.expr} ${dir}, f.id ${dir}`;
}

/** The list's query parameters as filters: one mapping for GET /findings and GET /findings.csv. */
export function findingFiltersOf(q: FindingListQueryParsed): FindingFilters {
  return {
    levelId: q.levelId,
    spaceId: q.spaceId,
    unitId: q.unitId,
    kind: q.kind,
    status: q.status,
    severity: q.severity,
    companyId: q.companyId,
    catalogueItemId: q.catalogueItemId,
    overdue: q.overdue,
    q: q.q || undefined,
  };
}

/** Bound parameters of one statement: $1 is the job; today's date is bound once, when first used. */
export class Params {
  readonly bind: unknown[];
  private todayRef: string | null = null;
  constructor(
    jobId: string,
    private readonly todayValue: string,
  ) {
    this.bind = [jobId];
  }
  add(value: unknown): string {
    return `$${this.bind.push(value)}`;
  }
  today(): string {
    this.todayRef ??= `${this.add(this.todayValue)}::date`;
    return this.todayRef;
  }
}

/** The finding columns with their names; `catalogue` adds the defect type's texts (detail only). */
export function selectSql(sortKey: string, today: string, catalogue = true): string {
  return `
  SELECT f.id, f.number, f.level_id, l.name AS level_name, f.space_id, s.name AS space_name,
         f.unit_id, u.tag AS unit_tag, u.kind AS unit_kind, f.catalogue_item_id, ci.code, coalesce(f.title, ci.title) AS title,
         f.severity, f.status, f.company_id, c.name AS company_name, to_char(f.due_on, 'YYYY-MM-DD') AS due_on,
         ${overdueSql(today)} AS overdue,
         f.note, f.measured_text, f.measured_value, f.rule_result, f.return_count,
         f.logged_by, lb.name AS logged_by_name, f.logged_at, f.walk_id, f.pin_x, f.pin_y, f.voided_reason,
         (SELECT count(*) FROM photos p WHERE p.finding_id = f.id AND p.stage = 'finding') AS photo_count,
         (SELECT p.id FROM photos p WHERE p.finding_id = f.id AND p.stage = 'finding' ORDER BY p.created_at, p.id LIMIT 1) AS first_photo_id,
         f.version, ${sortKey} AS sort_key${
           catalogue ? ',\n         ci.description, ci.fix_guidance, ci.caution, ci.needs_ceiling_access, ci.measured_rule' : ''
         }`;
}

export const FROM_SQL = `
    FROM findings f
    JOIN levels l ON l.id = f.level_id
    LEFT JOIN spaces s ON s.id = f.space_id
    LEFT JOIN units u ON u.id = f.unit_id
    JOIN catalogue_items ci ON ci.id = f.catalogue_item_id
    JOIN companies c ON c.id = f.company_id
    JOIN users lb ON lb.id = f.logged_by`;

/**
 * The findings a statement shows, picked first from findings alone (with u and ci for the
 * filters that need them; unused LEFT JOINs on primary keys are dropped), then joined to their
 * names through PICKED_FROM_SQL. Planning the seven-table join of FROM_SQL over all the job's
 * findings took 7-10 ms per request on the bench machine, ten times the query itself (every
 * statement is planned afresh); over the picked rows it is about 1 ms. `tail` = ORDER BY / LIMIT.
 */
export function pickedSql(where: string, tail = ''): string {
  return `WITH picked AS MATERIALIZED (
      SELECT f.* FROM findings f
        LEFT JOIN units u ON u.id = f.unit_id
        LEFT JOIN catalogue_items ci ON ci.id = f.catalogue_item_id
       WHERE ${where} ${tail}
    )`;
}

export const PICKED_FROM_SQL = FROM_SQL.replace('FROM findings f', 'FROM picked f');

/** FROM for counts: just the tables whereSql may refer to (u, ci); unused LEFT JOINs on primary keys are dropped by the planner. */
const COUNT_FROM_SQL = `
    FROM findings f
    LEFT JOIN units u ON u.id = f.unit_id
    LEFT JOIN catalogue_items ci ON ci.id = f.catalogue_item_id`;

/**
 * THE filter-to-SQL function: WHERE conditions for the caller's scope (job, and a
 * subcontractor's company) and the list filters; $1 = job id. Used by the list, its counts,
 * a finding's detail and the CSV export, so they cannot disagree on which rows a filter means.
 * It refers to the aliases of FROM_SQL (f, u, ci).
 */
export function whereSql(p: Params, scope: FindingScope, filters: FindingFilters, skip: { status?: boolean; severity?: boolean } = {}): string {
  const conds = ['f.job_id = $1'];
  const add = (value: unknown) => p.add(value);
  if (scope.companyId) conds.push(`f.company_id = ${add(scope.companyId)}`);
  if (filters.levelId) conds.push(`f.level_id = ${add(filters.levelId)}`);
  if (filters.spaceId) {
    const space = add(filters.spaceId);
    conds.push(`(f.space_id = ${space} OR u.space_id = ${space})`);
  }
  if (filters.unitId) conds.push(`f.unit_id = ${add(filters.unitId)}`);
  if (filters.kind) conds.push(`u.kind = ${add(filters.kind)}`);
  // One status as an equality: then (job_id, status, due_on, id) gives the dueOn order directly.
  if (filters.status && !skip.status) {
    conds.push(filters.status.length === 1 ? `f.status = ${add(filters.status[0])}` : `f.status = ANY (${add(filters.status)}::text[])`);
  }
  if (filters.severity && !skip.severity) conds.push(`f.severity = ANY (${add(filters.severity)}::text[])`);
  if (filters.companyId) conds.push(`f.company_id = ${add(filters.companyId)}`);
  if (filters.catalogueItemId) conds.push(`f.catalogue_item_id = ${add(filters.catalogueItemId)}`);
  if (filters.overdue === true) conds.push(overdueSql(p.today()));
  if (filters.overdue === false) conds.push(`NOT ${overdueSql(p.today())}`);
  if (filters.q) {
    const like = add(likeContains(filters.q));
    const parts = [`f.note ILIKE ${like}`, `coalesce(f.title, ci.title) ILIKE ${like}`, `ci.code ILIKE ${like}`, `u.tag ILIKE ${like}`];
    const asNumber = /^#?(\d{1,9})$/.exec(filters.q.trim());
    if (asNumber) parts.push(`f.number = ${add(Number(asNumber[1]))}`);
    conds.push(`(${parts.join(' OR ')})`);
  }
  return conds.join(' AND ');
}


export async function listFindings(
  sequelize: Sequelize,
  scope: FindingScope,
  filters: FindingFilters,
  sort: FindingSort,
  page: PageRequest,
): Promise<FindingListResponse> {
  const today = todayIn(scope.timeZone);
  const s = SORTS[sort];
  const p = new Params(scope.jobId, today);
  let where = whereSql(p, scope, filters);
  if (page.after) {
    const v = `${p.add(page.after.value)}::${s.cast}`;
    const id = `${p.add(page.after.id)}::uuid`;
    const op = s.desc ? '<' : '>';
    where += ` AND (${s.expr} ${op} ${v} OR (${s.expr} = ${v} AND f.id ${op} ${id}))`;
  }
  const select = selectSql(s.key, p.today(), false);
  const limit = p.add(page.limit + 1);
  const order = orderBySql(sort);
  const rows = await sequelize.query<FindingRow>(`${pickedSql(where, `ORDER BY ${order} LIMIT ${limit}`)} ${select} ${PICKED_FROM_SQL} ORDER BY ${order}`, {
    bind: p.bind,
    type: QueryTypes.SELECT,
  });
  let nextCursor: string | null = null;
  if (rows.length > page.limit) {
    rows.length = page.limit;
    const last = rows[rows.length - 1]!;
    nextCursor = page.cursorAfter(typeof last.sort_key === 'string' ? last.sort_key : Number(last.sort_key), last.id);
  }

  // Counts in ONE pass, grouped by (status, severity) with the status and severity filters left
  // out, then split here: total = rows passing both, byStatus = rows passing the severity filter,
  // bySeverity = rows passing the status filter (what three separate counts would give). The FROM
  // is lean: only the tables whereSql can refer to, as LEFT JOINs on primary keys, which
  // PostgreSQL drops when no condition uses them (the other joins of FROM_SQL follow NOT NULL
  // foreign keys, so they never change a count). Measured by `npm run bench` on 100,000 findings.
  // When the only filters are level, company, status and severity (the list as it opens, a board
  // cell, every subcontractor's default view), the groups come from the tallies the triggers of
  // migration 20261202010100 keep per (job, level, company, status, severity): a few hundred rows
  // instead of every finding of the job.
  const cp = new Params(scope.jobId, today);
  const tallyOnly = Object.entries(filters).every(([k, v]) => v === undefined || ['levelId', 'companyId', 'status', 'severity'].includes(k));
  const groups = tallyOnly
    ? await sequelize.query<{ status: FindingStatus; severity: Severity; n: string }>(
        `SELECT t.status, t.severity, sum(t.n) AS n FROM finding_tallies t
          WHERE t.job_id = $1${scope.companyId ? ` AND t.company_id = ${cp.add(scope.companyId)}::uuid` : ''}${
            filters.levelId ? ` AND t.level_id = ${cp.add(filters.levelId)}::uuid` : ''
          }${filters.companyId ? ` AND t.company_id = ${cp.add(filters.companyId)}::uuid` : ''}
          GROUP BY t.status, t.severity`,
        { bind: cp.bind, type: QueryTypes.SELECT },
      )
    : await sequelize.query<{ status: FindingStatus; severity: Severity; n: string }>(
        `SELECT f.status, f.severity, count(*) AS n ${COUNT_FROM_SQL} WHERE ${whereSql(cp, scope, filters, { status: true, severity: true })} GROUP BY f.status, f.severity`,
        { bind: cp.bind, type: QueryTypes.SELECT },
      );
  const statusOk = (v: FindingStatus) => !filters.status || filters.status.includes(v);
  const severityOk = (v: Severity) => !filters.severity || filters.severity.includes(v);
  const byStatus = Object.fromEntries(FINDING_STATUSES.map((k) => [k, 0])) as Record<FindingStatus, number>;
  const bySeverity = Object.fromEntries(SEVERITIES.map((k) => [k, 0])) as Record<Severity, number>;
  let totalCount = 0;
  for (const g of groups) {
    const n = Number(g.n);
    if (severityOk(g.severity)) byStatus[g.status] += n;
    if (statusOk(g.status)) bySeverity[g.severity] += n;
    if (statusOk(g.status) && severityOk(g.severity)) totalCount += n;
  }

  return {
    items: rows.map((r) => presentFinding(scope.jobId, r)),
    nextCursor,
    total: totalCount,
    counts: { byStatus, bySeverity },
  };
}


interface EventRow {
  id: string;
  kind: FindingEventKind;
  actor_id: string;
  actor_name: string;
  at: Date;
  from: Record<string, unknown> | null;
  to: Record<string, unknown> | null;
  reason: string | null;
  photo_ids: string[] | null;
}

/** One finding with its photos and history, or null when it does not exist for this caller. */
export async function findingDetail(
  sequelize: Sequelize,
  scope: FindingScope,
  findingId: string,
  transaction?: Transaction,
): Promise<FindingDetail | null> {
  const p = new Params(scope.jobId, todayIn(scope.timeZone));
  const where = whereSql(p, scope, {});
  const idParam = p.add(findingId);
  const [row] = await sequelize.query<FindingRow>(`${pickedSql(`${where} AND f.id = ${idParam}`)} ${selectSql('f.number', p.today())} ${PICKED_FROM_SQL}`, {
    bind: p.bind,
    type: QueryTypes.SELECT,
    transaction,
  });
  if (!row) return null;
  const photos = await sequelize.query<PhotoRow>(
    `SELECT p.id, p.content_type, p.width, p.height, p.byte_size, p.fix_id, p.stage, p.uploaded_by, u.name AS uploader_name, p.created_at
       FROM photos p LEFT JOIN users u ON u.id = p.uploaded_by
      WHERE p.job_id = $1 AND (p.finding_id = $2 OR p.fix_id IN (SELECT x.id FROM fixes x WHERE x.finding_id = $2))
      ORDER BY p.created_at, p.id`,
    { bind: [scope.jobId, row.id], type: QueryTypes.SELECT, transaction },
  );
  const events = await sequelize.query<EventRow>(
    `SELECT e.id, e.kind, e.actor_id, u.name AS actor_name, e.at, e."from", e."to", e.reason, e.photo_ids
       FROM finding_events e JOIN users u ON u.id = e.actor_id
      WHERE e.job_id = $1 AND e.finding_id = $2
      ORDER BY e.at, e.id`,
    { bind: [scope.jobId, row.id], type: QueryTypes.SELECT, transaction },
  );
  return presentFindingDetail(
    scope.jobId,
    row,
    photos.map((p) => presentPhoto(scope.jobId, p)),
    events.map((e) => presentEvent({ ...e, photoIds: e.photo_ids }, { id: e.actor_id, name: e.actor_name })),
  );
}

export interface VisiblePhoto {
  id: string;
  storageKey: string;
  thumbKey: string;
  contentType: string;
}

/**
 * A photo of a finding, or of a fix of a finding, the caller may see (same job; for a
 * subcontractor, a finding of their company), or null. Photos that belong to no finding of this job are never served here.
 */
export async function visiblePhoto(sequelize: Sequelize, scope: FindingScope, photoId: string): Promise<VisiblePhoto | null> {
  const bind: unknown[] = [scope.jobId, photoId];
  const c = scope.companyId ? `$${bind.push(scope.companyId)}` : null;
  // A finding's or fix's photo as its finding; a test record's as its record (services/testScope.ts).
  const [row] = await sequelize.query<{ id: string; storage_key: string; thumb_key: string; content_type: string }>(
    `SELECT p.id, p.storage_key, p.thumb_key, p.content_type
       FROM photos p
       LEFT JOIN fixes x ON x.id = p.fix_id AND x.job_id = p.job_id
       LEFT JOIN findings f ON f.id = COALESCE(p.finding_id, x.finding_id) AND f.job_id = p.job_id
       LEFT JOIN test_records tr ON tr.id = p.test_record_id AND tr.job_id = p.job_id
       LEFT JOIN units tu ON tu.id = tr.unit_id
       LEFT JOIN systems ts ON ts.id = CASE WHEN tr.kind = 'drain' THEN tu.system_id ELSE tr.system_id END
      WHERE p.job_id = $1 AND p.id = $2
        AND ((f.id IS NOT NULL${c ? ` AND f.company_id = ${c}` : ''}) OR (tr.id IS NOT NULL${c ? ` AND ${responsibleSql('ts', c)}` : ''}))`,
    { bind, type: QueryTypes.SELECT },
  );
  return row ? { id: row.id, storageKey: row.storage_key, thumbKey: row.thumb_key, contentType: row.content_type } : null;
}

/** Findings by id in the caller's scope, as list rows (order of `ids`; ids not visible are left out). */
export async function findingsByIds(
  sequelize: Sequelize,
  scope: FindingScope,
  ids: readonly string[],
  transaction?: Transaction,
): Promise<FindingDto[]> {
  if (ids.length === 0) return [];
  const p = new Params(scope.jobId, todayIn(scope.timeZone));
  const where = whereSql(p, scope, {});
  const idsParam = p.add(ids);
  const rows = await sequelize.query<FindingRow>(`${pickedSql(`${where} AND f.id = ANY (${idsParam}::uuid[])`)} ${selectSql('f.number', p.today())} ${PICKED_FROM_SQL}`, {
    bind: p.bind,
    type: QueryTypes.SELECT,
    transaction,
  });
  const byId = new Map(rows.map((r) => [r.id, presentFinding(scope.jobId, r)]));
  return ids.flatMap((id) => byId.get(id) ?? []);
}
