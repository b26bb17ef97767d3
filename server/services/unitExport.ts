/**
 * The unit register as CSV: the rows are already in memory (a job holds a few thousand units
 * at most) and go out through csvStream.ts `sendRecordsAsCsv` (backpressure, the cell rules of
 * csvSafe.ts: OWASP CSV injection, BOM, quoted text, numbers stay numbers).
 * The columns read back through POST /units/import: an exported file re-imports to the same units.
 */
import type { Response } from 'express';
import { fromBase } from '../../shared/calc/quantity';
import type { UnitSystem } from '../../shared/catalogue/types';
import type { Unit } from '../models';
import type { CsvCell } from './csvSafe';
import { sendRecordsAsCsv } from './csvStream';

// Kept for callers that imported them from here before csvSafe.ts existed.
export { csvStringifier, neutraliseCell } from './csvSafe';

/**
 * The columns, in the import's field order (UNIT_IMPORT_FIELDS) under headers its aliases read:
 * tag, kind, model, capacity, level, space, system, crew, crewCompany, mount. The crew company is
 * always written beside the crew, so a crew name two companies use re-imports to the right one.
 */
const HEADER = (capacityUnit: string): CsvCell[] => ['Tag', 'Kind', 'Model', `Capacity (${capacityUnit})`, 'Level', 'Space', 'System', 'Crew', 'Crew company', 'Mounting'];

export function exportUnits(res: Response, units: Unit[], unitSystem: UnitSystem, fileName: string): Promise<void> {
  const capacityUnit = unitSystem === 'imperial' ? 'Btu/h' : 'kW';
  const round = capacityUnit === 'kW' ? 100 : 1;
  function* records(): Generator<CsvCell[]> {
    yield HEADER(capacityUnit);
    for (const u of units) {
      const capacity = u.capacity === null ? '' : Math.round(fromBase(u.capacity, capacityUnit) * round) / round;
      const crew = u.installedByCrew;
      yield [
        u.tag,
        u.kind,
        u.model?.modelNumber ?? u.model?.name ?? '',
        capacity,
        u.level?.name ?? '',
        u.space?.name ?? '',
        u.system?.name ?? '',
        crew?.name ?? '',
        crew ? (crew.company?.name ?? '') : '',
        // The unit's own position only: one its model or kind implies stays implied after a re-import.
        u.mountPosition ?? '',
      ];
    }
  }
  return sendRecordsAsCsv(res, fileName, records());
}
