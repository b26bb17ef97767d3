/**
 * The unit register as CSV: the rows are already in memory (a job holds a few thousand units
 * at most) and go out through csvStream.ts `sendRecordsAsCsv` (backpressure, the cell rules of
 * csvSafe.ts: OWASP CSV injection, BOM, quoted text, numbers stay numbers).
 * The columns read back through POST /units/import.
 */
import type { Response } from 'express';
import { fromBase } from '../../shared/calc/quantity';
import type { UnitSystem } from '../../shared/catalogue/types';
import type { Unit } from '../models';
import type { CsvCell } from './csvSafe';
import { sendRecordsAsCsv } from './csvStream';

// Kept for callers that imported them from here before csvSafe.ts existed.
export { csvStringifier, neutraliseCell } from './csvSafe';

export function exportUnits(res: Response, units: Unit[], unitSystem: UnitSystem, fileName: string): Promise<void> {
  const capacityUnit = unitSystem === 'imperial' ? 'Btu/h' : 'kW';
  const round = capacityUnit === 'kW' ? 100 : 1;
  function* records(): Generator<CsvCell[]> {
    yield ['Tag', 'Kind', 'Model', `Capacity (${capacityUnit})`, 'Level', 'Space', 'System'];
    for (const u of units) {
      const capacity = u.capacity === null ? '' : Math.round(fromBase(u.capacity, capacityUnit) * round) / round;
      yield [u.tag, u.kind, u.model?.modelNumber ?? u.model?.name ?? '', capacity, u.level?.name ?? '', u.space?.name ?? '', u.system?.name ?? ''];
    }
  }
  return sendRecordsAsCsv(res, fileName, records());
}
