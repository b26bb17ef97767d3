/** A system → SystemDto (total charge). */
import type { SystemDto } from '../../shared/schemas/setup';
import type { System } from '../models';

export function presentSystem(system: System, unitCount: number): SystemDto {
  return {
    id: system.id,
    name: system.name,
    outdoorModel: system.outdoorModel,
    refrigerant: system.refrigerant,
    factoryCharge: system.factoryCharge,
    fieldCharge: system.fieldCharge,
    totalCharge: (system.factoryCharge ?? 0) + (system.fieldCharge ?? 0),
    concentrationLimitOverride: system.concentrationLimitOverride,
    companyId: system.companyId ?? null,
    chargeBasis: system.chargeBasis ?? null,
    unitCount,
    version: system.version,
  };
}
