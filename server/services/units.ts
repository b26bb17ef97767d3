/**
 * Units of a job: the register's reads and the writes of routes/units.ts, and the checks that a
 * unit's level, space, system and model belong to the job and fit together.
 */
import { Op, UniqueConstraintError, type Transaction } from 'sequelize';
import type { CreateUnitInput, UnitDto, UpdateUnitInput } from '../../shared/schemas/setup';
import { UNIT_KINDS, type UnitKindKey } from '../../shared/words';
import { badRequest, conflict, notFound } from '../errors';
import { Company, Crew, Level, Space, System, Unit, UnitModel } from '../models';
import { presentUnit } from '../presenters/unit';
import { afterCursor, finishPage, type PageRequest } from './paging';
import { optionalQuantity } from './quantities';
import { destroyOrConflict, likeContains, lockVersioned, type SetupWrite } from './records';
import { crewOfJob } from './crews';
import { recordUnitEvent } from './unitEvents';
import { tagList, unitIdsInUse } from './unitImportRecords';
import { isCeilingUnitKind } from '../../shared/rules/ceilings';

export const UNIT_INCLUDES = [
  { model: Level, as: 'level' },
  { model: Space, as: 'space' },
  { model: System, as: 'system' },
  { model: UnitModel, as: 'model' },
  { model: Crew, as: 'installedByCrew', include: [{ model: Company, as: 'company', attributes: ['name'] }] },
];

/**
 * The register's list: only the names of the level, space, system and model, read as plain rows
 * (`raw` + `nest`: no model instances), which is what presentUnit reads. Building instances with
 * every column of four includes cost more than the query on a 2,000-unit job (npm run bench).
 */
export const UNIT_LIST_INCLUDES = [
  { model: Level, as: 'level', attributes: ['name'] },
  { model: Space, as: 'space', attributes: ['name'] },
  { model: System, as: 'system', attributes: ['name'] },
  { model: UnitModel, as: 'model', attributes: ['name'] },
  { model: Crew, as: 'installedByCrew', attributes: ['id', 'name', 'companyId'], include: [{ model: Company, as: 'company', attributes: ['name'] }] },
];

export function kindLabel(kind: string): string {
  return UNIT_KINDS.find((k) => k.key === kind)?.label ?? kind;
}

export const duplicateTag = (tag: string) => conflict(`Tag "${tag}" is already used by another unit of this job.`, 'duplicate_tag');

function field(name: string, message: string) {
  return badRequest(`${name}: ${message}`, { [name]: message });
}

export async function checkUnitRefs(
  jobId: string,
  unit: { kind: UnitKindKey; levelId: string; spaceId: string | null; systemId: string | null; modelId: string | null },
  transaction: Transaction,
): Promise<void> {
  const level = await Level.findOne({ where: { id: unit.levelId, jobId }, transaction });
  if (!level) throw field('levelId', 'Not a level of this job.');
  if (unit.spaceId) {
    const space = await Space.findOne({ where: { id: unit.spaceId, jobId }, transaction });
    if (!space) throw field('spaceId', 'Not a space of this job.');
    if (space.levelId !== level.id) throw field('spaceId', `${space.name} is not on ${level.name}.`);
  }
  if (unit.systemId && !(await System.findOne({ where: { id: unit.systemId, jobId }, transaction }))) {
    throw field('systemId', 'Not a system of this job.');
  }
  if (unit.modelId) {
    const model = await UnitModel.findOne({ where: { id: unit.modelId, jobId }, transaction });
    if (!model) throw field('modelId', 'Not a unit model of this job.');
    if (model.unitKind !== unit.kind) {
      throw field('modelId', `${model.name} is a ${kindLabel(model.unitKind).toLowerCase()} model, not a ${kindLabel(unit.kind).toLowerCase()}.`);
    }
  }
}

export async function tagTaken(jobId: string, tag: string, exceptId: string | null, transaction: Transaction): Promise<boolean> {
  const other = await Unit.findOne({ where: { jobId, tag }, attributes: ['id'], transaction });
  return other !== null && other.id !== exceptId;
}

/** A unit of the job with its level, space, system and model, or 404. */
export async function loadUnit(jobId: string, unitId: string, transaction?: Transaction): Promise<Unit> {
  const unit = await Unit.findOne({ where: { id: unitId, jobId }, include: UNIT_INCLUDES, transaction });
  if (!unit) throw notFound('Unit not found.');
  return unit;
}

export interface UnitListFilters {
  levelId?: string;
  spaceId?: string;
  systemId?: string;
  kind?: UnitKindKey;
  q?: string;
}

/** The register's filters as a where: one for the list and for units.csv. */
function unitWhere(jobId: string, query: UnitListFilters) {
  return {
    jobId,
    ...(query.levelId ? { levelId: query.levelId } : {}),
    ...(query.spaceId ? { spaceId: query.spaceId } : {}),
    ...(query.systemId ? { systemId: query.systemId } : {}),
    ...(query.kind ? { kind: query.kind } : {}),
    ...(query.q ? { tag: { [Op.iLike]: likeContains(query.q) } } : {}),
  };
}

export async function listUnits(jobId: string, filters: UnitListFilters, page: PageRequest): Promise<{ items: UnitDto[]; nextCursor: string | null }> {
  const rows = await Unit.findAll({
    where: { ...unitWhere(jobId, filters), ...afterCursor('tag', page) },
    include: UNIT_LIST_INCLUDES,
    order: [['tag', 'ASC'], ['id', 'ASC']],
    limit: page.limit + 1,
    raw: true,
    nest: true,
  });
  const { rows: units, nextCursor } = finishPage(rows, page, (u) => u.tag);
  return { items: units.map(presentUnit), nextCursor };
}

/** Every unit the register's filters match (units.csv), with its names loaded. */
export async function unitsForExport(jobId: string, filters: UnitListFilters): Promise<Unit[]> {
  return Unit.findAll({ where: unitWhere(jobId, filters), include: UNIT_INCLUDES, order: [['tag', 'ASC'], ['id', 'ASC']] });
}

export async function createUnit({ transaction, jobId }: SetupWrite, input: CreateUnitInput): Promise<Unit> {
  const capacity = optionalQuantity(input.capacity, 'capacity', 'capacity') ?? null;
  const refs = {
    kind: input.kind,
    levelId: input.levelId,
    spaceId: input.spaceId ?? null,
    systemId: input.systemId ?? null,
    modelId: input.modelId ?? null,
  };
  try {
    await checkUnitRefs(jobId, refs, transaction);
    if (await tagTaken(jobId, input.tag, null, transaction)) throw duplicateTag(input.tag);
    const installedByCrewId = input.installedByCrewId ? (await crewOfJob(jobId, input.installedByCrewId, transaction)).id : null;
    const created = await Unit.create({ jobId, tag: input.tag, capacity, installedByCrewId, mountPosition: input.mountPosition ?? null, ...refs }, { transaction });
    return await loadUnit(jobId, created.id, transaction);
  } catch (err) {
    if (err instanceof UniqueConstraintError) throw duplicateTag(input.tag);
    throw err;
  }
}

/**
 * Changes a unit (If-Match); moving it to another level clears its plan pin. A GC manager's
 * exclusion from the ceiling rule was decided for that unit on that level: a kind the rule does
 * not cover, or another level, ends it, kept in unit_events as a lift by whoever changed the unit
 * with the reason it ended (changing to another ceiling kind on the same level keeps it).
 */
export async function changeUnit({ transaction, jobId, ifMatch }: SetupWrite, unitId: string, input: UpdateUnitInput, actorId: string, now: Date = new Date()): Promise<Unit> {
  const capacity = optionalQuantity(input.capacity, 'capacity', 'capacity');
  try {
    const present = async (u: Unit) => presentUnit(await loadUnit(jobId, u.id, transaction));
    const unit = await lockVersioned(Unit, { id: unitId, jobId }, transaction, 'Unit not found.', ifMatch, present);
    if (input.tag !== undefined && input.tag !== unit.tag) {
      if (await tagTaken(jobId, input.tag, unit.id, transaction)) throw duplicateTag(input.tag);
      unit.tag = input.tag;
    }
    const before = { kind: unit.kind, levelId: unit.levelId };
    if (input.kind !== undefined) unit.kind = input.kind;
    if (input.levelId !== undefined && input.levelId !== unit.levelId) {
      unit.levelId = input.levelId;
      // The pin was on the old level's plan: it means nothing on another level's.
      unit.pinX = null;
      unit.pinY = null;
    }
    if (input.pinX !== undefined && input.pinY !== undefined) {
      unit.pinX = input.pinX;
      unit.pinY = input.pinY;
    }
    if (input.spaceId !== undefined) unit.spaceId = input.spaceId;
    if (input.systemId !== undefined) unit.systemId = input.systemId;
    if (input.installedByCrewId !== undefined) {
      if (input.installedByCrewId) await crewOfJob(jobId, input.installedByCrewId, transaction);
      unit.installedByCrewId = input.installedByCrewId;
    }
    if (input.modelId !== undefined) unit.modelId = input.modelId;
    if (capacity !== undefined) unit.capacity = capacity;
    if (input.mountPosition !== undefined) unit.mountPosition = input.mountPosition;
    await checkUnitRefs(
      jobId,
      { kind: unit.kind, levelId: unit.levelId, spaceId: unit.spaceId, systemId: unit.systemId, modelId: unit.modelId },
      transaction,
    );
    const exclusionEnds = unit.ceilingExcludedReason ? await exclusionEndReason(unit, before, transaction) : null;
    if (exclusionEnds) {
      unit.ceilingExcludedReason = null;
      unit.ceilingExcludedBy = null;
      unit.ceilingExcludedAt = null;
    }
    unit.version += 1;
    await unit.save({ transaction });
    if (exclusionEnds) await recordUnitEvent(transaction, { jobId, unitId: unit.id, actorId, kind: 'ceiling_exclusion_lifted', reason: exclusionEnds, at: now });
    return await loadUnit(jobId, unit.id, transaction);
  } catch (err) {
    if (err instanceof UniqueConstraintError && input.tag) throw duplicateTag(input.tag);
    throw err;
  }
}

/** Why a changed unit's ceiling exclusion ends (the words kept in unit_events), or null when it still holds. */
async function exclusionEndReason(unit: Unit, before: { kind: string; levelId: string }, transaction: Transaction): Promise<string | null> {
  if (!isCeilingUnitKind(unit.kind)) {
    return `Kind changed from ${kindLabel(before.kind).toLowerCase()} to ${kindLabel(unit.kind).toLowerCase()}: the ceiling rule does not count it, so its exclusion ended.`;
  }
  if (unit.levelId !== before.levelId) {
    const [from, to] = await Promise.all([Level.findByPk(before.levelId, { transaction }), Level.findByPk(unit.levelId, { transaction })]);
    return `Moved from ${from?.name ?? 'its level'} to ${to?.name ?? 'another level'}: the exclusion was decided for ${from?.name ?? 'its old level'}, so it ended.`;
  }
  return null;
}

export async function deleteUnit({ transaction, jobId, ifMatch }: SetupWrite, unitId: string): Promise<void> {
  const unit = await lockVersioned(Unit, { id: unitId, jobId }, transaction, 'Unit not found.', ifMatch, async (u) =>
    presentUnit(await loadUnit(jobId, u.id, transaction)),
  );
  await destroyOrConflict(unit, transaction, `Unit ${unit.tag}`);
}

/**
 * Deletes several units at once, all or none: a unit with a unit check or a finding is evidence,
 * so any such unit refuses the whole delete (409 naming them); a unit not in the job is 404.
 */
export async function deleteUnits({ transaction, jobId }: SetupWrite, unitIds: string[]): Promise<{ deleted: number }> {
  const ids = [...new Set(unitIds)];
  const units = await Unit.findAll({ where: { id: { [Op.in]: ids }, jobId }, lock: transaction.LOCK.UPDATE, transaction });
  if (units.length !== ids.length) throw notFound(`${ids.length - units.length} of the chosen units ${ids.length - units.length === 1 ? 'is' : 'are'} not in this job.`);
  const inUse = await unitIdsInUse(ids, transaction);
  if (inUse.size > 0) {
    const tags = units.filter((u) => inUse.has(u.id)).map((u) => u.tag);
    throw conflict(
      `${tagList(tags)} ${tags.length === 1 ? 'has' : 'have'} a unit check or a finding: those are kept as evidence, so nothing was deleted. Leave ${tags.length === 1 ? 'it' : 'them'} out and delete the rest.`,
      'units_in_use',
    );
  }
  for (const unit of units) await destroyOrConflict(unit, transaction, `Unit ${unit.tag}`);
  return { deleted: units.length };
}
