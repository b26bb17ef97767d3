/** Unit models of a job: reads and the writes of routes/unitModels.ts. */
import { Op, QueryTypes, UniqueConstraintError, type Transaction } from 'sequelize';
import { MODEL_LIMITS, type ModelLimitKey } from '../../shared/catalogue/types';
import type { CreateModelInput, StatedLimitDto, StatedLimitInput, UnitModelDto, UpdateModelInput } from '../../shared/schemas/setup';
import type { UnitKindKey } from '../../shared/words';
import { badRequest, conflict, notFound } from '../errors';
import { Unit, UnitModel } from '../models';
import { presentUnitModel } from '../presenters/unitModel';
import { afterCursor, finishPage, type PageRequest } from './paging';
import { optionalQuantity, statedLimit } from './quantities';
import { destroyOrConflict, lockVersioned, lowerEquals, refuseIfReferenced, type SetupWrite } from './records';

async function unitCounts(ids: string[], transaction?: Transaction): Promise<Map<string, number>> {
  if (ids.length === 0) return new Map();
  const rows = await UnitModel.sequelize!.query<{ model_id: string; n: string }>(
    `SELECT model_id, count(*) AS n FROM units WHERE model_id = ANY($1::uuid[]) GROUP BY model_id`,
    { bind: [ids], type: QueryTypes.SELECT, transaction },
  );
  return new Map(rows.map((r) => [r.model_id, Number(r.n)]));
}

/** One model with the count of units using it. */
export async function unitModelDto(model: UnitModel, transaction?: Transaction): Promise<UnitModelDto> {
  return presentUnitModel(model, (await unitCounts([model.id], transaction)).get(model.id) ?? 0);
}

/** Applies limit inputs onto `current`: each key parsed to base units; null removes it. */
export function mergeLimits(
  current: Partial<Record<ModelLimitKey, StatedLimitDto>>,
  input: Partial<Record<ModelLimitKey, StatedLimitInput | null>> | undefined,
): Partial<Record<ModelLimitKey, StatedLimitDto>> {
  const next = { ...current };
  if (!input) return next;
  for (const def of MODEL_LIMITS) {
    const entry = input[def.key];
    if (entry === undefined) continue;
    if (entry === null) delete next[def.key];
    else next[def.key] = statedLimit(entry, def.quantity, `limits.${def.key}.value`);
  }
  return next;
}

const duplicateName = (name: string) => conflict(`This job already has a unit model named "${name}".`, 'duplicate');

export async function listUnitModels(
  jobId: string,
  unitKind: UnitKindKey | undefined,
  page: PageRequest,
): Promise<{ items: UnitModelDto[]; nextCursor: string | null }> {
  const rows = await UnitModel.findAll({
    where: { jobId, ...(unitKind ? { unitKind } : {}), ...afterCursor('name', page) },
    order: [['name', 'ASC'], ['id', 'ASC']],
    limit: page.limit + 1,
  });
  const { rows: models, nextCursor } = finishPage(rows, page, (m) => m.name);
  const counts = await unitCounts(models.map((m) => m.id));
  return { items: models.map((m) => presentUnitModel(m, counts.get(m.id) ?? 0)), nextCursor };
}

export async function findUnitModel(jobId: string, modelId: string): Promise<UnitModel> {
  const model = await UnitModel.findOne({ where: { id: modelId, jobId } });
  if (!model) throw notFound('Unit model not found.');
  return model;
}

export async function createUnitModel({ transaction, jobId }: SetupWrite, input: CreateModelInput & { modelNumber?: string | null }): Promise<UnitModel> {
  const nominalCapacity = optionalQuantity(input.nominalCapacity, 'capacity', 'nominalCapacity') ?? null;
  const limits = mergeLimits({}, input.limits);
  if (await UnitModel.findOne({ where: { jobId, ...lowerEquals('name', input.name) }, transaction })) throw duplicateName(input.name);
  return UnitModel.create(
    { jobId, name: input.name, modelNumber: input.modelNumber ?? null, unitKind: input.unitKind, nominalCapacity, limits, mountPosition: input.mountPosition ?? null },
    { transaction },
  );
}

/** Changes a model (If-Match); limits merge by key. Returns the model and its unit count. */
export async function changeUnitModel(
  { transaction, jobId, ifMatch }: SetupWrite,
  modelId: string,
  input: UpdateModelInput & { modelNumber?: string | null },
): Promise<UnitModelDto> {
  const nominalCapacity = optionalQuantity(input.nominalCapacity, 'capacity', 'nominalCapacity');
  try {
    const model = await lockVersioned(UnitModel, { id: modelId, jobId }, transaction, 'Unit model not found.', ifMatch, (m) =>
      unitModelDto(m, transaction),
    );
    if (input.unitKind !== undefined && input.unitKind !== model.unitKind) {
      const using = await Unit.count({ where: { modelId, kind: { [Op.ne]: input.unitKind } }, transaction });
      if (using > 0) {
        throw badRequest(`unitKind: ${using} unit(s) of another kind use this model; change them first.`, {
          unitKind: 'Units of another kind use this model.',
        });
      }
      model.unitKind = input.unitKind;
    }
    if (input.name !== undefined) model.name = input.name;
    if (input.modelNumber !== undefined) model.modelNumber = input.modelNumber;
    if (nominalCapacity !== undefined) model.nominalCapacity = nominalCapacity;
    if (input.limits !== undefined) model.limits = mergeLimits(model.limits ?? {}, input.limits);
    if (input.mountPosition !== undefined) model.mountPosition = input.mountPosition;
    model.version += 1;
    await model.save({ transaction });
    return unitModelDto(model, transaction);
  } catch (err) {
    if (err instanceof UniqueConstraintError && input.name) throw duplicateName(input.name);
    throw err;
  }
}

export async function deleteUnitModel({ transaction, jobId, ifMatch }: SetupWrite, modelId: string): Promise<void> {
  const model = await lockVersioned(UnitModel, { id: modelId, jobId }, transaction, 'Unit model not found.', ifMatch, (m) => presentUnitModel(m, 0));
  const units = await Unit.count({ where: { modelId }, transaction });
  refuseIfReferenced(`Model ${model.name}`, [[units, 'unit', 'units']], 'Change those units to another model (or none) first.');
  await destroyOrConflict(model, transaction, `Model ${model.name}`);
}
