/**
 * A job's defect catalogue: it starts as a copy of Trimout's built-in catalogue; the reads and
 * writes of routes/catalogue.ts. Items are retired, never deleted (findings refer to them).
 */
import { Op, UniqueConstraintError, type Transaction } from 'sequelize';
import { BUILTIN_CATALOGUE, CAUTION_REQUIRED, needsCaution } from '../../shared/catalogue';
import type { CatalogueGroup, MeasuredRule } from '../../shared/catalogue/types';
import type { CatalogueItemDto, CreateCatalogueItemInput, UpdateCatalogueItemInput } from '../../shared/schemas/setup';
import type { UnitKindKey } from '../../shared/words';
import { badRequest, conflict, notFound } from '../errors';
import { CatalogueItem } from '../models';
import { presentCatalogueItem } from '../presenters/catalogue';
import { afterCursor, finishPage, type PageRequest } from './paging';
import { lockJob, lockVersioned, type SetupWrite } from './records';

/**
 * Copies every built-in item the job does not hold yet (by code). Returns how many were added.
 * A new job's items take the catalogue's order (positions 1..n); items added to a job that holds
 * some already go after them, in catalogue order, as upgradeBuiltinCatalogues adds them.
 */
export async function copyBuiltinCatalogue(jobId: string, transaction: Transaction): Promise<number> {
  const heldItems = await CatalogueItem.findAll({ where: { jobId }, attributes: ['code', 'position'], transaction });
  const held = new Set(heldItems.map((i) => i.code));
  const last = heldItems.reduce((max, i) => Math.max(max, i.position), 0);
  const rows = BUILTIN_CATALOGUE.filter((item) => !held.has(item.code))
    .map((item, added) => ({ item, index: last + added }))
    .map(({ item, index }) => ({
      jobId,
      code: item.code,
      group: item.group,
      title: item.title,
      description: item.description,
      unitKinds: [...item.unitKinds],
      defaultSeverity: item.defaultSeverity,
      trade: item.trade,
      measuredRule: item.measuredRule ?? null,
      fixGuidance: item.fixGuidance,
      caution: item.caution ?? null,
      needsCeilingAccess: item.needsCeilingAccess,
      builtin: true,
      followsBuiltin: true,
      position: index + 1,
    }));
  if (rows.length > 0) await CatalogueItem.bulkCreate(rows, { transaction });
  return rows.length;
}

export interface CatalogueFilters {
  unitKind?: UnitKindKey;
  group?: CatalogueGroup;
  includeRetired?: boolean;
}

export async function listCatalogue(jobId: string, filters: CatalogueFilters, page: PageRequest): Promise<{ items: CatalogueItemDto[]; nextCursor: string | null }> {
  const rows = await CatalogueItem.findAll({
    where: {
      jobId,
      // The other type ("Something else") is no defect to check for: it is not listed.
      isOther: false,
      ...(filters.unitKind ? { unitKinds: { [Op.contains]: [filters.unitKind] } } : {}),
      ...(filters.group ? { group: filters.group } : {}),
      ...(filters.includeRetired ? {} : { retiredAt: null }),
      ...afterCursor('position', page),
    },
    order: [['position', 'ASC'], ['id', 'ASC']],
    limit: page.limit + 1,
  });
  const { rows: items, nextCursor } = finishPage(rows, page, (i) => i.position);
  return { items: items.map(presentCatalogueItem), nextCursor };
}

export async function findCatalogueItem(jobId: string, itemId: string): Promise<CatalogueItem> {
  const item = await CatalogueItem.findOne({ where: { id: itemId, jobId, isOther: false } });
  if (!item) throw notFound('Catalogue item not found.');
  return item;
}

const duplicateCode = (code: string) => conflict(`Code ${code} is already in this job's catalogue (retired items keep their code).`, 'duplicate');

type CreateInput = Omit<CreateCatalogueItemInput, 'code' | 'caution'> & { code: string; caution?: string | null };
type UpdateInput = Omit<UpdateCatalogueItemInput, 'caution'> & { caution?: string | null };

/** A job's own item, appended last (positions of one job are serialised). */
export async function createCatalogueItem({ transaction, jobId }: SetupWrite, input: CreateInput): Promise<CatalogueItem> {
  try {
    await lockJob(jobId, transaction);
    if (await CatalogueItem.findOne({ where: { jobId, code: input.code }, transaction })) throw duplicateCode(input.code);
    const max = (await CatalogueItem.max<number, CatalogueItem>('position', { where: { jobId }, transaction })) ?? 0;
    return await CatalogueItem.create(
      {
        jobId,
        code: input.code,
        group: input.group,
        title: input.title,
        description: input.description,
        unitKinds: [...input.unitKinds],
        defaultSeverity: input.defaultSeverity,
        trade: input.trade,
        measuredRule: (input.measuredRule ?? null) as MeasuredRule | null,
        fixGuidance: input.fixGuidance,
        caution: input.caution ?? null,
        needsCeilingAccess: input.needsCeilingAccess,
        builtin: false,
        position: max + 1,
      },
      { transaction },
    );
  } catch (err) {
    if (err instanceof UniqueConstraintError) throw duplicateCode(input.code);
    throw err;
  }
}

/** Changes an item (If-Match); retired: true retires it, false brings it back. */
export async function changeCatalogueItem({ transaction, jobId, ifMatch }: SetupWrite, itemId: string, input: UpdateInput): Promise<CatalogueItem> {
  const item = await lockVersioned(CatalogueItem, { id: itemId, jobId }, transaction, 'Catalogue item not found.', ifMatch, presentCatalogueItem);
  if (input.group !== undefined) item.group = input.group;
  if (input.title !== undefined) item.title = input.title;
  if (input.description !== undefined) item.description = input.description;
  if (input.unitKinds !== undefined) item.unitKinds = [...input.unitKinds];
  if (input.defaultSeverity !== undefined) item.defaultSeverity = input.defaultSeverity;
  if (input.trade !== undefined) item.trade = input.trade;
  if (input.measuredRule !== undefined) item.measuredRule = (input.measuredRule ?? null) as MeasuredRule | null;
  if (input.fixGuidance !== undefined) item.fixGuidance = input.fixGuidance;
  if (input.caution !== undefined) item.caution = input.caution;
  if (input.needsCeilingAccess !== undefined) item.needsCeilingAccess = input.needsCeilingAccess;
  if (input.retired === true && !item.retiredAt) item.retiredAt = new Date();
  if (input.retired === false) item.retiredAt = null;
  // An edit leaves hazardous work with its caution, whatever field it changed (the item as it would
  // be after the change is checked). Retiring or bringing back alone is no edit: an item copied
  // before this rule can still be retired.
  const edits = Object.entries(input).some(([key, value]) => key !== 'retired' && value !== undefined);
  if (edits && needsCaution(item) && !item.caution) throw badRequest(`caution: ${CAUTION_REQUIRED}`, { caution: CAUTION_REQUIRED });
  // The job's own words from now on: the built-in catalogue's later changes no longer reach this copy.
  if (edits) item.followsBuiltin = false;
  item.version += 1;
  await item.save({ transaction });
  return item;
}

/** DELETE retires the item (findings keep referring to it); retiring twice changes nothing. */
export async function retireCatalogueItem({ transaction, jobId, ifMatch }: SetupWrite, itemId: string): Promise<CatalogueItem> {
  const item = await lockVersioned(CatalogueItem, { id: itemId, jobId }, transaction, 'Catalogue item not found.', ifMatch, presentCatalogueItem);
  if (!item.retiredAt) {
    item.retiredAt = new Date();
    item.version += 1;
    await item.save({ transaction });
  }
  return item;
}
