/**
 * Just enough CSV reading for the import screen to offer a column mapping: the header row
 * (RFC 4180 quoting) and a count of data lines. The server parses the whole file (csv-parse).
 */
import { UNIT_IMPORT_FIELDS, type UnitImportField } from '../../shared/schemas/setup';

/** The cells of the first record of `csv` (quoted cells may hold commas, quotes and line breaks). */
export function readHeader(csv: string): string[] {
  const text = csv.replace(/^\uFEFF/, '');
  const cells: string[] = [];
  let cell = '';
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const ch = text[i]!;
    if (quoted) {
      if (ch === '"' && text[i + 1] === '"') {
        cell += '"';
        i++;
      } else if (ch === '"') quoted = false;
      else cell += ch;
      continue;
    }
    if (ch === '"') quoted = true;
    else if (ch === ',') {
      cells.push(cell.trim());
      cell = '';
    } else if (ch === '\n' || ch === '\r') break;
    else cell += ch;
  }
  cells.push(cell.trim());
  return cells.length === 1 && cells[0] === '' ? [] : cells;
}

const SYNONYMS: Record<UnitImportField, string[]> = {
  tag: ['tag', 'unittag', 'equipmenttag', 'mark', 'unit', 'unitid'],
  kind: ['kind', 'unitkind', 'type', 'unittype', 'style'],
  model: ['model', 'modelname', 'unitmodel', 'modelnumber'],
  capacity: ['capacity', 'nominalcapacity', 'size', 'cooling', 'coolingcapacity'],
  level: ['level', 'floor', 'storey', 'story'],
  space: ['space', 'room', 'area', 'location'],
  system: ['system', 'circuit', 'refrigerantsystem', 'outdoorunit', 'odu'],
  crew: ['crew', 'installcrew', 'installingcrew', 'installedbycrew'],
  crewCompany: ['crewcompany', 'installer', 'installingcompany', 'installercompany'],
  mount: ['mount', 'mounting', 'mountposition', 'mountingposition', 'installationposition'],
};

/** A first guess at which field each header holds, by its name. Each field is used once. */
export function guessMapping(headers: readonly string[]): Record<string, UnitImportField> {
  const out: Record<string, UnitImportField> = {};
  const used = new Set<UnitImportField>();
  for (const h of headers) {
    const key = h.toLowerCase().replace(/[^a-z0-9]/g, '');
    const field = UNIT_IMPORT_FIELDS.find((f) => !used.has(f) && SYNONYMS[f].includes(key));
    if (field) {
      out[h] = field;
      used.add(field);
    }
  }
  return out;
}
