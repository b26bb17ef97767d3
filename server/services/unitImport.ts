/**
 * Units from a CSV equipment schedule, comma, semicolon or tab separated (read by
 * shared/rules/csvRead.ts, as the import screen reads its header). Columns are mapped to fields
 * (explicitly, or by header name, shared/rules/schedule.ts); kind cells are read as schedules
 * write them, or by the user's mapping kept per job; every bad row is reported with its line number
 * and reason; the good rows are imported in one transaction only when no row is bad: never half an
 * import.
 *
 * A revised schedule changes the units it names by tag and adds the others; units it does not
 * name stay unless the user asks to remove them (never those with a check or a finding). Levels
 * and spaces it names that the job lacks are listed, and created in the same transaction when the
 * user asks. Every committed import is recorded (unitImportRecords.ts) so it can be undone.
 */
import { QueryTypes, UniqueConstraintError, type Transaction } from 'sequelize';
import { parseQuantity } from '../../shared/calc/quantity';
import { parseMountPosition, type MountPosition } from '../../shared/calc/refrigerant';
import {
  IMPORT_MAX_ROWS,
  TAG_PATTERN,
  UNIT_IMPORT_FIELDS,
  UNIT_IMPORT_KIND_SOURCES,
  UNIT_IMPORT_REQUIRED,
  type UnitImportField,
  type UnitImportFieldChange,
  type UnitImportKindValue,
  type UnitImportPreviewRow,
  type UnitImportReport,
  type UnitImportRowError,
  type CrewDto,
  crewLabel,
  unitImportQuerySchema,
  unitImportSchema,
} from '../../shared/schemas/setup';
import { etagOf } from '../../shared/rules/etag';
import { readCsv } from '../../shared/rules/csvRead';
import { headerUnit, normaliseKindText, parseUnitKind, scheduleFieldOfHeader } from '../../shared/rules/schedule';
import type { UnitKindKey } from '../../shared/words';
import { badRequest, payloadTooLarge } from '../errors';
import { zodFieldErrors } from '../middleware/validate';
import { createSpace } from '../commands/createSpace';
import { Level, Space, System, Unit, UnitModel } from '../models';
import { listCrews } from './crews';
import { createLevel } from './levels';
import { recordImport, savedKindValues, saveKindValues, unitIdsInUse, type ImportChange } from './unitImportRecords';
import { changeUnit, kindLabel } from './units';

const PREVIEW_MAX = 500;

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

export interface ImportOptions {
  text: string;
  mapping?: Record<string, UnitImportField>;
  dryRun: boolean;
  kindValues?: Record<string, UnitKindKey>;
  createPlaces?: boolean;
  removeMissing?: boolean;
  fileName?: string;
}

/** Who imports into which job, in which transaction. */
export interface ImportContext {
  jobId: string;
  actorId: string;
  transaction: Transaction;
}

/**
 * The import's request in either form: text/csv bytes (options in the query) or JSON
 * { csv, mapping, dryRun }. Both are checked with their shared schema; the first issue is the 400.
 */
export function importRequestOf(body: unknown, query: unknown): ImportOptions {
  if (Buffer.isBuffer(body)) {
    const parsed = unitImportQuerySchema.safeParse(query);
    if (!parsed.success) throw firstIssue(zodFieldErrors(parsed.error, 'query'));
    const q = parsed.data;
    return { text: decodeCsv(body), mapping: undefined, dryRun: q.dryRun ?? false, createPlaces: q.createPlaces, removeMissing: q.removeMissing };
  }
  const parsed = unitImportSchema.safeParse(body ?? {});
  if (!parsed.success) throw firstIssue(zodFieldErrors(parsed.error));
  const b = parsed.data;
  return {
    text: b.csv,
    mapping: b.mapping,
    dryRun: b.dryRun ?? false,
    kindValues: b.kindValues,
    createPlaces: b.createPlaces,
    removeMissing: b.removeMissing,
    fileName: b.fileName,
  };
}

function firstIssue(fields: Record<string, string>) {
  const first = Object.entries(fields)[0]!;
  return badRequest(`${first[0]}: ${first[1]}`, fields);
}

/** importUnits, where a tag taken meanwhile (another import, a unit added) is a 400 and nothing is imported. */
export async function importUnitsOrRefuse(ctx: ImportContext, options: ImportOptions): Promise<UnitImportReport> {
  try {
    return await importUnits(ctx, options);
  } catch (err) {
    if (err instanceof UniqueConstraintError) {
      throw badRequest('A tag in the file was taken while importing; nothing was imported. Run the import again to see which.', {
        csv: 'Tag taken meanwhile.',
      });
    }
    throw err;
  }
}

/** A level or space the file names that the job lacks: its key stands in for an id until created. */
const NEW_LEVEL = 'new-level:';
const NEW_SPACE = 'new-space:';

interface GoodRow extends UnitImportPreviewRow {
  levelId: string;
  spaceId: string | null;
  systemId: string | null;
  modelId: string | null;
  crewId: string | null;
  /** The unit of that tag already in the job, and what changes on it. */
  existing: Unit | null;
  changes: UnitImportFieldChange[];
}

/** Capacities equal to within a micro-watt are the same (the file and the register round differently). */
function sameCapacity(a: number | null, b: number | null): boolean {
  if (a === null || b === null) return a === b;
  return Math.abs(a - b) <= 1e-6 * Math.max(1, Math.abs(a), Math.abs(b));
}

export async function importUnits({ jobId, actorId, transaction }: ImportContext, options: ImportOptions): Promise<UnitImportReport> {
  const text = options.text.replace(/^\uFEFF/, '');
  if (text.includes('\uFFFD')) throw notUtf8();
  if (text.includes('\0')) throw badRequest('The file contains NUL bytes: it is not a CSV text file.', { csv: 'Not a text file.' });

  // The one CSV reader (shared/rules/csvRead.ts): comma, semicolon or tab, RFC 4180 quoting.
  const { records, problem } = readCsv(text);
  if (problem) {
    const why = problem.kind === 'quote_not_closed' ? 'a quoted cell is never closed' : 'a quoted cell has text after its closing quote';
    throw badRequest(`The CSV cannot be read near line ${problem.line}: ${why}.`, { csv: 'Malformed CSV.' });
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
  const headers = header.cells;
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
    const guess = scheduleFieldOfHeader(name);
    if (guess && !columnOf.has(guess)) {
      columnOf.set(guess, index);
      applied[name] = guess;
    }
  });
  const missing: string[] = UNIT_IMPORT_REQUIRED.filter((f) => !columnOf.has(f));
  if (!UNIT_IMPORT_KIND_SOURCES.some((f) => columnOf.has(f))) missing.push('kind (or model)');
  if (missing.length > 0) {
    throw badRequest(
      `Missing column${missing.length > 1 ? 's' : ''}: ${missing.join(', ')}. Map a column to tag, to level, and to kind or model (a unit's kind may come from its model) (fields: ${UNIT_IMPORT_FIELDS.join(', ')}).`,
      { mapping: `Missing: ${missing.join(', ')}.` },
    );
  }
  const capacityColumn = columnOf.get('capacity');
  const capacityUnit = capacityColumn !== undefined ? headerUnit(headers[capacityColumn] ?? '', 'capacity') : undefined;

  // What the job holds, by lower-case name.
  const levels = await Level.findAll({ where: { jobId }, transaction });
  const levelByName = new Map(levels.map((l) => [l.name.toLowerCase(), l]));
  const levelName = new Map(levels.map((l) => [l.id, l.name]));
  const spaces = await Space.findAll({ where: { jobId }, transaction });
  const spaceByLevelName = new Map(spaces.map((s) => [`${s.levelId}\n${s.name.toLowerCase()}`, s]));
  const spaceName = new Map(spaces.map((s) => [s.id, s.name]));
  const systems = await System.findAll({ where: { jobId }, transaction });
  const systemByName = new Map(systems.map((s) => [s.name.toLowerCase(), s]));
  const systemName = new Map(systems.map((s) => [s.id, s.name]));
  const models = await UnitModel.findAll({ where: { jobId }, transaction });
  const modelByName = new Map<string, UnitModel>();
  for (const m of models) {
    if (m.modelNumber) modelByName.set(m.modelNumber.toLowerCase(), m);
  }
  for (const m of models) modelByName.set(m.name.toLowerCase(), m);
  const modelById = new Map(models.map((m) => [m.id, m]));
  // Kind values: this request's mapping, then the job's saved one, then the words themselves.
  const requestKinds = new Map(Object.entries(options.kindValues ?? {}).map(([v, k]) => [normaliseKindText(v), k]));
  const savedKinds = await savedKindValues(jobId, transaction);
  const kindValues = new Map<string, UnitImportKindValue>();
  const kindOf = (value: string): UnitImportKindValue => {
    const key = normaliseKindText(value);
    let entry = kindValues.get(key);
    if (!entry) {
      const mapped = requestKinds.get(key);
      const saved = savedKinds.get(key);
      const read = parseUnitKind(value);
      entry = mapped
        ? { value, rows: 0, kind: mapped, from: 'mapped' }
        : saved
          ? { value, rows: 0, kind: saved, from: 'saved' }
          : read
            ? { value, rows: 0, kind: read, from: 'read' }
            : { value, rows: 0, kind: null, from: null };
      kindValues.set(key, entry);
    }
    entry.rows += 1;
    return entry;
  };
  // Crews by company name and crew name (lower case); a crew name alone may belong to several companies.
  const crews = await listCrews(Unit.sequelize!, jobId, { role: 'gc_manager', companyId: null }, undefined, transaction);
  const crewName = new Map(crews.map((c) => [c.id, crewLabel(c)]));
  const companiesOnJob = new Set(
    (
      await Unit.sequelize!.query<{ name: string }>(`SELECT lower(c.name) AS name FROM job_companies jc JOIN companies c ON c.id = jc.company_id WHERE jc.job_id = $1`, {
        bind: [jobId],
        type: QueryTypes.SELECT,
        transaction,
      })
    ).map((r) => r.name),
  );
  const existingByTag = new Map((await Unit.findAll({ where: { jobId }, transaction })).map((u) => [u.tag, u]));

  // Places the file names that the job lacks (first spelling met), in file order.
  const newLevels = new Map<string, string>();
  const newSpaces = new Map<string, { level: string; space: string }>();
  const createPlaces = options.createPlaces === true;

  const errors: UnitImportRowError[] = [];
  const good: GoodRow[] = [];
  const tagLine = new Map<string, number>();

  for (const { cells: record, line } of rows) {
    const has = (f: UnitImportField) => columnOf.has(f);
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
    if (tag !== '' && !tagLine.has(tag)) tagLine.set(tag, line);
    const existing = existingByTag.get(tag) ?? null;

    const levelText = cell('level');
    let levelId: string | null = null;
    if (levelText === '') bad('level', 'Level is empty.');
    else {
      const level = levelByName.get(levelText.toLowerCase());
      if (level) levelId = level.id;
      else if (levelText.length > 80) bad('level', `Level "${levelText.slice(0, 40)}…" is longer than 80 characters.`);
      else {
        const key = levelText.toLowerCase();
        if (!newLevels.has(key)) newLevels.set(key, levelText);
        if (createPlaces) levelId = `${NEW_LEVEL}${key}`;
        else bad('level', `Unknown level "${levelText}".`);
      }
    }

    const spaceText = cell('space');
    let spaceId: string | null = has('space') ? null : (existing && existing.levelId === levelId ? existing.spaceId : null);
    if (spaceText !== '' && levelText !== '') {
      const level = levelByName.get(levelText.toLowerCase());
      const space = level ? spaceByLevelName.get(`${level.id}\n${spaceText.toLowerCase()}`) : undefined;
      if (space) spaceId = space.id;
      else if (spaceText.length > 120) bad('space', `Space "${spaceText.slice(0, 40)}…" is longer than 120 characters.`);
      else {
        const key = `${levelText.toLowerCase()}\n${spaceText.toLowerCase()}`;
        if (!newSpaces.has(key)) newSpaces.set(key, { level: level?.name ?? newLevels.get(levelText.toLowerCase()) ?? levelText, space: spaceText });
        if (createPlaces) spaceId = `${NEW_SPACE}${key}`;
        else if (level) bad('space', `Unknown space "${spaceText}" on ${level.name}.`);
      }
    }

    const systemText = cell('system');
    let systemId: string | null = has('system') ? null : (existing?.systemId ?? null);
    if (systemText !== '') {
      const system = systemByName.get(systemText.toLowerCase());
      if (!system) bad('system', `Unknown system "${systemText}".`);
      else systemId = system.id;
    }

    const modelText = cell('model');
    let model: UnitModel | undefined = has('model') ? undefined : existing?.modelId ? modelById.get(existing.modelId) : undefined;
    if (modelText !== '') {
      model = modelByName.get(modelText.toLowerCase());
      if (!model) bad('model', `Unknown unit model "${modelText}".`);
    }

    const kindText = cell('kind');
    let kind: UnitKindKey | null = null;
    if (kindText !== '') {
      const entry = kindOf(kindText);
      kind = entry.kind;
      if (!kind) bad('kind', `Unit kind "${kindText}" is not one Trimout can read: choose its kind where the file's kinds are listed.`);
    } else if (model) kind = model.unitKind;
    else if (!has('kind') && existing) kind = existing.kind;
    else if (modelText === '') bad('kind', has('model') ? 'Unit kind is empty and there is no model to take it from.' : 'Unit kind is empty.');
    if (kind && model && model.unitKind !== kind) {
      bad('model', `Model "${model.name}" is a ${kindLabel(model.unitKind).toLowerCase()}, not a ${kindLabel(kind).toLowerCase()}.`);
    }

    const capacityText = cell('capacity');
    let capacity: number | null = has('capacity') ? null : (existing?.capacity ?? null);
    if (capacityText !== '') {
      const parsed = parseQuantity(capacityText, 'capacity', capacityUnit ? { defaultUnit: capacityUnit } : {});
      if (!parsed.ok) bad('capacity', `Capacity: ${parsed.error}`);
      else if (!(parsed.value > 0)) bad('capacity', 'Capacity must be more than zero.');
      else capacity = parsed.value;
    }

    const mountText = cell('mount');
    let mountPosition: MountPosition | null = has('mount') ? null : (existing?.mountPosition ?? null);
    if (mountText !== '') {
      mountPosition = parseMountPosition(mountText);
      if (!mountPosition) bad('mount', `Mounting position "${mountText}" is not floor, wall or ceiling.`);
    }

    const crewText = cell('crew');
    const crewCompanyText = cell('crewCompany');
    let crew: CrewDto | undefined;
    let crewId: string | null = has('crew') ? null : (existing?.installedByCrewId ?? null);
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
      crewId = crew?.id ?? null;
    }

    if (rowErrors.length > 0 || !kind || !levelId) {
      errors.push(...rowErrors);
      continue;
    }
    const shownLevel = levelName.get(levelId) ?? newLevels.get(levelText.toLowerCase()) ?? levelText;
    const shownSpace = spaceId ? (spaceName.get(spaceId) ?? spaceText) : null;
    const changes: UnitImportFieldChange[] = [];
    if (existing) {
      const differs = (f: UnitImportField, from: string | number | null, to: string | number | null) => {
        if (from !== to) changes.push({ field: f, from, to });
      };
      differs('kind', existing.kind, kind);
      differs('model', existing.modelId ? (modelById.get(existing.modelId)?.name ?? null) : null, model?.name ?? null);
      if (!sameCapacity(existing.capacity, capacity)) changes.push({ field: 'capacity', from: existing.capacity, to: capacity });
      differs('level', levelName.get(existing.levelId) ?? null, shownLevel);
      differs('space', existing.spaceId ? (spaceName.get(existing.spaceId) ?? null) : null, shownSpace);
      differs('system', existing.systemId ? (systemName.get(existing.systemId) ?? null) : null, systemId ? (systemName.get(systemId) ?? null) : null);
      differs('crew', existing.installedByCrewId ? (crewName.get(existing.installedByCrewId) ?? null) : null, crewId ? (crewName.get(crewId) ?? null) : null);
      differs('mount', existing.mountPosition, mountPosition);
    }
    good.push({
      line,
      action: !existing ? 'add' : changes.length > 0 ? 'change' : 'same',
      tag,
      kind,
      modelName: model?.name ?? null,
      capacity,
      levelName: shownLevel,
      spaceName: shownSpace,
      systemName: systemId ? (systemName.get(systemId) ?? null) : null,
      mountPosition,
      crewName: crewId ? (crewName.get(crewId) ?? null) : null,
      crewId,
      levelId,
      spaceId,
      systemId,
      modelId: model?.id ?? null,
      existing,
      changes,
    });
  }

  // Units of the job the file does not name; those with a check or a finding are never removed.
  const named = new Set(tagLine.keys());
  const absent = [...existingByTag.values()].filter((u) => !named.has(u.tag)).sort((a, b) => a.tag.localeCompare(b.tag));
  const inUse = await unitIdsInUse(absent.map((u) => u.id), transaction);
  const notInFile = absent.map((u) => ({ id: u.id, tag: u.tag, removable: !inUse.has(u.id) }));

  const badLines = new Set(errors.map((e) => e.line));
  const commit = !options.dryRun && errors.length === 0;
  let importId: string | null = null;
  let removed = 0;
  const adds = good.filter((g) => g.action === 'add');
  const changed = good.filter((g) => g.action === 'change');
  if (commit) {
    // Places first, so the units can name them.
    const placeIds = new Map<string, string>();
    const createdLevelIds: string[] = [];
    const createdSpaceIds: string[] = [];
    const usedLevels = new Set(good.map((g) => g.levelId).filter((id) => id.startsWith(NEW_LEVEL)));
    const usedSpaces = new Set(good.map((g) => g.spaceId).filter((id): id is string => id !== null && id.startsWith(NEW_SPACE)));
    for (const [key, name] of newLevels) {
      if (!usedLevels.has(`${NEW_LEVEL}${key}`)) continue;
      const level = await createLevel({ transaction, jobId, ifMatch: undefined }, { name });
      placeIds.set(`${NEW_LEVEL}${key}`, level.id);
      createdLevelIds.push(level.id);
    }
    for (const [key, place] of newSpaces) {
      if (!usedSpaces.has(`${NEW_SPACE}${key}`)) continue;
      const levelKey = key.split('\n')[0]!;
      const levelId = levelByName.get(levelKey)?.id ?? placeIds.get(`${NEW_LEVEL}${levelKey}`)!;
      const { space } = await createSpace({ transaction, jobId }, { levelId, name: place.space });
      placeIds.set(`${NEW_SPACE}${key}`, space.id);
      createdSpaceIds.push(space.id);
    }
    const real = (id: string | null) => (id === null ? null : (placeIds.get(id) ?? id));

    const log: ImportChange[] = [];
    const created = await Unit.bulkCreate(
      adds.map((g) => ({
        jobId,
        tag: g.tag,
        kind: g.kind,
        modelId: g.modelId,
        capacity: g.capacity,
        levelId: real(g.levelId)!,
        spaceId: real(g.spaceId),
        systemId: g.systemId,
        installedByCrewId: g.crewId,
        mountPosition: g.mountPosition,
      })),
      { transaction, returning: ['id', 'version'] },
    );
    for (const u of created) log.push({ unitId: u.id, action: 'added', before: null, versionAfter: u.version ?? 1 });
    for (const g of changed) {
      const u = g.existing!;
      const before = {
        kind: u.kind,
        modelId: u.modelId,
        capacity: u.capacity,
        levelId: u.levelId,
        spaceId: u.spaceId,
        systemId: u.systemId,
        installedByCrewId: u.installedByCrewId,
        mountPosition: u.mountPosition,
        pinX: u.pinX,
        pinY: u.pinY,
        // The version it had: an undo gives the unit back to the import before this one in that state.
        version: u.version,
      };
      // The register's own change: refs checked, a plan pin or ceiling exclusion that no longer fits ends.
      const after = await changeUnit({ transaction, jobId, ifMatch: etagOf(u.version) }, u.id, {
        kind: g.kind,
        modelId: g.modelId,
        capacity: g.capacity === null ? null : `${g.capacity} W`,
        levelId: real(g.levelId)!,
        spaceId: real(g.spaceId),
        systemId: g.systemId,
        installedByCrewId: g.crewId,
        mountPosition: g.mountPosition,
      }, actorId);
      log.push({ unitId: u.id, action: 'changed', before, versionAfter: after.version });
    }
    if (options.removeMissing) {
      for (const gone of notInFile.filter((n) => n.removable)) {
        const unit = existingByTag.get(gone.tag)!;
        log.push({ unitId: unit.id, action: 'removed', before: unit.get({ plain: true }) as Record<string, unknown>, versionAfter: null });
        await unit.destroy({ transaction });
        removed += 1;
      }
    }
    const mappedHere = [...kindValues.entries()].filter(([, v]) => v.from === 'mapped' && v.kind).map(([key, v]) => ({ value: key, kind: v.kind! }));
    await saveKindValues(jobId, mappedHere, transaction);
    importId = await recordImport(transaction, {
      jobId,
      actorId,
      fileName: options.fileName ?? null,
      createdLevelIds,
      createdSpaceIds,
      changes: log,
    });
  }
  const levelsMissing = [...newLevels.values()];
  const spacesMissing = [...newSpaces.values()];
  return {
    dryRun: options.dryRun,
    committed: commit,
    mapping: applied,
    totalRows: rows.length,
    goodRows: good.length,
    badRows: badLines.size,
    errors,
    preview: good.slice(0, PREVIEW_MAX).map(({ line, action, tag, kind, modelName, capacity, levelName, spaceName, systemName, crewName, mountPosition }) => ({
      line,
      action,
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
    created: commit ? adds.length : 0,
    kindValues: [...kindValues.values()],
    missingPlaces: { levels: levelsMissing, spaces: spacesMissing },
    placesCreated: commit && createPlaces && (levelsMissing.length > 0 || spacesMissing.length > 0),
    revision: {
      added: adds.length,
      changed: changed.slice(0, PREVIEW_MAX).map((g) => ({ line: g.line, tag: g.tag, fields: g.changes })),
      untouched: good.filter((g) => g.action === 'same').length,
      notInFile,
      removed,
    },
    importId,
  };
}
