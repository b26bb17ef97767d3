/**
 * Unit checks: reading them with their items (and, for failed measurements, the finding the
 * inspector is offered), and the findings still unresolved on a unit's catalogue items.
 */
import { Op, QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import type { CheckItemDto, ProposedFinding, UnitCheckDto, UnitChecksResponse } from '../../shared/schemas/findings';
import { decide } from '../../shared/findingStatus';
import { dueOnFor } from '../../shared/rules/due';
import { FINDING_STATUSES, type FindingStatus, type UnitKindKey } from '../../shared/words';
import { notFound } from '../errors';
import { CatalogueItem, Finding, Unit, type Job } from '../models';
import { presentCheck, presentCheckItem, type CheckItemRow, type CheckRow } from '../presenters/check';
import { suggestCompany, type CompanyRef } from './findings';
import { finishPage, type PageRequest } from './paging';
import { walkUnitState } from './walkUnits';

/**
 * A finding is unresolved while the status machine still lets it be voided: every status before
 * closed or voided (open, fix submitted).
 */
export const UNRESOLVED_STATUSES: readonly FindingStatus[] = FINDING_STATUSES.filter((s) => decide(s, 'void', 'gc_manager', true).allowed);

export interface UnresolvedFinding {
  id: string;
  number: number;
  catalogueItemId: string;
  title: string;
  status: FindingStatus;
}

/** Unresolved findings on this unit for these catalogue items, lowest number first. */
export async function unresolvedFindingsOn(
  jobId: string,
  unitId: string,
  catalogueItemIds: string[],
  transaction?: Transaction,
): Promise<UnresolvedFinding[]> {
  if (catalogueItemIds.length === 0) return [];
  const rows = await Finding.findAll({
    where: { jobId, unitId, catalogueItemId: { [Op.in]: catalogueItemIds }, status: { [Op.in]: [...UNRESOLVED_STATUSES] } },
    attributes: ['id', 'number', 'catalogueItemId', 'status'],
    order: [['number', 'ASC']],
    transaction,
  });
  if (rows.length === 0) return [];
  const items = await CatalogueItem.findAll({ where: { id: [...new Set(rows.map((f) => f.catalogueItemId))] }, attributes: ['id', 'title'], transaction });
  const title = new Map(items.map((i) => [i.id, i.title]));
  return rows.map((f) => ({ id: f.id, number: f.number, catalogueItemId: f.catalogueItemId, title: title.get(f.catalogueItemId) ?? '', status: f.status }));
}

/**
 * The catalogue items a check of a unit of this kind must mark to be complete, in catalogue order:
 * the job's items (built-in copies and its own) that apply to the kind, not retired, not the
 * "Something else" type. The same list the unit check screen shows.
 */
export async function applicableItems(jobId: string, kind: UnitKindKey, transaction?: Transaction): Promise<CatalogueItem[]> {
  return CatalogueItem.findAll({
    where: { jobId, isOther: false, retiredAt: null, unitKinds: { [Op.contains]: [kind] } },
    attributes: ['id', 'code', 'title', 'position'],
    order: [['position', 'ASC'], ['code', 'ASC']],
    transaction,
  });
}

const CHECK_SELECT = `
  SELECT uc.id, uc.unit_id, uc.walk_id, uc.checked_by, u.name AS checker_name, uc.checked_at, uc.complete,
         to_char(uc.checked_at AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.US"Z"') AS checked_text
    FROM unit_checks uc JOIN users u ON u.id = uc.checked_by`;

async function itemRows(sequelize: Sequelize, checkIds: string[], transaction?: Transaction): Promise<CheckItemRow[]> {
  if (checkIds.length === 0) return [];
  return sequelize.query<CheckItemRow>(
    `SELECT i.unit_check_id, i.catalogue_item_id, ci.code, ci.title, i.mark, i.measured_text, i.measured_value, i.result,
            ci.measured_rule->>'quantity' AS quantity
       FROM unit_check_items i JOIN catalogue_items ci ON ci.id = i.catalogue_item_id
      WHERE i.unit_check_id = ANY ($1::uuid[])
      ORDER BY i.unit_check_id, i.position`,
    { bind: [checkIds], type: QueryTypes.SELECT, transaction },
  );
}

/** What turning a failed measurement into a proposed finding needs. */
export interface Proposals {
  job: Job;
  unit: Unit;
  company: (trade: string) => Promise<CompanyRef | null>;
  items: Map<string, { defaultSeverity: CatalogueItem['defaultSeverity']; trade: string }>;
}

/** The job company suggested per trade, looked up once per trade. */
export function companyLookup(sequelize: Sequelize, jobId: string, transaction?: Transaction) {
  const cache = new Map<string, Promise<CompanyRef | null>>();
  return (trade: string) => {
    if (!cache.has(trade)) cache.set(trade, suggestCompany(sequelize, jobId, trade, transaction));
    return cache.get(trade)!;
  };
}

export function proposalsFor(sequelize: Sequelize, job: Job, unit: Unit, catalogue: CatalogueItem[], transaction?: Transaction): Proposals {
  return {
    job,
    unit,
    company: companyLookup(sequelize, job.id, transaction),
    items: new Map(catalogue.map((c) => [c.id, { defaultSeverity: c.defaultSeverity, trade: c.trade }])),
  };
}

async function proposedFinding(row: CheckItemRow, check: CheckRow, p: Proposals): Promise<ProposedFinding | null> {
  const r = row.result;
  if (!r || r.status !== 'fail') return null;
  const item = p.items.get(row.catalogue_item_id);
  const severity = item?.defaultSeverity ?? 'major';
  const company = item ? await p.company(item.trade) : null;
  return {
    unitId: p.unit.id,
    levelId: p.unit.levelId,
    spaceId: p.unit.spaceId,
    catalogueItemId: row.catalogue_item_id,
    code: row.code,
    title: row.title,
    severity,
    companyId: company?.id ?? null,
    companyName: company?.name ?? null,
    dueOn: dueOnFor(p.job, severity),
    measuredText: row.measured_text,
    measuredValue: row.measured_value,
    limit: r.limit,
    upper: r.upper,
    limitSource: r.limitSource,
    message: r.message,
    walkId: check.walk_id,
    unitCheckId: check.id,
  };
}

/** Checks as DTOs; with `proposals`, failed measurements carry a proposed finding. */
export async function checkDtos(sequelize: Sequelize, rows: CheckRow[], proposals: Proposals | null, transaction?: Transaction): Promise<UnitCheckDto[]> {
  const items = await itemRows(
    sequelize,
    rows.map((r) => r.id),
    transaction,
  );
  const out: UnitCheckDto[] = [];
  for (const row of rows) {
    const mine: CheckItemDto[] = [];
    for (const i of items.filter((x) => x.unit_check_id === row.id)) {
      mine.push(presentCheckItem(i, proposals ? await proposedFinding(i, row, proposals) : null));
    }
    out.push(presentCheck(row, mine));
  }
  return out;
}

/** One check as the unit check screen shows it right after saving. */
export async function checkDto(sequelize: Sequelize, checkId: string, proposals: Proposals, transaction?: Transaction): Promise<UnitCheckDto> {
  const [row] = await sequelize.query<CheckRow>(`${CHECK_SELECT} WHERE uc.id = $1`, { bind: [checkId], type: QueryTypes.SELECT, transaction });
  return (await checkDtos(sequelize, [row!], proposals, transaction))[0]!;
}

/** A unit's walk state, its current check (the latest) and its checks, newest first. */
export async function unitChecks(sequelize: Sequelize, job: Job, unitId: string, pageOf: () => PageRequest): Promise<UnitChecksResponse> {
  const unit = await Unit.findOne({ where: { id: unitId, jobId: job.id } });
  if (!unit) throw notFound('Unit not found.');
  const page = pageOf();
  const bind: unknown[] = [job.id, unit.id];
  let after = '';
  if (page.after) {
    const a = bind.push(String(page.after.value));
    const b = bind.push(page.after.id);
    after = ` AND (uc.checked_at < $${a}::timestamptz OR (uc.checked_at = $${a}::timestamptz AND uc.id < $${b}))`;
  }
  const limit = bind.push(page.limit + 1);
  const rows = await sequelize.query<CheckRow>(
    `${CHECK_SELECT} WHERE uc.job_id = $1 AND uc.unit_id = $2${after} ORDER BY uc.checked_at DESC, uc.id DESC LIMIT $${limit}`,
    { bind, type: QueryTypes.SELECT },
  );
  const { rows: kept, nextCursor } = finishPage(rows, page, (r) => r.checked_text);
  const catalogue = await CatalogueItem.findAll({ where: { jobId: job.id }, attributes: ['id', 'defaultSeverity', 'trade'] });
  const proposals = proposalsFor(sequelize, job, unit, catalogue);
  const items = await checkDtos(sequelize, kept, proposals);
  // The current check is the latest one, which is the first of the first page.
  let current: UnitCheckDto | null = page.after ? null : (items[0] ?? null);
  if (page.after) {
    const [latest] = await sequelize.query<CheckRow>(
      `${CHECK_SELECT} WHERE uc.job_id = $1 AND uc.unit_id = $2 ORDER BY uc.checked_at DESC, uc.id DESC LIMIT 1`,
      { bind: [job.id, unit.id], type: QueryTypes.SELECT },
    );
    current = latest ? ((await checkDtos(sequelize, [latest], proposals))[0] ?? null) : null;
  }
  const state = await walkUnitState(sequelize, job.id, unit.levelId, unit.id);
  return { unit: state!, current, items, nextCursor };
}
