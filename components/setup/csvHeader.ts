/**
 * What the import screen needs of a CSV to offer a column mapping: the header row, read by the one
 * CSV reader the server reads the whole file with (shared/rules/csvRead.ts: byte-order mark,
 * comma, semicolon or tab, RFC 4180 quoting).
 */
import { readCsvHeader } from '../../shared/rules/csvRead';
import { guessScheduleMapping, scheduleFieldOfHeader } from '../../shared/rules/schedule';
import type { UnitImportField } from '../../shared/schemas/setup';

/** The cells of the first record of `csv` (quoted cells may hold separators, quotes and line breaks). */
export function readHeader(csv: string): string[] {
  return readCsvHeader(csv);
}

/**
 * A first guess at which field each header holds, by its name (the server's own reading,
 * shared/rules/schedule.ts): "Capacity (Btu/h)", "Cooling capacity (kW)" and "Nominal cooling [MBH]"
 * are all capacity. Each field is used once.
 */
export function guessMapping(headers: readonly string[]): Record<string, UnitImportField> {
  return guessScheduleMapping(headers);
}

/** Headers that name a field but are left on "Ignore": said aloud, never skipped silently. */
export function ignoredButNamed(headers: readonly string[], mapping: Record<string, UnitImportField>): Array<{ header: string; field: UnitImportField }> {
  const mapped = new Set(Object.values(mapping));
  return headers.flatMap((header) => {
    const field = scheduleFieldOfHeader(header);
    return field && !(header in mapping) && !mapped.has(field) ? [{ header, field }] : [];
  });
}
