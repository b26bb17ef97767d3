/**
 * Unit checks: each catalogue item that applies to a unit marked ok, defect or not applicable,
 * with measured values evaluated by shared/calc. Recorded even when everything is ok (coverage).
 * POST /jobs/:jobId/units/:unitId/checks   inspector, GC manager (Idempotency-Key) → 201 UnitCheckDto
 * GET  /jobs/:jobId/units/:unitId/checks   inspector, GC manager → UnitChecksResponse (state + history)
 */
import { Router } from 'express';
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import type { RuleResult } from '../../shared/calc/rules';
import {
  checkListQuerySchema,
  checkUnitParamsSchema,
  recordCheckSchema,
  type CheckItemDto,
  type ProposedFinding,
  type RecordCheckInput,
  type UnitCheckDto,
  type UnitChecksResponse,
} from '../../shared/schemas/findings';
import type { CheckMark } from '../../shared/words';
import { badRequest, notFound } from '../errors';
import { valid, validate } from '../middleware/validate';
import { CatalogueItem, Unit, UnitCheck, UnitCheckItem, UnitModel, type Job } from '../models';
import { policy } from '../policies';
import { dueOnFor, limitResolverFor, measure, suggestCompany, type CompanyRef } from '../services/findings';
import { idempotentWrite } from '../services/idempotency';
import { finishPage, pageRequest } from '../services/paging';
import { sequelizeOf } from '../services/records';
import { walkUnitState } from '../services/walkUnits';
import { usableWalk } from '../services/walks';

const CHECK_ROLES = ['gc_manager', 'inspector'] as const;

interface CheckRow {
  id: string;
  unit_id: string;
  walk_id: string | null;
  checked_by: string;
  checker_name: string;
  checked_at: Date;
  checked_text: string;
  complete: boolean;
}

interface ItemRow {
  unit_check_id: string;
  catalogue_item_id: string;
  code: string;
  title: string;
  mark: CheckMark;
  measured_text: string | null;
  measured_value: number | null;
  result: RuleResult | null;
  quantity: string | null;
}

/** Context needed to turn a failed measurement into a proposed finding. */
interface ProposalContext {
  job: Job;
  unit: Unit;
  unitCheckId: string;
  walkId: string | null;
  company: (trade: string) => Promise<CompanyRef | null>;
  items: Map<string, { defaultSeverity: CatalogueItem['defaultSeverity']; trade: string }>;
}

async function presentItem(row: ItemRow, ctx: ProposalContext | null): Promise<CheckItemDto> {
  const r = row.result;
  let proposedFinding: ProposedFinding | null = null;
  if (ctx && r && r.status === 'fail') {
    const item = ctx.items.get(row.catalogue_item_id);
    const severity = item?.defaultSeverity ?? 'major';
    const company = item ? await ctx.company(item.trade) : null;
    proposedFinding = {
      unitId: ctx.unit.id,
      levelId: ctx.unit.levelId,
      spaceId: ctx.unit.spaceId,
      catalogueItemId: row.catalogue_item_id,
      code: row.code,
      title: row.title,
      severity,
      companyId: company?.id ?? null,
      companyName: company?.name ?? null,
      dueOn: dueOnFor(ctx.job, severity),
      measuredText: row.measured_text,
      measuredValue: row.measured_value,
      limit: r.limit,
      upper: r.upper,
      limitSource: r.limitSource,
      message: r.message,
      walkId: ctx.walkId,
      unitCheckId: ctx.unitCheckId,
    };
  }
  return {
    catalogueItemId: row.catalogue_item_id,
    code: row.code,
    title: row.title,
    mark: row.mark,
    measuredText: row.measured_text,
    measuredValue: row.measured_value,
    quantity: (row.quantity as CheckItemDto['quantity']) ?? null,
    result: r,
    pass: r ? r.pass : null,
    status: r ? r.status : null,
    margin: r ? r.margin : null,
    limitSource: r ? r.limitSource || null : null,
    message: r ? r.message : null,
    proposedFinding,
  };
}

function presentCheck(row: CheckRow, items: CheckItemDto[]): UnitCheckDto {
  return {
    id: row.id,
    unitId: row.unit_id,
    walkId: row.walk_id,
    checkedBy: { id: row.checked_by, name: row.checker_name },
    checkedAt: new Date(row.checked_at).toISOString(),
    complete: row.complete,
    items,
    counts: {
      ok: items.filter((i) => i.mark === 'ok').length,
      defect: items.filter((i) => i.mark === 'defect').length,
      notApplicable: items.filter((i) => i.mark === 'not_applicable').length,
      failedMeasurements: items.filter((i) => i.status === 'fail').length,
    },
  };
}

const CHECK_SELECT = `
  SELECT uc.id, uc.unit_id, uc.walk_id, uc.checked_by, u.name AS checker_name, uc.checked_at, uc.complete,
         to_char(uc.checked_at AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.US"Z"') AS checked_text
    FROM unit_checks uc JOIN users u ON u.id = uc.checked_by`;

async function itemRows(sequelize: Sequelize, checkIds: string[], transaction?: Transaction): Promise<ItemRow[]> {
  if (checkIds.length === 0) return [];
  return sequelize.query<ItemRow>(
    `SELECT i.unit_check_id, i.catalogue_item_id, ci.code, ci.title, i.mark, i.measured_text, i.measured_value, i.result,
            ci.measured_rule->>'quantity' AS quantity
       FROM unit_check_items i JOIN catalogue_items ci ON ci.id = i.catalogue_item_id
      WHERE i.unit_check_id = ANY ($1::uuid[])
      ORDER BY i.unit_check_id, i.position`,
    { bind: [checkIds], type: QueryTypes.SELECT, transaction },
  );
}

/** Checks as DTOs; with `proposals`, failed measurements carry a proposed finding. */
async function presentChecks(
  sequelize: Sequelize,
  rows: CheckRow[],
  proposals: Omit<ProposalContext, 'unitCheckId' | 'walkId'> | null,
  transaction?: Transaction,
): Promise<UnitCheckDto[]> {
  const items = await itemRows(
    sequelize,
    rows.map((r) => r.id),
    transaction,
  );
  const out: UnitCheckDto[] = [];
  for (const row of rows) {
    const ctx = proposals ? { ...proposals, unitCheckId: row.id, walkId: row.walk_id } : null;
    const mine: CheckItemDto[] = [];
    for (const i of items.filter((x) => x.unit_check_id === row.id)) mine.push(await presentItem(i, ctx));
    out.push(presentCheck(row, mine));
  }
  return out;
}

function companyLookup(sequelize: Sequelize, jobId: string, transaction?: Transaction) {
  const cache = new Map<string, Promise<CompanyRef | null>>();
  return (trade: string) => {
    if (!cache.has(trade)) cache.set(trade, suggestCompany(sequelize, jobId, trade, transaction));
    return cache.get(trade)!;
  };
}

export function checksRouter(): Router {
  const router = Router();

  router.post(
    '/jobs/:jobId/units/:unitId/checks',
    policy.jobMember(CHECK_ROLES),
    validate({ params: checkUnitParamsSchema, body: recordCheckSchema }),
    async (req, res) => {
      const { unitId } = valid<{ unitId: string }>(req.valid.params);
      const body = valid<RecordCheckInput>(req.valid.body);
      const { job } = req.membership!;
      const sequelize = sequelizeOf(req);
      await idempotentWrite(req, res, async (transaction) => {
        const unit = await Unit.findOne({ where: { id: unitId, jobId: job.id }, transaction });
        if (!unit) throw notFound('Unit not found.');
        const walkId = body.walkId ? (await usableWalk(job.id, body.walkId, unit.levelId, transaction)).id : null;
        const model = unit.modelId ? await UnitModel.findOne({ where: { id: unit.modelId, jobId: job.id }, transaction }) : null;
        const resolver = limitResolverFor(job, model);

        const catalogue = await CatalogueItem.findAll({
          where: { jobId: job.id, id: body.items.map((i) => i.catalogueItemId) },
          transaction,
        });
        const byId = new Map(catalogue.map((c) => [c.id, c]));
        const rows = body.items.map((input, index) => {
          const field = `items.${index}`;
          const item = byId.get(input.catalogueItemId);
          if (!item) {
            throw badRequest(`${field}.catalogueItemId: Not a defect type of this job.`, {
              [`${field}.catalogueItemId`]: 'Not a defect type of this job.',
            });
          }
          if (item.retiredAt) {
            const msg = `${item.code} ${item.title} is retired from this job's catalogue.`;
            throw badRequest(`${field}.catalogueItemId: ${msg}`, { [`${field}.catalogueItemId`]: msg });
          }
          if (!item.unitKinds.includes(unit.kind)) {
            const msg = `${item.code} ${item.title} does not apply to this unit's kind (${unit.kind}).`;
            throw badRequest(`${field}.catalogueItemId: ${msg}`, { [`${field}.catalogueItemId`]: msg });
          }
          let mark: CheckMark = input.mark;
          let measured: ReturnType<typeof measure> | null = null;
          if (input.measuredText) {
            if (mark === 'not_applicable') {
              const msg = 'An item marked not applicable takes no measured value.';
              throw badRequest(`${field}.measuredText: ${msg}`, { [`${field}.measuredText`]: msg });
            }
            measured = measure(item, input.measuredText, resolver, job, `${field}.measuredText`);
            // A failed measurement is a defect, whatever mark was sent.
            if (measured.result.status === 'fail') mark = 'defect';
          }
          return {
            catalogueItemId: item.id,
            mark,
            measuredText: measured?.measuredText ?? null,
            measuredValue: measured?.measuredValue ?? null,
            result: measured?.result ?? null,
            position: index + 1,
          };
        });

        const check = await UnitCheck.create(
          { jobId: job.id, unitId: unit.id, walkId, checkedBy: req.user!.id, checkedAt: new Date(), complete: body.complete },
          { transaction },
        );
        await UnitCheckItem.bulkCreate(
          rows.map((r) => ({ ...r, unitCheckId: check.id })),
          { transaction },
        );
        const [row] = await sequelize.query<CheckRow>(`${CHECK_SELECT} WHERE uc.id = $1`, {
          bind: [check.id],
          type: QueryTypes.SELECT,
          transaction,
        });
        const [dto] = await presentChecks(
          sequelize,
          [row!],
          {
            job,
            unit,
            company: companyLookup(sequelize, job.id, transaction),
            items: new Map(catalogue.map((c) => [c.id, { defaultSeverity: c.defaultSeverity, trade: c.trade }])),
          },
          transaction,
        );
        return { status: 201, body: dto };
      });
    },
  );

  router.get(
    '/jobs/:jobId/units/:unitId/checks',
    policy.jobMember(CHECK_ROLES),
    validate({ params: checkUnitParamsSchema, query: checkListQuerySchema }),
    async (req, res) => {
      const { unitId } = valid<{ unitId: string }>(req.valid.params);
      const { job } = req.membership!;
      const sequelize = sequelizeOf(req);
      const unit = await Unit.findOne({ where: { id: unitId, jobId: job.id } });
      if (!unit) throw notFound('Unit not found.');
      const page = pageRequest(req, { sort: '-checkedAt', value: 'timestamp' });
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
      const proposals = {
        job,
        unit,
        company: companyLookup(sequelize, job.id),
        items: new Map(catalogue.map((c) => [c.id, { defaultSeverity: c.defaultSeverity, trade: c.trade }])),
      };
      const items = await presentChecks(sequelize, kept, proposals);
      // The current check is the latest one, which is the first of the first page.
      let current: UnitCheckDto | null = page.after ? null : (items[0] ?? null);
      if (page.after) {
        const [latest] = await sequelize.query<CheckRow>(
          `${CHECK_SELECT} WHERE uc.job_id = $1 AND uc.unit_id = $2 ORDER BY uc.checked_at DESC, uc.id DESC LIMIT 1`,
          { bind: [job.id, unit.id], type: QueryTypes.SELECT },
        );
        current = latest ? ((await presentChecks(sequelize, [latest], proposals))[0] ?? null) : null;
      }
      const state = await walkUnitState(sequelize, job.id, unit.levelId, unit.id);
      const body: UnitChecksResponse = { unit: state!, current, items, nextCursor };
      res.json(body);
    },
  );

  return router;
}
