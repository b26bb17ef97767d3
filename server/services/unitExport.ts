/**
 * The unit register as CSV (csv-stringify), streamed. Cells are neutralised against CSV
 * injection (OWASP): a string starting with = + - @ tab CR LF or NUL gets a leading ', every
 * string cell is quoted with embedded quotes doubled, numbers stay numbers; UTF-8 BOM for
 * spreadsheet programs. The columns read back through POST /units/import.
 */
import type { Response } from 'express';
import { stringify } from 'csv-stringify';
import { fromBase } from '../../shared/calc/quantity';
import type { UnitSystem } from '../../shared/catalogue/types';
import type { Unit } from '../models';

const FORMULA_START = /^[=+\-@\t\r\n\0]/;

/** OWASP CSV Injection: prefix a ' to any cell that a spreadsheet could read as a formula. */
export function neutraliseCell(value: string): string {
  return FORMULA_START.test(value) ? `'${value}` : value;
}

export function csvStringifier() {
  return stringify({
    bom: true,
    quoted_string: true,
    record_delimiter: 'windows',
    cast: { string: (value: string) => neutraliseCell(value) },
  });
}

export function exportUnits(res: Response, units: Unit[], unitSystem: UnitSystem, fileName: string): Promise<void> {
  const capacityUnit = unitSystem === 'imperial' ? 'Btu/h' : 'kW';
  res.status(200);
  res.set('Content-Type', 'text/csv; charset=utf-8');
  res.set('Content-Disposition', `attachment; filename="${fileName}"`);
  res.set('X-Content-Type-Options', 'nosniff');
  const csv = csvStringifier();
  const done = new Promise<void>((resolve, reject) => {
    res.on('finish', resolve);
    res.on('close', resolve);
    csv.on('error', reject);
  });
  csv.pipe(res);
  csv.write(['Tag', 'Kind', 'Model', `Capacity (${capacityUnit})`, 'Level', 'Space', 'System']);
  for (const u of units) {
    const capacity = u.capacity === null ? '' : Math.round(fromBase(u.capacity, capacityUnit) * (capacityUnit === 'kW' ? 100 : 1)) / (capacityUnit === 'kW' ? 100 : 1);
    csv.write([u.tag, u.kind, u.model?.modelNumber ?? u.model?.name ?? '', capacity, u.level?.name ?? '', u.space?.name ?? '', u.system?.name ?? '']);
  }
  csv.end();
  return done;
}
