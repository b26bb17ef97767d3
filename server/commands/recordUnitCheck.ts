/**
 * An inspector records a unit check: every catalogue item checked, marked ok, defect or not
 * applicable, measured values evaluated by shared/calc against the unit's limits (its model, the
 * job's settings, the code editions). A failed measurement is a defect, whatever mark was sent.
 * An item with an unresolved finding on this unit cannot be saved as OK (409
 * `open_finding_on_item`, naming the finding): the finding says otherwise until it is closed or
 * voided. One transaction; returns the check as the screen shows it.
 *
 * Completeness is the server's: the check is complete when every item of the job's catalogue that
 * applies to the unit's kind (job-added items too; retired items and the "Something else" type
 * never) has a mark in it. The phone's `complete` is kept as sent and otherwise ignored, in both
 * directions; the answer lists the applicable items left without a mark (`missing`). A partial
 * check is still saved (201): the marks are the inspector's work and may arrive from the outbox.
 */
import type { Sequelize, Transaction } from 'sequelize';
import { unitLimitResolver } from '../../shared/rules/limits';
import type { RecordCheckInput, RecordedCheckDto } from '../../shared/schemas/findings';
import { unitKindLabel, type CheckMark } from '../../shared/words';
import { badRequest, conflict, notFound } from '../errors';
import { CatalogueItem, Unit, UnitCheck, UnitCheckItem, UnitModel, type Job } from '../models';
import { applicableItems, checkDto, proposalsFor, unresolvedFindingsOn } from '../services/checks';
import { measure } from '../services/findings';
import { usableWalk } from '../services/walks';

export interface RecordUnitCheckContext {
  sequelize: Sequelize;
  transaction: Transaction;
  job: Job;
  /** The inspector or GC manager recording it. */
  actor: { id: string };
  clock?: () => Date;
}

const STATUS_WORDS = { open: 'open', fix_submitted: 'waiting for re-inspection (fix submitted)' } as Record<string, string>;

export async function recordUnitCheck(ctx: RecordUnitCheckContext, unitId: string, input: RecordCheckInput): Promise<RecordedCheckDto> {
  const { sequelize, transaction, job, actor } = ctx;
  const unit = await Unit.findOne({ where: { id: unitId, jobId: job.id }, transaction });
  if (!unit) throw notFound('Unit not found.');
  const walkId = input.walkId ? (await usableWalk(job.id, input.walkId, unit.levelId, transaction)).id : null;
  const model = unit.modelId ? await UnitModel.findOne({ where: { id: unit.modelId, jobId: job.id }, transaction }) : null;
  const resolver = unitLimitResolver({ model, job, unit });

  const catalogue = await CatalogueItem.findAll({
    where: { jobId: job.id, id: input.items.map((i) => i.catalogueItemId) },
    transaction,
  });
  const byId = new Map(catalogue.map((c) => [c.id, c]));
  const rows = input.items.map((item, index) => {
    const field = `items.${index}`;
    const entry = byId.get(item.catalogueItemId);
    if (!entry) {
      const msg = 'This item is no longer in the job\'s defect catalogue. Reload the unit check and mark the items shown.';
      throw badRequest(`${field}.catalogueItemId: ${msg}`, { [`${field}.catalogueItemId`]: msg });
    }
    if (entry.retiredAt) {
      const msg = `${entry.code} ${entry.title} is retired from this job's catalogue. Reload the unit check and mark the items shown.`;
      throw badRequest(`${field}.catalogueItemId: ${msg}`, { [`${field}.catalogueItemId`]: msg });
    }
    if (!entry.unitKinds.includes(unit.kind)) {
      const msg = `${entry.code} ${entry.title} does not apply to this unit's kind (${unitKindLabel(unit.kind)}). Reload the unit check and mark the items shown.`;
      throw badRequest(`${field}.catalogueItemId: ${msg}`, { [`${field}.catalogueItemId`]: msg });
    }
    let mark: CheckMark = item.mark;
    let measured: ReturnType<typeof measure> | null = null;
    if (item.measuredText) {
      if (mark === 'not_applicable') {
        const msg = 'An item marked not applicable takes no measured value.';
        throw badRequest(`${field}.measuredText: ${msg}`, { [`${field}.measuredText`]: msg });
      }
      measured = measure(entry, item.measuredText, resolver, job, `${field}.measuredText`);
      // A failed measurement is a defect, whatever mark was sent.
      if (measured.result.status === 'fail') mark = 'defect';
    }
    return {
      catalogueItemId: entry.id,
      mark,
      measuredText: measured?.measuredText ?? null,
      measuredValue: measured?.measuredValue ?? null,
      result: measured?.result ?? null,
      position: index + 1,
    };
  });

  const okIds = rows.filter((r) => r.mark === 'ok').map((r) => r.catalogueItemId);
  const [unresolved] = await unresolvedFindingsOn(job.id, unit.id, okIds, transaction);
  if (unresolved) {
    const entry = byId.get(unresolved.catalogueItemId)!;
    throw conflict(
      `${entry.code} ${entry.title} cannot be marked OK: finding #${unresolved.number} "${unresolved.title}" on this unit is still ` +
        `${STATUS_WORDS[unresolved.status] ?? unresolved.status}. Mark the item Defect, or close or void the finding first.`,
      'open_finding_on_item',
    );
  }

  const marked = new Set(rows.map((r) => r.catalogueItemId));
  const missing = (await applicableItems(job.id, unit.kind, transaction))
    .filter((c) => !marked.has(c.id))
    .map((c) => ({ catalogueItemId: c.id, code: c.code, title: c.title }));
  const check = await UnitCheck.create(
    {
      jobId: job.id,
      unitId: unit.id,
      walkId,
      checkedBy: actor.id,
      checkedAt: (ctx.clock ?? (() => new Date()))(),
      complete: missing.length === 0,
      completeSent: input.complete ?? null,
    },
    { transaction },
  );
  await UnitCheckItem.bulkCreate(
    rows.map((r) => ({ ...r, unitCheckId: check.id })),
    { transaction },
  );
  const dto = await checkDto(sequelize, check.id, proposalsFor(sequelize, job, unit, catalogue, transaction), transaction);
  return { ...dto, missing };
}
