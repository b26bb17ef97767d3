/** A unit model → UnitModelDto. */
import type { UnitModelDto } from '../../shared/schemas/setup';
import type { UnitModel } from '../models';

export function presentUnitModel(model: UnitModel, unitCount: number): UnitModelDto {
  return {
    id: model.id,
    name: model.name,
    modelNumber: model.modelNumber,
    unitKind: model.unitKind,
    nominalCapacity: model.nominalCapacity,
    limits: model.limits ?? {},
    mountPosition: model.mountPosition ?? null,
    unitCount,
    version: model.version,
  };
}
