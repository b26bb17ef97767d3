/** Checks that a unit's level, space, system and model belong to the job and fit together. */
import type { Transaction } from 'sequelize';
import { UNIT_KINDS, type UnitKindKey } from '../../shared/words';
import { badRequest, conflict } from '../errors';
import { Level, Space, System, Unit, UnitModel } from '../models';

export const UNIT_INCLUDES = [
  { model: Level, as: 'level' },
  { model: Space, as: 'space' },
  { model: System, as: 'system' },
  { model: UnitModel, as: 'model' },
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
