/**
 * Units from a CSV equipment schedule (csv-parse). Columns are mapped to fields (explicitly, or
 * by header name); every bad row is reported with its line number and reason; the good rows are
 * imported in one transaction only when no row is bad: never half an import.
 */
import { parse } from 'csv-parse/sync';
import { QueryTypes, UniqueConstraintError, type Transaction } from 'sequelize';
import { parseQuantity, unitKind } from '../../shared/calc/quantity';
import { parseMountPosition, type MountPosition } from '../../shared/calc/refrigerant';
import {
  IMPORT_MAX_ROWS,
  TAG_PATTERN,
  UNIT_IMPORT_FIELDS,
  UNIT_IMPORT_REQUIRED,
  type UnitImportField,
  type UnitImportPreviewRow,
  type UnitImportReport,
  type UnitImportRowError,
  type CrewDto,
  crewLabel,
  unitImportQuerySchema,
  unitImportSchema,
} from '../../shared/schemas/setup';
import { UNIT_KINDS, type UnitKindKey } from '../../shared/words';
import { badRequest, payloadTooLarge } from '../errors';
import { zodFieldErrors } from '../middleware/validate';
import { Level, Space, System, Unit, UnitModel } from '../models';
import { listCrews } from './crews';
import { kindLabel } from './units';

const PREVIEW_MAX = 500;

/** Header spellings (lower case, letters and digits only, unit in brackets removed) → field. */
const HEADER_ALIASES: Record<string, UnitImportField> = {
  tag: 'tag',
  unittag: 'tag',
  equipmenttag: 'tag',
  unit: 'tag',
  kind: 'kind',
  unitkind: 'kind',
  type: 'kind',
  unittype: 'kind',
  model: 'model',
  modelnumber: 'model',
  unitmodel: 'model',
  capacity: 'capacity',
  nominalcapacity: 'capacity',
  level: 'level',
  floor: 'level',
  space: 'space',
  room: 'space',
  system: 'system',
  refrigerantsystem: 'system',
  crew: 'crew',
  installcrew: 'crew',
  installingcrew: 'crew',
  installedbycrew: 'crew',
  crewcompany: 'crewCompany',
  installer: 'crewCompany',
  installingcompany: 'crewCompany',
  installercompany: 'crewCompany',
  mount: 'mount',
  mounting: 'mount',
  mountposition: 'mount',
  mountingposition: 'mount',
  installationposition: 'mount',
};

function normaliseHeader(header: string): string {
  return header.replace(/\(.*?\)|\[.*?\]/g, '').toLowerCase().replace(/[^a-z0-9]/g, '');
}

/** "Capacity (Btu/h)" → "Btu/h", used for bare numbers in that column. */
function headerUnit(header: string): string | undefined {
  const inside = /[([]\s*([^)\]]+?)\s*[)\]]/.exec(header)?.[1];
  return inside && unitKind(inside) === 'capacity' ? inside : undefined;
}

/** Bytes → text; anything not UTF-8 is refused with a clear message. */
export function decodeCsv(bytes: Buffer): string {
  try {
    return new TextDecoder('utf-8', { fatal: true, ignoreBOM: false }).decode(bytes);
  } catch {
    throw notUtf8();
  }
}

export function notUtf8() {
  return badRequest(
    'The file is not UTF-8 text. Save the schedule as "CSV UTF-8" (comma delimited) and import it again.',
    { csv: 'Not UTF-8.' },
  );
}

interface ParsedRecord {
  record: string[];
  info: { lines: number };
}

export interface ImportOptions {
  text: string;
  mapping?: Record<string, UnitImportField>;
  dryRun: boolean;
}

/**
 * The import's request in either form: text/csv bytes (options in the query) or JSON
 * { csv, mapping, dryRun }. Both are checked with their shared schema; the first issue is the 400.
 */
export function importRequestOf(body: unknown, query: unknown): ImportOptions {
  if (Buffer.isBuffer(body)) {
    const parsed = unitImportQuerySchema.safeParse(query);
    if (!parsed.success) throw firstIssue(zodFieldErrors(parsed.error, 'query'));
    return { text: decodeCsv(body), mapping: undefined, dryRun: parsed.data.dryRun ?? false };
  }
  const parsed = unitImportSchema.safeParse(body ?? {});
  if (!parsed.success) throw firstIssue(zodFieldErrors(parsed.error));
  return { text: parsed.data.csv, mapping: parsed.data.mapping, dryRun: parsed.data.dryRun ?? false };
}

function firstIssue(fields: Record<string, string>) {
  const first = Object.entries(fields)[0]!;
  return badRequest(`${first[0]}: ${first[1]}`, fields);
}

/** importUnits, where a tag taken meanwhile (another import, a unit added) is a 400 and nothing is imported. */
export async function importUnitsOrRefuse(jobId: string, options: ImportOptions, transaction: Transaction): Promise<UnitImportReport> {
  try {
    return await importUnits(jobId, options, transaction);
  } catch (err) {
    if (err instanceof UniqueConstraintError) {
      throw badRequest('A tag in the file was taken while importing; nothing was imported. Run the import again to see which.', {
        csv: 'Tag taken meanwhile.',
      });
    }
    throw err;
  }
}

export async function importUnits(jobId: string, options: ImportOptions, transaction: Transaction): Promise<UnitImportReport> {
  const text = options.text.replace(/^\uFEFF/, '');
  if (text.includes('\uFFFD')) throw notUtf8();
  if (text.includes('\0')) throw badRequest('The file contains NUL bytes: it is not a CSV text file.', { csv: 'Not a text file.' });

  let records: ParsedRecord[];
  try {
    records = parse(text, { info: true, skip_empty_lines: true, relax_column_count: true, trim: true }) as unknown as ParsedRecord[];
  } catch (err) {
    const e = err as { code?: string; lines?: number };
    const where = typeof e.lines === 'number' ? ` near line ${e.lines}` : '';
    const why = e.code === 'CSV_QUOTE_NOT_CLOSED' ? 'a quoted cell is never closed' : 'its quoting or columns are malformed';
    throw badRequest(`The CSV cannot be read${where}: ${why}.`, { csv: 'Malformed CSV.' });
  }
  const header = records[0];
  if (!header) throw badRequest('The CSV is empty: it needs a header row and at least one unit.', { csv: 'Empty.' });
  const rows = records.slice(1);
  if (rows.length > IMPORT_MAX_ROWS) {
    throw payloadTooLarge(
      `The file has ${rows.length.toLocaleString('en-US')} rows; import at most ${IMPORT_MAX_ROWS.toLocaleString('en-US')} units at a time (split the file).`,
    );
  }
  if (rows.length === 0) throw badRequest('The CSV has a header row but no units.', { csv: 'No rows.' });

  // Column mapping: explicit first, then by header name.
  const headers = header.record;
  const columnOf = new Map<UnitImportField, number>();
  const applied: Record<string, UnitImportField> = {};
  for (const [name, fieldName] of Object.entries(options.mapping ?? {})) {
    const index = headers.indexOf(name);
    if (index < 0) throw badRequest(`mapping: The file has no column "${name}".`, { mapping: `No column "${name}".` });
    if (columnOf.has(fieldName)) throw badRequest(`mapping: Two columns are mapped to ${fieldName}.`, { mapping: `${fieldName} mapped twice.` });
    columnOf.set(fieldName, index);
    applied[name] = fieldName;
  }
  headers.forEach((name, index) => {
    if (name in applied) return;
    const guess = HEADER_ALIASES[normaliseHeader(name)];
    if (guess && !columnOf.has(guess)) {
      columnOf.set(guess, index);
      applied[name] = guess;
    }
  });
  const missing = UNIT_IMPORT_REQUIRED.filter((f) => !columnOf.has(f));
  if (missing.length > 0) {
    throw badRequest(
      `Missing column${missing.length > 1 ? 's' : ''}: ${missing.join(', ')}. Map a column to each of ${UNIT_IMPORT_REQUIRED.join(', ')} (fields: ${UNIT_IMPORT_FIELDS.join(', ')}).`,
      { mapping: `Missing: ${missing.join(', ')}.` },
    );
  }
  const capacityColumn = columnOf.get('capacity');
  const capacityUnit = capacityColumn !== undefined ? headerUnit(headers[capacityColumn] ?? '') : undefined;

  // What the job holds, by lower-case name.
  const levels = await Level.findAll({ where: { jobId }, transaction });
  const levelByName = new Map(levels.map((l) => [l.name.toLowerCase(), l]));
  const spaces = await Space.findAll({ where: { jobId }, transaction });
  const spaceByLevelName = new Map(spaces.map((s) => [`${s.levelId}\n${s.name.toLowerCase()}`, s]));
  const systems = await System.findAll({ where: { jobId }, transaction });
  const systemByName = new Map(systems.map((s) => [s.name.toLowerCase(), s]));
  const models = await UnitModel.findAll({ where: { jobId }, transaction });
  const modelByName = new Map<string, UnitModel>();
  for (const m of models) {
    if (m.modelNumber) modelByName.set(m.modelNumber.toLowerCase(), m);
  }
  for (const m of models) modelByName.set(m.name.toLowerCase(), m);
  const kindByName = new Map<string, UnitKindKey>();
  for (const k of UNIT_KINDS) {
    kindByName.set(k.key, k.key);
    kindByName.set(k.label.toLowerCase(), k.key);
  }
  // Crews by company name and crew name (lower case); a crew name alone may belong to several companies.
  const crews = await listCrews(Unit.sequelize!, jobId, { role: 'gc_manager', companyId: null }, undefined, transaction);
  const companiesOnJob = new Set(
    (
      await Unit.sequelize!.query<{ name: string }>(`SELECT lower(c.name) AS name FROM job_companies jc JOIN companies c ON c.id = jc.company_id WHERE jc.job_id = $1`, {
        bind: [jobId],
        type: QueryTypes.SELECT,
        transaction,
      })
    ).map((r) => r.name),
  );
  const existingTags = new Set((await Unit.findAll({ where: { jobId }, attributes: ['tag'], transaction })).map((u) => u.tag));

  const errors: UnitImportRowError[] = [];
  const good: Array<UnitImportPreviewRow & { levelId: string; spaceId: string | null; systemId: string | null; modelId: string | null; crewId: string | null }> = [];
  const tagLine = new Map<string, number>();

  for (const { record, info } of rows) {
    const line = info.lines;
    const cell = (f: UnitImportField): string => {
      const i = columnOf.get(f);
      return i === undefined ? '' : (record[i] ?? '').trim();
    };
    const rowErrors: UnitImportRowError[] = [];
    const bad = (f: UnitImportField, reason: string) => rowErrors.push({ line, field: f, reason });

    const tag = cell('tag');
    if (tag === '') bad('tag', 'Tag is empty.');
    else if (tag.length > 40 || !TAG_PATTERN.test(tag)) bad('tag', `Tag "${tag}" is not valid: use up to 40 letters, digits, spaces and . _ / # -.`);
    else if (tagLine.has(tag)) bad('tag', `Duplicate tag "${tag}" in the file (also on line ${tagLine.get(tag)}).`);
    else if (existingTags.has(tag)) bad('tag', `Tag "${tag}" is already used by a unit of this job.`);
    if (tag !== '' && !tagLine.has(tag)) tagLine.set(tag, line);

    const kindText = cell('kind');
    const kind = kindByName.get(kindText.toLowerCase());
    if (kindText === '') bad('kind', 'Unit kind is empty.');
    else if (!kind) bad('kind', `Unknown unit kind "${kindText}".`);

    const levelText = cell('level');
    const level = levelByName.get(levelText.toLowerCase());
    if (levelText === '') bad('level', 'Level is empty.');
    else if (!level) bad('level', `Unknown level "${levelText}".`);

    const spaceText = cell('space');
    let spaceId: string | null = null;
    if (spaceText !== '' && level) {
      const space = spaceByLevelName.get(`${level.id}\n${spaceText.toLowerCase()}`);
      if (!space) bad('space', `Unknown space "${spaceText}" on ${level.name}.`);
      else spaceId = space.id;
    }

    const systemText = cell('system');
    let systemId: string | null = null;
    if (systemText !== '') {
      const system = systemByName.get(systemText.toLowerCase());
      if (!system) bad('system', `Unknown system "${systemText}".`);
      else systemId = system.id;
    }

    const modelText = cell('model');
    let model: UnitModel | undefined;
    if (modelText !== '') {
      model = modelByName.get(modelText.toLowerCase());
      if (!model) bad('model', `Unknown unit model "${modelText}".`);
      else if (kind && model.unitKind !== kind) {
        bad('model', `Model "${model.name}" is a ${kindLabel(model.unitKind).toLowerCase()}, not a ${kindLabel(kind).toLowerCase()}.`);
      }
    }

    const capacityText = cell('capacity');
    let capacity: number | null = null;
    if (capacityText !== '') {
      const parsed = parseQuantity(capacityText, 'capacity', capacityUnit ? { defaultUnit: capacityUnit } : {});
      if (!parsed.ok) bad('capacity', `Capacity: ${parsed.error}`);
      else if (!(parsed.value > 0)) bad('capacity', 'Capacity must be more than zero.');
      else capacity = parsed.value;
    }

    const mountText = cell('mount');
    let mountPosition: MountPosition | null = null;
    if (mountText !== '') {
      mountPosition = parseMountPosition(mountText);
      if (!mountPosition) bad('mount', `Mounting position "${mountText}" is not floor, wall or ceiling.`);
    }

    const crewText = cell('crew');
    const crewCompanyText = cell('crewCompany');
    let crew: CrewDto | undefined;
    if (crewText !== '') {
      const named = crews.filter((c) => c.name.toLowerCase() === crewText.toLowerCase());
      if (crewCompanyText !== '') {
        if (!companiesOnJob.has(crewCompanyText.toLowerCase())) bad('crewCompany', `Unknown company "${crewCompanyText}" on this job.`);
        else {
          crew = named.find((c) => c.companyName.toLowerCase() === crewCompanyText.toLowerCase());
          if (!crew) bad('crew', `No crew "${crewText}" in ${crewCompanyText}. Name the company's crews on the Crews page first.`);
        }
      } else if (named.length === 0) bad('crew', `Unknown crew "${crewText}". Name the company's crews on the Crews page first.`);
      else if (named.length > 1) {
        bad('crew', `Crew "${crewText}" is a crew of ${named.map((c) => c.companyName).join(' and ')}: add a crew company column to say which.`);
      } else crew = named[0];
    }

    if (rowErrors.length > 0 || !kind || !level) {
      errors.push(...rowErrors);
      continue;
    }
    good.push({
      line,
      tag,
      kind,
      modelName: model?.name ?? null,
      capacity,
      levelName: level.name,
      spaceName: spaceId ? (spaces.find((s) => s.id === spaceId)?.name ?? null) : null,
      systemName: systemId ? (systems.find((s) => s.id === systemId)?.name ?? null) : null,
      mountPosition,
      crewName: crew ? crewLabel(crew) : null,
      crewId: crew?.id ?? null,
      levelId: level.id,
      spaceId,
      systemId,
      modelId: model?.id ?? null,
    });
  }

  const badLines = new Set(errors.map((e) => e.line));
  const commit = !options.dryRun && errors.length === 0;
  if (commit) {
    await Unit.bulkCreate(
      good.map((g) => ({
        jobId,
        tag: g.tag,
        kind: g.kind,
        modelId: g.modelId,
        capacity: g.capacity,
        levelId: g.levelId,
        spaceId: g.spaceId,
        systemId: g.systemId,
        installedByCrewId: g.crewId,
        mountPosition: g.mountPosition,
      })),
      { transaction },
    );
  }
  return {
    dryRun: options.dryRun,
    committed: commit,
    mapping: applied,
    totalRows: rows.length,
    goodRows: good.length,
    badRows: badLines.size,
    errors,
    preview: good.slice(0, PREVIEW_MAX).map(({ line, tag, kind, modelName, capacity, levelName, spaceName, systemName, crewName, mountPosition }) => ({
      line,
      tag,
      kind,
      modelName,
      capacity,
      levelName,
      spaceName,
      systemName,
      crewName,
      mountPosition,
    })),
    created: commit ? good.length : 0,
  };
}
