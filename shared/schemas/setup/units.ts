/**
 * Units, and their CSV import.
 */
import { z } from 'zod';
import { MOUNT_POSITIONS, type MountPosition, type MountSource } from '../../calc/refrigerant';
import { UNIT_KIND_KEYS, type UnitKindKey } from '../../words';
import { IMPORT_MAX_BYTES, quantityText } from './common';
import { id, text, pageQuery, booleanQuery, planFraction } from './fields';

export const TAG_PATTERN = /^[A-Za-z0-9][A-Za-z0-9 ._/#-]*$/;
const tagSchema = text('a tag', 40).regex(TAG_PATTERN, 'A tag uses letters, digits, spaces and . _ / # - (e.g. IU-L3-07).');

/** floor, wall or ceiling (sets the A2L release height: IEC 60335-2-40 Annex GG). */
export const mountPositionSchema = z.enum(MOUNT_POSITIONS, { error: 'Choose floor, wall or ceiling.' });

const unitFields = {
  tag: tagSchema,
  kind: z.enum(UNIT_KIND_KEYS, { error: 'Choose a unit kind.' }),
  modelId: id('model').nullable().optional(),
  /** As typed: "3 tons", "36000 Btu/h", "10.5 kW". */
  capacity: quantityText('capacity', 'Capacity').nullable().optional(),
  levelId: id('level'),
  spaceId: id('space').nullable().optional(),
  systemId: id('system').nullable().optional(),
  /** The crew that installed the unit (a crew of a company on the job); null clears it. */
  installedByCrewId: id('crew').nullable().optional(),
  /** The unit's own mounting position; null or left out: its model's (or its kind's) decides. */
  mountPosition: mountPositionSchema.nullable().optional(),
};
export const createUnitSchema = z.object(unitFields).strict();
export type CreateUnitInput = z.input<typeof createUnitSchema>;
export const updateUnitSchema = z
  .object({
    ...unitFields,
    tag: unitFields.tag.optional(),
    kind: unitFields.kind.optional(),
    levelId: unitFields.levelId.optional(),
    // A unit's pin on its level's plan (null clears it).
    pinX: planFraction().nullable().optional(),
    pinY: planFraction().nullable().optional(),
  })
  .strict()
  .refine((u) => (u.pinX === undefined) === (u.pinY === undefined) && (u.pinX === null) === (u.pinY === null), {
    message: 'Send both pinX and pinY (numbers, or both null to remove the pin), or neither.',
    path: ['pinX'],
  });
export type UpdateUnitInput = z.input<typeof updateUnitSchema>;

export const unitListQuerySchema = z
  .object({
    levelId: id('level id').optional(),
    spaceId: id('space id').optional(),
    systemId: id('system id').optional(),
    kind: z.enum(UNIT_KIND_KEYS, { error: 'Choose a unit kind from the list.' }).optional(),
    /** Tag contains (case-insensitive). */
    q: z.string().trim().max(40, 'q: at most 40 characters.').optional(),
    ...pageQuery,
  })
  .strict();
export type UnitListQuery = z.input<typeof unitListQuerySchema>;

export interface UnitDto {
  id: string;
  tag: string;
  kind: UnitKindKey;
  modelId: string | null;
  modelName: string | null;
  /** W */
  capacity: number | null;
  levelId: string;
  levelName: string;
  spaceId: string | null;
  spaceName: string | null;
  systemId: string | null;
  systemName: string | null;
  /** The unit's own mounting position (null: not recorded on the unit). */
  mountPosition: MountPosition | null;
  /** The position that applies (unit, else model, else kind) and where it came from; null when none. */
  effectiveMount: { mount: MountPosition; from: MountSource } | null;
  /** The crew that installed the unit, with its company; null when not recorded. */
  installedByCrew: { id: string; name: string; companyId: string; companyName: string } | null;
  /** Pin on the level's plan (fractions 0..1 of its width / height); both null when not placed. */
  pinX: number | null;
  pinY: number | null;
  version: number;
}

/**
 * Fields a CSV column can map to. Level, space, system and model are matched by name. `crew` (optional)
 * is the installing crew, matched by name within `crewCompany` when that column is given, else
 * across the job's crews (a name two companies use is a row error asking for the company).
 */
export const UNIT_IMPORT_FIELDS = ['tag', 'kind', 'model', 'capacity', 'level', 'space', 'system', 'crew', 'crewCompany', 'mount'] as const;
export type UnitImportField = (typeof UNIT_IMPORT_FIELDS)[number];
/** Columns every import needs (mapped or found by header name); the kind may come from a model column instead. */
export const UNIT_IMPORT_REQUIRED: readonly UnitImportField[] = ['tag', 'level'];
/** A kind column or a model column (a unit's kind is then its model's). */
export const UNIT_IMPORT_KIND_SOURCES: readonly UnitImportField[] = ['kind', 'model'];
/** At most this many distinct kind values mapped in one import. */
export const IMPORT_KIND_VALUES_MAX = 200;

/**
 * POST /units/import as JSON. (Or send the file itself as text/csv; then dryRun comes from
 * the query string `?dryRun=true` and headers are matched by name.) Mapping: CSV header →
 * field; headers not mapped are matched by name ("Tag", "Unit kind", "Level" ...), others ignored.
 */
export const unitImportSchema = z
  .object({
    csv: z.string({ error: 'Send the CSV text as csv.' }).min(1, 'The CSV is empty.').max(IMPORT_MAX_BYTES, 'The CSV is larger than 2 MB.'),
    mapping: z
      .record(z.string().max(200), z.enum(UNIT_IMPORT_FIELDS, { error: `Map each column to one of ${UNIT_IMPORT_FIELDS.join(', ')}.` }))
      .optional(),
    dryRun: z.boolean().optional(),
    /**
     * Values of the kind column → unit kind, for values Trimout cannot read itself ("Cassette",
     * "Ducted"); kept for the job's next import. Keys are the values as they are in the file.
     */
    kindValues: z
      .record(z.string().max(200), z.enum(UNIT_KIND_KEYS, { error: 'Choose a unit kind for each value.' }))
      .refine((r) => Object.keys(r).length <= IMPORT_KIND_VALUES_MAX, `Map at most ${IMPORT_KIND_VALUES_MAX} kind values at once.`)
      .optional(),
    /** Create the levels and spaces the file names that the job does not have yet (in the same transaction). */
    createPlaces: z.boolean().optional(),
    /** Delete the units of the job the file does not name (those with a check or a finding are kept). */
    removeMissing: z.boolean().optional(),
    /** The file's name, recorded with the import. */
    fileName: z.string().trim().max(200, 'A file name is at most 200 characters.').optional(),
  })
  .strict();
export type UnitImportInput = z.input<typeof unitImportSchema>;
export const unitImportQuerySchema = z
  .object({ dryRun: booleanQuery.optional(), createPlaces: booleanQuery.optional(), removeMissing: booleanQuery.optional() })
  .strict();

export interface UnitImportRowError {
  /** Line number in the file (the header is line 1). */
  line: number;
  field: UnitImportField | null;
  reason: string;
}

export interface UnitImportPreviewRow {
  line: number;
  /** What the import does with the row: a new unit, a change to the unit of that tag, or nothing. */
  action: 'add' | 'change' | 'same';
  /** The installing crew as "Company · Crew", or null when the row names none. */
  crewName: string | null;
  tag: string;
  kind: UnitKindKey;
  modelName: string | null;
  /** W */
  capacity: number | null;
  levelName: string;
  spaceName: string | null;
  systemName: string | null;
  mountPosition: MountPosition | null;
}

/**
 * Answer of POST /units/import: 200 for a dry run or a refused commit (committed false, with
 * every bad row), 201 when committed. 400 only for a file that cannot be read at all
 * (not UTF-8, not CSV, missing columns, too many rows).
 */
export interface UnitImportReport {
  dryRun: boolean;
  committed: boolean;
  /** Column header → field, as applied. */
  mapping: Record<string, UnitImportField>;
  totalRows: number;
  goodRows: number;
  badRows: number;
  errors: UnitImportRowError[];
  /** Good rows (first 500) as they would be imported. */
  preview: UnitImportPreviewRow[];
  created: number;
  /** Each distinct value of the kind column, with the kind it gives (null: the user must choose). */
  kindValues: UnitImportKindValue[];
  /** Levels and spaces the file names that the job does not have; created when createPlaces is true. */
  missingPlaces: { levels: string[]; spaces: Array<{ level: string; space: string }> };
  /** True when this import created them. */
  placesCreated: boolean;
  /** Against the units already in the job, matched by tag. */
  revision: UnitImportRevision;
  /** The recorded import (committed only); undo it with POST /units/imports/:importId/undo. */
  importId: string | null;
}

export interface UnitImportKindValue {
  /** As in the file (the first spelling met). */
  value: string;
  rows: number;
  kind: UnitKindKey | null;
  /** read: Trimout reads the words; mapped: this request's kindValues; saved: mapped in an earlier import of this job. */
  from: 'read' | 'mapped' | 'saved' | null;
}

export interface UnitImportFieldChange {
  field: UnitImportField;
  /** Names as shown (level, space, system, model, crew), capacity in W; null: empty. */
  from: string | number | null;
  to: string | number | null;
}

export interface UnitImportRevision {
  added: number;
  changed: Array<{ line: number; tag: string; fields: UnitImportFieldChange[] }>;
  untouched: number;
  /** Units of the job the file does not name; removable false when a check or finding keeps it. */
  notInFile: Array<{ id: string; tag: string; removable: boolean }>;
  /** Units deleted by this import (removeMissing). */
  removed: number;
}

/** GET /units/imports: the job's recorded imports, newest first. */
export interface UnitImportRecordDto {
  id: string;
  createdAt: string;
  createdByName: string | null;
  fileName: string | null;
  added: number;
  changed: number;
  removed: number;
  levelsCreated: number;
  spacesCreated: number;
  undoneAt: string | null;
  /** Whether an undo would be accepted now, and if not, why. */
  undo: { possible: true } | { possible: false; reason: string };
}

export const unitImportParamsSchema = z.object({ jobId: id('job id'), importId: id('import id') }).strict();
/** POST /units/imports/:importId/undo takes no body: any key sent is refused. */
export const undoImportSchema = z.object({}).strict();

/** POST /units/delete: several units at once; all or none (units with a check or finding are refused). */
export const UNIT_BULK_DELETE_MAX = 500;
export const bulkDeleteUnitsSchema = z
  .object({
    unitIds: z
      .array(id('unit id'), { error: 'Send the units to delete as unitIds.' })
      .min(1, 'Choose at least one unit.')
      .max(UNIT_BULK_DELETE_MAX, `Delete at most ${UNIT_BULK_DELETE_MAX} units at once.`),
  })
  .strict();
export type BulkDeleteUnitsInput = z.input<typeof bulkDeleteUnitsSchema>;
