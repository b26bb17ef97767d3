/** A unit → UnitDto (names of its level, space, system and model). */
import { mountPositionOf } from '../../shared/calc/refrigerant';
import type { UnitDto } from '../../shared/schemas/setup';
import type { Unit } from '../models';

/** A unit loaded with its level, space, system and model (see UNIT_INCLUDES). */
export function presentUnit(unit: Unit): UnitDto {
  const effective = mountPositionOf({ kind: unit.kind, unit: unit.mountPosition, model: unit.model?.mountPosition });
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
    installedByCrew: unit.installedByCrew?.id
      ? { id: unit.installedByCrew.id, name: unit.installedByCrew.name, companyId: unit.installedByCrew.companyId, companyName: unit.installedByCrew.company?.name ?? '' }
      : null,
    mountPosition: unit.mountPosition ?? null,
    effectiveMount: effective.mount && effective.from ? { mount: effective.mount, from: effective.from } : null,
    pinX: unit.pinX ?? null,
    pinY: unit.pinY ?? null,
    version: unit.version,
  };
}
