/**
 * Job set-up: request schemas (zod, strict) and response types for jobs, levels, spaces,
 * systems, unit models, units (with CSV import/export), companies on a job, members and the
 * defect catalogue. The screens use these schemas with zodResolver; the server validates every
 * request with the same ones (server/routes/*). See docs/api-setup.md for the routes.
 *
 * Quantities are sent as the trade types them ("10' 6\"", "3.2 m", "38 lb", "3 tons") and
 * stored in base units (shared/calc/quantity.ts): lengths mm, areas m², volumes m³, mass kg,
 * capacity W, angle degrees. The schemas check the text parses; the server converts.
 *
 * Stable contract: change it by adding, never by renaming or removing.
 */
import { z } from 'zod';
import {
  CATALOGUE_GROUPS,
  COMPARISONS,
  CODE_DOCUMENTS,
  JOB_SETTINGS,
  MODEL_LIMITS,
  QUANTITY_KINDS,
  UNIT_SYSTEMS,
  type CatalogueGroup,
  type CodeDocument,
  type Comparison,
  type JobSettingKey,
  type ModelLimitKey,
  type QuantityKind,
  type UnitSystem,
} from '../catalogue/types';
import { CODE_LIMIT_VARIANTS, DEFAULT_EDITIONS } from '../calc/limits';
import { parseQuantity, unitKind } from '../calc/quantity';
import { CONCENTRATION_LIMITS, type A2lAreaResult, type ConcentrationResult, type MountPosition } from '../calc/refrigerant';
import {
  REFRIGERANTS,
  ROLES,
  SEVERITIES,
  TRADE_KEYS,
  UNIT_KIND_KEYS,
  type Refrigerant,
  type Role,
  type Severity,
  type TradeKey,
  type UnitKindKey,
} from '../words';
import type { LevelPlanDto } from './board';

// ---------------------------------------------------------------------------------------------
// Building blocks
// ---------------------------------------------------------------------------------------------

export const LIST_LIMIT_MAX = 200;
export const LIST_LIMIT_DEFAULT = 100;
/** CSV import: at most this many data rows per file. */
export const IMPORT_MAX_ROWS = 5000;
/** CSV import: at most this many bytes per file (JSON or text/csv body). */
export const IMPORT_MAX_BYTES = 2 * 1024 * 1024;

const id = (label = 'id') => z.string({ error: `Choose a ${label}.` }).uuid(`Not a valid ${label}.`);

const text = (label: string, max: number) =>
  z
    .string({ error: `Enter ${label}.` })
    .trim()
    .min(1, `Enter ${label}.`)
    .max(max, `${label[0]!.toUpperCase()}${label.slice(1)} is at most ${max} characters.`);

const optionalText = (label: string, max: number) =>
  z
    .string({ error: `${label} must be text.` })
    .trim()
    .max(max, `${label} is at most ${max} characters.`)
    .transform((s) => (s === '' ? null : s))
    .nullable()
    .optional();

/**
 * A quantity as typed ("10' 6\"", "3.2 m", "38 lb"). The schema checks that it parses as the
 * expected kind; the server converts it to base units with parseQuantity. null clears the value.
 */
export function quantityText(kind: QuantityKind, label: string) {
  return z
    .string({ error: `${label}: type a value with its unit.` })
    .trim()
    .max(60, `${label} is at most 60 characters.`)
    .superRefine((value, ctx) => {
      const parsed = parseQuantity(value, kind);
      if (!parsed.ok) ctx.addIssue({ code: 'custom', message: parsed.error });
      else if (!(parsed.value > 0)) ctx.addIssue({ code: 'custom', message: `${label} must be more than zero.` });
    });
}

const dateOnly = z
  .string({ error: 'Enter a date (YYYY-MM-DD).' })
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'Enter a date as YYYY-MM-DD.')
  .refine((s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)) && new Date(`${s}T00:00:00Z`).toISOString().startsWith(s), 'Not a real date.');

/** An IANA time zone the runtime knows ("America/Chicago"). */
export const timeZoneSchema = z
  .string({ error: 'Choose a time zone.' })
  .min(1, 'Choose a time zone.')
  .max(64, 'Not a known time zone.')
  .refine((tz) => {
    try {
      new Intl.DateTimeFormat('en-US', { timeZone: tz });
      return true;
    } catch {
      return false;
    }
  }, 'Not a known time zone (use an IANA name such as America/Chicago).');

/** Query-string limit (1..200) and opaque cursor, shared by every list route. */
const pageQuery = {
  limit: z.coerce
    .number({ error: 'limit: a whole number from 1 to 200.' })
    .int('limit: a whole number from 1 to 200.')
    .min(1, 'limit: a whole number from 1 to 200.')
    .max(LIST_LIMIT_MAX, `limit: at most ${LIST_LIMIT_MAX}.`)
    .optional(),
  /** Opaque; the server checks it whole (length, signature, types) and answers 400 invalid_cursor. */
  cursor: z.string().optional(),
};
const booleanQuery = z.enum(['true', 'false'], { error: 'Use true or false.' }).transform((v) => v === 'true');

/** Every list answers { items, nextCursor }; pass nextCursor back as `cursor` for the next page. */
export interface ListResponse<T> {
  items: T[];
  nextCursor: string | null;
}

/** Error body of every non-2xx answer (server/errors.ts). 412 also carries `current`. */
export interface ApiErrorBody {
  error: { id: string; message: string; fields?: Record<string, string> };
  current?: unknown;
}

// ---------------------------------------------------------------------------------------------
// Path parameters
// ---------------------------------------------------------------------------------------------

export const jobParamsSchema = z.object({ jobId: id('job id') }).strict();
export const levelParamsSchema = z.object({ jobId: id('job id'), levelId: id('level id') }).strict();
export const spaceParamsSchema = z.object({ jobId: id('job id'), spaceId: id('space id') }).strict();
export const systemParamsSchema = z.object({ jobId: id('job id'), systemId: id('system id') }).strict();
export const modelParamsSchema = z.object({ jobId: id('job id'), modelId: id('model id') }).strict();
export const unitParamsSchema = z.object({ jobId: id('job id'), unitId: id('unit id') }).strict();
export const companyParamsSchema = z.object({ jobId: id('job id'), companyId: id('company id') }).strict();
export const memberParamsSchema = z.object({ jobId: id('job id'), memberId: id('member id') }).strict();
export const catalogueItemParamsSchema = z.object({ jobId: id('job id'), itemId: id('item id') }).strict();

// ---------------------------------------------------------------------------------------------
// Stated limits (unit-model limits and job settings): typed text → base number + source
// ---------------------------------------------------------------------------------------------

/** A limit as entered: the value typed with its unit ("39-3/8 in"), and where it came from. */
export function statedLimitInput(kind: QuantityKind, label: string) {
  return z
    .object({
      value: quantityText(kind, label),
      /** Optional: the unit the source states it in, when the text mixes units (ft and in). */
      unit: z
        .string()
        .trim()
        .max(20)
        .refine((u) => unitKind(u) === kind, `Not a unit of ${kind}.`)
        .optional(),
      source: text('where the value came from (e.g. installation manual, page)', 300),
    })
    .strict();
}

/** A stored limit: base value plus what was typed and its source. */
export interface StatedLimitDto {
  /** Base units (mm for lengths, degrees for angles, ratio for slopes). */
  value: number;
  /** The value in the unit it was stated in. */
  stated: number;
  unit: string;
  /** Exactly what was typed. */
  text: string;
  source: string;
}

function limitsObject<K extends string>(defs: ReadonlyArray<{ key: K; label: string; quantity: QuantityKind }>) {
  const shape: Record<string, z.ZodType> = {};
  for (const d of defs) shape[d.key] = statedLimitInput(d.quantity, d.label).nullable().optional();
  return z.object(shape).strict() as unknown as z.ZodType<Partial<Record<K, StatedLimitInput | null>>, Partial<Record<K, StatedLimitInput | null>>>;
}

export interface StatedLimitInput {
  value: string;
  unit?: string;
  source: string;
}

/** Per-model limits keyed by MODEL_LIMITS keys. null removes a limit in a PATCH. */
export const modelLimitsInputSchema = limitsObject<ModelLimitKey>(MODEL_LIMITS);
/** Job settings keyed by JOB_SETTINGS keys. */
export const jobSettingsInputSchema = limitsObject<JobSettingKey>(JOB_SETTINGS);

// ---------------------------------------------------------------------------------------------
// Jobs
// ---------------------------------------------------------------------------------------------

/** Editions Trimout holds values for, per code document (a job can only choose one of these). */
export const KNOWN_EDITIONS: Readonly<Record<CodeDocument, readonly string[]>> = (() => {
  const out = Object.fromEntries(CODE_DOCUMENTS.map((d) => [d, new Set<string>([DEFAULT_EDITIONS[d]])])) as Record<CodeDocument, Set<string>>;
  for (const variants of Object.values(CODE_LIMIT_VARIANTS)) for (const v of variants) for (const e of v.editions) out[v.document].add(e);
  for (const l of CONCENTRATION_LIMITS) for (const e of l.editions) out[l.document].add(e);
  return Object.fromEntries(CODE_DOCUMENTS.map((d) => [d, [...out[d]].sort()])) as Record<CodeDocument, string[]>;
})();

export const codeEditionsSchema = z
  .object(
    Object.fromEntries(
      CODE_DOCUMENTS.map((d) => [
        d,
        z
          .string()
          .refine((e) => KNOWN_EDITIONS[d].includes(e), `${d}: choose one of ${KNOWN_EDITIONS[d].join(', ')}.`)
          .optional(),
      ]),
    ) as Record<CodeDocument, z.ZodOptional<z.ZodString>>,
  )
  .strict();
export type CodeEditions = Partial<Record<CodeDocument, string>>;

const dueDays = (s: string) =>
  z
    .number({ error: `${s}: days to fix, a whole number.` })
    .int(`${s}: days to fix, a whole number.`)
    .min(0, `${s}: 0 days or more.`)
    .max(365, `${s}: at most 365 days.`);

export const severityDueDaysSchema = z
  .object({ critical: dueDays('Critical'), major: dueDays('Major'), minor: dueDays('Minor') })
  .strict()
  .refine((d) => d.critical <= d.major && d.major <= d.minor, 'Due days must not shrink with severity: critical ≤ major ≤ minor.');
export type SeverityDueDays = Record<Severity, number>;
export const DEFAULT_SEVERITY_DUE_DAYS: SeverityDueDays = { critical: 2, major: 7, minor: 14 };

/**
 * A defect type is flagged "recurring" on a job when it is found on at least `minUnits` units
 * and on at least `minShare` (0..1) of the checked units of the kinds it applies to (see
 * docs/api-board.md). Default 3 units and 10 %. `minShare` may be left out (the default applies);
 * `windowDays` was the earlier rule's window: still accepted from older clients, never used.
 */
export const recurringThresholdsSchema = z
  .object({
    minUnits: z.number().int('minUnits: a whole number.').min(2, 'minUnits: at least 2.').max(1000, 'minUnits: at most 1000.'),
    minShare: z.number('minShare: a number from 0 to 1.').min(0, 'minShare: at least 0.').max(1, 'minShare: at most 1 (100 %).').optional(),
    windowDays: z.number().int('windowDays: a whole number.').min(1, 'windowDays: at least 1.').max(365, 'windowDays: at most 365.').optional(),
  })
  .strict();
export type RecurringThresholdsInput = z.infer<typeof recurringThresholdsSchema>;
/** Stored and answered thresholds: `minShare` always filled in (the default when never set). */
export type RecurringThresholds = RecurringThresholdsInput & { minShare: number };
export const DEFAULT_RECURRING_THRESHOLDS: RecurringThresholds = { minUnits: 3, minShare: 0.1 };

const jobFields = {
  name: text('a job name', 160),
  number: optionalText('Job number', 40),
  address: optionalText('Address', 300),
  startsOn: dateOnly.nullable().optional(),
  endsOn: dateOnly.nullable().optional(),
  timeZone: timeZoneSchema.optional(),
  unitSystem: z.enum(UNIT_SYSTEMS, { error: 'Choose imperial or metric.' }).optional(),
};

const datesInOrder = (j: { startsOn?: string | null; endsOn?: string | null }) =>
  !j.startsOn || !j.endsOn || j.startsOn <= j.endsOn;

/** POST /api/jobs */
export const createJobSchema = z
  .object(jobFields)
  .strict()
  .refine(datesInOrder, { message: 'The end date is before the start date.', path: ['endsOn'] });
export type CreateJobInput = z.input<typeof createJobSchema>;

/** PATCH /api/jobs/:jobId (If-Match) */
export const updateJobSchema = z
  .object({
    ...jobFields,
    name: jobFields.name.optional(),
    codeEditions: codeEditionsSchema.optional(),
    severityDueDays: severityDueDaysSchema.optional(),
    recurringThresholds: recurringThresholdsSchema.optional(),
    settings: jobSettingsInputSchema.optional(),
  })
  .strict()
  .refine(datesInOrder, { message: 'The end date is before the start date.', path: ['endsOn'] });
export type UpdateJobInput = z.input<typeof updateJobSchema>;

/** GET /api/jobs/:jobId, POST /api/jobs (201), PATCH (200). ETag: "v<version>". */
export interface JobDetail {
  id: string;
  name: string;
  number: string | null;
  address: string | null;
  role: Role;
  startsOn: string | null;
  endsOn: string | null;
  timeZone: string;
  unitSystem: UnitSystem;
  /** Every document, with the job's choice or the default edition filled in. */
  codeEditions: Record<CodeDocument, string>;
  severityDueDays: SeverityDueDays;
  recurringThresholds: RecurringThresholds;
  settings: Partial<Record<JobSettingKey, StatedLimitDto>>;
  version: number;
}

// ---------------------------------------------------------------------------------------------
// Levels
// ---------------------------------------------------------------------------------------------

export const createLevelSchema = z.object({ name: text('a level name', 80) }).strict();
export type CreateLevelInput = z.input<typeof createLevelSchema>;
export const updateLevelSchema = z.object({ name: text('a level name', 80) }).strict();
export type UpdateLevelInput = z.input<typeof updateLevelSchema>;
/** POST /levels/order: every level id of the job, in the new order (no If-Match; the list must be complete). */
export const reorderLevelsSchema = z
  .object({
    levelIds: z
      .array(id('level id'), { error: 'Send levelIds: every level id in the new order.' })
      .min(1, 'Send every level id in the new order.')
      .max(500, 'At most 500 levels.')
      .refine((ids) => new Set(ids).size === ids.length, 'A level id appears twice.'),
  })
  .strict();
export type ReorderLevelsInput = z.input<typeof reorderLevelsSchema>;
export const levelListQuerySchema = z.object({ ...pageQuery }).strict();

export interface LevelDto {
  id: string;
  name: string;
  /** 1-based, dense: 1, 2, 3 ... */
  position: number;
  spaceCount: number;
  unitCount: number;
  version: number;
  /** The level's plan image (issue 7; GET/POST/DELETE /levels/:levelId/plan), null when none. */
  plan: LevelPlanDto | null;
}

// ---------------------------------------------------------------------------------------------
// Spaces
// ---------------------------------------------------------------------------------------------

export const OCCUPANCIES = ['general', 'institutional'] as const;
export type Occupancy = (typeof OCCUPANCIES)[number];

const spaceFields = {
  levelId: id('level'),
  name: text('a space name', 120),
  /** Floor area as typed: "120 sq ft", "11.2 m²". */
  floorArea: quantityText('area', 'Floor area').nullable().optional(),
  /** Ceiling height as typed: "10' 6\"", "3.2 m". */
  ceilingHeight: quantityText('length', 'Ceiling height').nullable().optional(),
  occupancy: z.enum(OCCUPANCIES, { error: 'Choose general or institutional.' }).optional(),
  /** An enclosed occupied space counts for the refrigerant check. Default true. */
  enclosed: z.boolean({ error: 'enclosed: true or false.' }).optional(),
  /**
   * Spaces joined to this one by a permanent opening (they count as one volume in the
   * refrigerant check). Replaces the whole set of this space's links; links are symmetric.
   */
  linkedSpaceIds: z
    .array(id('space id'))
    .max(50, 'At most 50 linked spaces.')
    .refine((ids) => new Set(ids).size === ids.length, 'A linked space appears twice.')
    .optional(),
};

export const createSpaceSchema = z.object(spaceFields).strict();
export type CreateSpaceInput = z.input<typeof createSpaceSchema>;
export const updateSpaceSchema = z
  .object({ ...spaceFields, levelId: spaceFields.levelId.optional(), name: spaceFields.name.optional() })
  .strict();
export type UpdateSpaceInput = z.input<typeof updateSpaceSchema>;
export const spaceListQuerySchema = z.object({ levelId: id('level id').optional(), ...pageQuery }).strict();

export interface SpaceDto {
  id: string;
  levelId: string;
  levelName: string;
  name: string;
  /** m² */
  floorArea: number | null;
  /** mm */
  ceilingHeight: number | null;
  /** m³ (floor area × ceiling height) */
  volume: number | null;
  occupancy: Occupancy;
  enclosed: boolean;
  linkedSpaceIds: string[];
  unitCount: number;
  version: number;
}

// ---------------------------------------------------------------------------------------------
// Systems
// ---------------------------------------------------------------------------------------------

export const CONCENTRATION_LIMIT_UNITS = ['lb/Mcf', 'g/m³', 'kg/m³'] as const;

export const concentrationOverrideSchema = z
  .object({
    value: z.number({ error: 'Limit: a number.' }).positive('Limit: more than zero.').max(10_000, 'Limit: too large.'),
    unit: z.enum(CONCENTRATION_LIMIT_UNITS, { error: 'Limit unit: lb/Mcf, g/m³ or kg/m³.' }),
    source: text('the limit’s source (document, edition, table)', 300),
  })
  .strict();
export type ConcentrationOverride = z.infer<typeof concentrationOverrideSchema>;

const systemFields = {
  name: text('a system name', 80),
  outdoorModel: optionalText('Outdoor unit model', 120),
  refrigerant: z.enum(REFRIGERANTS, { error: `Choose a refrigerant: ${REFRIGERANTS.join(', ')}.` }),
  /** As typed: "38 lb", "12 lb 6 oz", "17.2 kg". */
  factoryCharge: quantityText('mass', 'Factory charge').nullable().optional(),
  fieldCharge: quantityText('mass', 'Field-added charge').nullable().optional(),
  /** A job-entered concentration limit, for refrigerants without a stored one (R-454B). */
  concentrationLimitOverride: concentrationOverrideSchema.nullable().optional(),
};
export const createSystemSchema = z.object(systemFields).strict();
export type CreateSystemInput = z.input<typeof createSystemSchema>;
export const updateSystemSchema = z
  .object({ ...systemFields, name: systemFields.name.optional(), refrigerant: systemFields.refrigerant.optional() })
  .strict();
export type UpdateSystemInput = z.input<typeof updateSystemSchema>;
export const systemListQuerySchema = z.object({ ...pageQuery }).strict();

export interface SystemDto {
  id: string;
  name: string;
  outdoorModel: string | null;
  refrigerant: Refrigerant;
  /** kg */
  factoryCharge: number | null;
  /** kg */
  fieldCharge: number | null;
  /** kg, factory + field (missing counts as 0) */
  totalCharge: number;
  concentrationLimitOverride: ConcentrationOverride | null;
  unitCount: number;
  version: number;
}

/** GET /systems/:systemId: the system with its refrigerant checks. */
export interface SystemDetail extends SystemDto {
  /** shared/calc checkRefrigerantConcentration over the spaces its units serve (and their links). */
  concentration: ConcentrationResult;
  /** A2L (R-32) only: IEC 60335-2-40 Annex GG minimum floor area per unit's space; empty otherwise. */
  a2lFloorArea: Array<{
    unitId: string;
    tag: string;
    spaceId: string | null;
    spaceName: string | null;
    mount: MountPosition;
    result: A2lAreaResult;
  }>;
}

// ---------------------------------------------------------------------------------------------
// Unit models
// ---------------------------------------------------------------------------------------------

const modelFields = {
  name: text('a model name', 120),
  modelNumber: optionalText('Model number', 80),
  unitKind: z.enum(UNIT_KIND_KEYS, { error: 'Choose a unit kind.' }),
  /** As typed: "3 tons", "36000 Btu/h", "10.5 kW". */
  nominalCapacity: quantityText('capacity', 'Nominal capacity').nullable().optional(),
  /** Per-model limits from the installation manual, by MODEL_LIMITS key. */
  limits: modelLimitsInputSchema.optional(),
};
export const createModelSchema = z.object(modelFields).strict();
export type CreateModelInput = z.input<typeof createModelSchema>;
/** In a PATCH, `limits` merges by key: a key set to null is removed, keys not sent are kept. */
export const updateModelSchema = z
  .object({ ...modelFields, name: modelFields.name.optional(), unitKind: modelFields.unitKind.optional() })
  .strict();
export type UpdateModelInput = z.input<typeof updateModelSchema>;
export const modelListQuerySchema = z
  .object({ unitKind: z.enum(UNIT_KIND_KEYS, { error: 'Not a unit kind.' }).optional(), ...pageQuery })
  .strict();

export interface UnitModelDto {
  id: string;
  name: string;
  modelNumber: string | null;
  unitKind: UnitKindKey;
  /** W */
  nominalCapacity: number | null;
  limits: Partial<Record<ModelLimitKey, StatedLimitDto>>;
  unitCount: number;
  version: number;
}

// ---------------------------------------------------------------------------------------------
// Units
// ---------------------------------------------------------------------------------------------

export const TAG_PATTERN = /^[A-Za-z0-9][A-Za-z0-9 ._/#-]*$/;
const tagSchema = text('a tag', 40).regex(TAG_PATTERN, 'A tag uses letters, digits, spaces and . _ / # - (e.g. IU-L3-07).');

const unitFields = {
  tag: tagSchema,
  kind: z.enum(UNIT_KIND_KEYS, { error: 'Choose a unit kind.' }),
  modelId: id('model').nullable().optional(),
  /** As typed: "3 tons", "36000 Btu/h", "10.5 kW". */
  capacity: quantityText('capacity', 'Capacity').nullable().optional(),
  levelId: id('level'),
  spaceId: id('space').nullable().optional(),
  systemId: id('system').nullable().optional(),
};
export const createUnitSchema = z.object(unitFields).strict();
export type CreateUnitInput = z.input<typeof createUnitSchema>;
/** A unit's pin on its level's plan: a fraction of the plan image's width / height, 0..1 (null clears it). */
const unitPin = (axis: 'pinX' | 'pinY') =>
  z.number({ error: `${axis}: a number from 0 to 1.` }).min(0, `${axis}: from 0 to 1.`).max(1, `${axis}: from 0 to 1.`);
export const updateUnitSchema = z
  .object({
    ...unitFields,
    tag: unitFields.tag.optional(),
    kind: unitFields.kind.optional(),
    levelId: unitFields.levelId.optional(),
    pinX: unitPin('pinX').nullable().optional(),
    pinY: unitPin('pinY').nullable().optional(),
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
    kind: z.enum(UNIT_KIND_KEYS, { error: 'Not a unit kind.' }).optional(),
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
  /** Pin on the level's plan (fractions 0..1 of its width / height); both null when not placed. */
  pinX: number | null;
  pinY: number | null;
  version: number;
}

/** Fields a CSV column can map to. Level, space, system and model are matched by name. */
export const UNIT_IMPORT_FIELDS = ['tag', 'kind', 'model', 'capacity', 'level', 'space', 'system'] as const;
export type UnitImportField = (typeof UNIT_IMPORT_FIELDS)[number];
/** Columns every import needs (mapped or found by header name). */
export const UNIT_IMPORT_REQUIRED: readonly UnitImportField[] = ['tag', 'kind', 'level'];

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
  })
  .strict();
export type UnitImportInput = z.input<typeof unitImportSchema>;
export const unitImportQuerySchema = z.object({ dryRun: booleanQuery.optional() }).strict();

export interface UnitImportRowError {
  /** Line number in the file (the header is line 1). */
  line: number;
  field: UnitImportField | null;
  reason: string;
}

export interface UnitImportPreviewRow {
  line: number;
  tag: string;
  kind: UnitKindKey;
  modelName: string | null;
  /** W */
  capacity: number | null;
  levelName: string;
  spaceName: string | null;
  systemName: string | null;
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
}

// ---------------------------------------------------------------------------------------------
// Companies on the job
// ---------------------------------------------------------------------------------------------

const tradesSchema = z
  .array(z.enum(TRADE_KEYS, { error: 'Not a trade.' }))
  .max(TRADE_KEYS.length)
  .refine((t) => new Set(t).size === t.length, 'A trade appears twice.');

/** POST /companies: link a company the GC already works with (by id), or create one by name. */
export const addJobCompanySchema = z.union(
  [
    z.object({ companyId: id('company'), trades: tradesSchema }).strict(),
    z.object({ name: text('a company name', 120), trades: tradesSchema }).strict(),
  ],
  { error: 'Send either companyId and trades, or name and trades.' },
);
export type AddJobCompanyInput = z.input<typeof addJobCompanySchema>;
export const updateJobCompanySchema = z.object({ trades: tradesSchema }).strict();
export type UpdateJobCompanyInput = z.input<typeof updateJobCompanySchema>;
export const companyListQuerySchema = z.object({ trade: z.enum(TRADE_KEYS).optional(), ...pageQuery }).strict();

export interface JobCompanyDto {
  /** The company's id (also the :companyId of the routes). */
  id: string;
  name: string;
  trades: TradeKey[];
  /** True for the job's owner (the GC): it cannot be removed. */
  isOwner: boolean;
  memberCount: number;
  version: number;
}

/** GET /api/companies/known: companies the caller's company already works with (for linking). */
export interface KnownCompanyDto {
  id: string;
  name: string;
}

// ---------------------------------------------------------------------------------------------
// Members
// ---------------------------------------------------------------------------------------------

export const memberListQuerySchema = z
  .object({ role: z.enum(ROLES).optional(), companyId: id('company id').optional(), ...pageQuery })
  .strict();
export const updateMemberSchema = z.object({ role: z.enum(ROLES, { error: 'Choose a role.' }) }).strict();
export type UpdateMemberInput = z.input<typeof updateMemberSchema>;

export interface MemberDto {
  /** Membership id (the :memberId of the routes). */
  id: string;
  userId: string;
  name: string;
  role: Role;
  companyId: string;
  companyName: string;
  /** Only GC managers see e-mail addresses; null for others. */
  email: string | null;
}

// ---------------------------------------------------------------------------------------------
// Defect catalogue
// ---------------------------------------------------------------------------------------------

const limitRefSchema = z.discriminatedUnion('from', [
  z.object({ from: z.literal('model'), key: z.enum(MODEL_LIMITS.map((m) => m.key) as [ModelLimitKey, ...ModelLimitKey[]]) }).strict(),
  z
    .object({
      from: z.literal('code'),
      key: z.string().refine((k) => k in CODE_LIMIT_VARIANTS, 'Not a code limit Trimout holds.'),
    })
    .strict(),
  z.object({ from: z.literal('job'), key: z.enum(JOB_SETTINGS.map((s) => s.key) as [JobSettingKey, ...JobSettingKey[]]) }).strict(),
]);

/** shared/catalogue MeasuredRule as a schema (stored as JSONB). */
export const measuredRuleSchema = z
  .object({
    measure: text('what is measured', 200),
    quantity: z.enum(QUANTITY_KINDS),
    comparison: z.enum(COMPARISONS),
    limit: limitRefSchema.optional(),
    upper: limitRefSchema.optional(),
    tolerance: z.number().nonnegative().optional(),
    expected: z.boolean().optional(),
  })
  .strict()
  .superRefine((r, ctx) => {
    const need = (cond: boolean, path: string, message: string) => {
      if (!cond) ctx.addIssue({ code: 'custom', path: [path], message });
    };
    const c: Comparison = r.comparison;
    if (c === 'yes_no') {
      need(r.quantity === 'boolean', 'quantity', 'A yes/no rule measures a boolean.');
      need(r.expected !== undefined, 'expected', 'A yes/no rule needs the answer that passes.');
    } else {
      need(r.quantity !== 'boolean', 'quantity', 'Only yes/no rules measure a boolean.');
      need(r.limit !== undefined, 'limit', 'Say where the limit comes from.');
      if (c === 'between') need(r.upper !== undefined, 'upper', 'A range needs an upper limit.');
      if (c === 'equal_within') need(r.tolerance !== undefined, 'tolerance', 'Give the allowed deviation.');
    }
  });

export const CATALOGUE_GROUP_KEYS = CATALOGUE_GROUPS.map((g) => g.key) as unknown as readonly [CatalogueGroup, ...CatalogueGroup[]];
export const CATALOGUE_CODE_PATTERN = /^[A-Z]{2}-\d{2,3}$/;

const catalogueFields = {
  code: z
    .string({ error: 'Enter a code.' })
    .trim()
    .transform((s) => s.toUpperCase())
    .pipe(z.string().regex(CATALOGUE_CODE_PATTERN, 'A code is two letters, a dash and two or three digits (e.g. DR-41).')),
  group: z.enum(CATALOGUE_GROUP_KEYS, { error: 'Choose a group.' }),
  title: text('a title', 160),
  description: text('a description', 2000),
  unitKinds: z
    .array(z.enum(UNIT_KIND_KEYS, { error: 'Not a unit kind.' }))
    .min(1, 'Choose at least one unit kind.')
    .refine((k) => new Set(k).size === k.length, 'A unit kind appears twice.'),
  defaultSeverity: z.enum(SEVERITIES, { error: 'Choose a severity.' }),
  trade: z.enum(TRADE_KEYS, { error: 'Choose the usual trade.' }),
  measuredRule: measuredRuleSchema.nullable().optional(),
  fixGuidance: text('fix guidance', 2000),
  caution: optionalText('Caution', 1000),
  needsCeilingAccess: z.boolean({ error: 'needsCeilingAccess: true or false.' }),
};
/** POST /catalogue: a job-specific defect type. */
export const createCatalogueItemSchema = z.object(catalogueFields).strict();
export type CreateCatalogueItemInput = z.input<typeof createCatalogueItemSchema>;
/** PATCH /catalogue/:itemId (If-Match). `retired: false` brings a retired item back. The code never changes. */
export const updateCatalogueItemSchema = z
  .object({
    group: catalogueFields.group.optional(),
    title: catalogueFields.title.optional(),
    description: catalogueFields.description.optional(),
    unitKinds: catalogueFields.unitKinds.optional(),
    defaultSeverity: catalogueFields.defaultSeverity.optional(),
    trade: catalogueFields.trade.optional(),
    measuredRule: catalogueFields.measuredRule,
    fixGuidance: catalogueFields.fixGuidance.optional(),
    caution: catalogueFields.caution,
    needsCeilingAccess: catalogueFields.needsCeilingAccess.optional(),
    retired: z.boolean().optional(),
  })
  .strict();
export type UpdateCatalogueItemInput = z.input<typeof updateCatalogueItemSchema>;
export const catalogueListQuerySchema = z
  .object({
    unitKind: z.enum(UNIT_KIND_KEYS, { error: 'Not a unit kind.' }).optional(),
    group: z.enum(CATALOGUE_GROUP_KEYS, { error: 'Not a catalogue group.' }).optional(),
    includeRetired: booleanQuery.optional(),
    ...pageQuery,
  })
  .strict();

export interface CatalogueItemDto {
  id: string;
  code: string;
  group: CatalogueGroup;
  title: string;
  description: string;
  unitKinds: UnitKindKey[];
  defaultSeverity: Severity;
  trade: TradeKey;
  measuredRule: z.infer<typeof measuredRuleSchema> | null;
  fixGuidance: string;
  caution: string | null;
  needsCeilingAccess: boolean;
  /** True when copied from Trimout's built-in catalogue. */
  builtin: boolean;
  retiredAt: string | null;
  version: number;
}
