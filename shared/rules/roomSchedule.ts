/**
 * Reading a room schedule as architects' and GCs' spreadsheets export it: one row per room with
 * its level, its number or name, its floor area and its ceiling height. The file may start with a
 * byte-order mark, end its lines CRLF or LF, and separate cells with commas, semicolons (spreadsheets
 * set to a decimal-comma locale) or tabs (copied cells). Headers are read the common ways, and a
 * unit in a header ("Floor area (ft²)", "Area m2", "Clg ht [mm]") applies to the bare numbers of
 * its column. The file is read by the one CSV reader (csvRead.ts). The Spaces screen reads the file
 * with these and sends the rows; the server checks every value again (POST /spaces/import).
 */
import { csvProblemMessage, readCsv, type CsvDelimiter, type CsvRecord } from './csvRead';
import { headerUnit, normaliseHeader, splitHeader } from './schedule';

export type RoomField = 'level' | 'space' | 'area' | 'height';
export const ROOM_FIELDS: readonly RoomField[] = ['level', 'space', 'area', 'height'];
export const ROOM_FIELD_LABEL: Record<RoomField, string> = {
  level: 'Level',
  space: 'Room (number or name)',
  area: 'Floor area',
  height: 'Ceiling height',
};
/** The quantity each number column holds. */
const FIELD_KIND = { area: 'area', height: 'length' } as const;

/** Header spellings (normaliseHeader: lower case, letters and digits, bracketed part left out) → field. */
const ROOM_HEADERS: Record<string, RoomField> = {
  level: 'level',
  levelname: 'level',
  levelno: 'level',
  levelnumber: 'level',
  floor: 'level',
  floorname: 'level',
  floorno: 'level',
  floornumber: 'level',
  storey: 'level',
  story: 'level',
  room: 'space',
  roomno: 'space',
  roomnumber: 'space',
  roomnum: 'space',
  roomname: 'space',
  roomid: 'space',
  roomnamenumber: 'space',
  roomnumbername: 'space',
  space: 'space',
  spacename: 'space',
  spaceno: 'space',
  spacenumber: 'space',
  area: 'area',
  floorarea: 'area',
  roomarea: 'area',
  spacearea: 'area',
  netarea: 'area',
  netfloorarea: 'area',
  grossarea: 'area',
  ceilingheight: 'height',
  ceiling: 'height',
  ceilinght: 'height',
  clgheight: 'height',
  clght: 'height',
  clg: 'height',
  height: 'height',
  roomheight: 'height',
  ceilheight: 'height',
};

/** The field a room schedule's header names, or null. */
export function roomFieldOfHeader(header: string): RoomField | null {
  const { name, unit } = splitHeader(header);
  const field = ROOM_HEADERS[normaliseHeader(name)] ?? null;
  // "Height (m)" is a height; "Level (m)" is not a level with a unit: a unit must suit its column.
  if (field && unit && (field === 'level' || field === 'space')) return null;
  if ((field === 'area' || field === 'height') && unit && !roomHeaderUnit(header, field)) return null;
  return field;
}

/** The unit a number column's header gives its bare numbers ("Floor area (ft²)" → "ft²"), if it suits the field. */
export function roomHeaderUnit(header: string, field: RoomField): string | undefined {
  return field === 'area' || field === 'height' ? headerUnit(header, FIELD_KIND[field]) : undefined;
}

/** Which field each column holds (null: ignored); a field goes to the first column that names it. */
export type RoomColumns = Array<RoomField | null>;

export function guessRoomColumns(headers: readonly string[]): RoomColumns {
  const used = new Set<RoomField>();
  return headers.map((h) => {
    const field = roomFieldOfHeader(h);
    if (!field || used.has(field)) return null;
    used.add(field);
    return field;
  });
}

/** The fields a column choice still lacks: a level and a room are needed. */
export function missingRoomFields(columns: RoomColumns): RoomField[] {
  return (['level', 'space'] as const).filter((f) => !columns.includes(f));
}

/** One room as sent to POST /spaces/import (see shared/schemas/setup/spaces.ts spaceImportSchema). */
export interface RoomRow {
  level: string;
  space: string;
  area?: string;
  height?: string;
  /** The file's line, said in the server's messages. */
  line?: number;
}

/** A bare number ("12.5", "1,250") takes the header's unit; anything else goes as typed. */
export function withHeaderUnit(cell: string, unit: string | undefined): string {
  return unit && /^[0-9][0-9,]*(\.[0-9]+)?$|^\.[0-9]+$/.test(cell) ? `${cell} ${unit}` : cell;
}

/**
 * The rows of a room schedule with its columns chosen: empty area or height cells are left out
 * (the import changes only what the file gives).
 */
export function roomRows(records: readonly CsvRecord[], headers: readonly string[], columns: RoomColumns): RoomRow[] {
  const col = (f: RoomField) => columns.indexOf(f);
  const [li, si, ai, hi] = ROOM_FIELDS.map(col) as [number, number, number, number];
  const areaUnit = ai >= 0 ? roomHeaderUnit(headers[ai] ?? '', 'area') : undefined;
  const heightUnit = hi >= 0 ? roomHeaderUnit(headers[hi] ?? '', 'height') : undefined;
  return records.map((r) => {
    const cell = (i: number) => (i >= 0 ? (r.cells[i] ?? '').trim() : '');
    const row: RoomRow = { level: cell(li), space: cell(si), line: r.line };
    if (cell(ai) !== '') row.area = withHeaderUnit(cell(ai), areaUnit);
    if (cell(hi) !== '') row.height = withHeaderUnit(cell(hi), heightUnit);
    return row;
  });
}

export interface RoomSchedule {
  headers: string[];
  /** The data records (the header row left out). */
  records: CsvRecord[];
  delimiter: CsvDelimiter;
  error?: string;
}

/** A room schedule's text → its header row and data records (and what stops the file being read). */
export function readRoomSchedule(text: string): RoomSchedule {
  const { records, delimiter, problem } = readCsv(text);
  const [header, ...rows] = records;
  return { headers: header?.cells ?? [], records: rows, delimiter, ...(problem ? { error: csvProblemMessage(problem) } : {}) };
}
