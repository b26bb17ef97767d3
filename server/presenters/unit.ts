/** A unit → UnitDto (names of its level, space, system and model). */
import type { UnitDto } from '../../shared/schemas/setup';
import type { Unit } from '../models';

/** A unit loaded with its level, space, system and model (see UNIT_INCLUDES). */
export function presentUnit(unit: Unit): UnitDto {
  return {
    id: unit.id,
    tag: unit.tag,
    kind: unit.kind,
    modelId: unit.modelId ?? null,
    modelName: unit.model?.name ?? null,
    capacity: unit.capacity,
    levelId: unit.levelId,
    levelName: unit.level?.name ?? '',
    spaceId: unit.spaceId ?? null,
    spaceName: unit.space?.name ?? null,
    systemId: unit.systemId ?? null,
    systemName: unit.system?.name ?? null,
    pinX: unit.pinX ?? null,
    pinY: unit.pinY ?? null,
    version: unit.version,
  };
}
