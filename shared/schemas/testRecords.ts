/**
 * Test records: pressure test, evacuation, charge record, drain test and start-up record.
 * Request schemas (zod, strict) and the answers (DTOs with the computed figures). The routes are
 * listed in docs/api-test-records.md; the calculations are shared/calc/testRecords.ts.
 *
 * Figures are sent as the trade types them ("600 psig", "20 °C", "500 microns", "120 ft",
 * "12 lb 6 oz") and answered in base units (Pa, K, kg, mm, minutes) beside the text typed.
 *
 * Trimout records what people observed; it does not certify the installation (TEST_RECORD_CAUTION).
 */
import { z } from 'zod';
import {
  parseAbsolutePressure,
  parseChargeFactor,
  parseGaugePressure,
  parseLength,
  parseMass,
  parseTemperature,
  parseVacuum,
  type ChargeResult,
  type GaugePressureUnit,
  type Parsed,
  type SourcedFigure,
  type StartupMode,
  type VacuumUnit,
} from '../calc/testRecords';
import type { LevelReadiness, ReadinessResponse, SystemReadiness } from './board';
import { booleanQuery, id, limited, pageQuery, textLimit } from './fields';
import './plainWords';

export const TEST_RECORD_KINDS = ['pressure', 'evacuation', 'charge', 'drain', 'startup'] as const;
export type TestRecordKind = (typeof TEST_RECORD_KINDS)[number];
export const TEST_RECORD_KIND_LABELS: Record<TestRecordKind, string> = {
  pressure: 'Pressure test',
  evacuation: 'Evacuation',
  charge: 'Charge record',
  drain: 'Drain test',
  startup: 'Start-up record',
};
/** Kinds recorded per unit; every other kind is per system. */
export const UNIT_TEST_KINDS: readonly TestRecordKind[] = ['drain'];

/** passed / failed: judged by the calculation; recorded: a charge record (no pass or fail). */
export const TEST_RESULTS = ['passed', 'failed', 'recorded'] as const;
export type TestResult = (typeof TEST_RESULTS)[number];

export const TEST_MEDIA = ['nitrogen', 'nitrogen_with_trace_gas', 'dry_air', 'other'] as const;
export type TestMedium = (typeof TEST_MEDIA)[number];

/** What a photo of a record shows. Sent in `photoStages`, one per photo, in the order of the files. */
export const TEST_PHOTO_STAGES = ['gauge_start', 'gauge_end', 'test'] as const;
export type TestPhotoStage = (typeof TEST_PHOTO_STAGES)[number];

/** Shown on every record screen and carried by every record answer. */
export const TEST_RECORD_CAUTION =
  'Pressure testing with nitrogen, brazing, refrigerant handling (flammable A2L refrigerants included) and electrical start-up can hurt people. ' +
  'Use a regulator and relief valve on nitrogen, never exceed the test pressure the manufacturer states, ventilate, and isolate power before work on live parts. ' +
  'Trimout records what was observed; it does not certify the system. The manufacturer’s installation manual, local codes and licensed practice govern.';

// ------------------------------------------------------------------------------------------------
// Field helpers: text that must parse, with the parser's own reason

function typed<T>(label: string, parse: (s: string) => Parsed<T>, max = 40) {
  return z
    .string({ error: `Enter ${label}.` })
    .trim()
    .min(1, `Enter ${label}.`)
    .max(max, `${label[0]!.toUpperCase()}${label.slice(1)} is at most ${max} characters.`)
    .superRefine((s, ctx) => {
      const r = parse(s);
      if (!r.ok) ctx.addIssue({ code: 'custom', message: r.error });
    });
}

const gaugePressure = (label: string) => typed(label, parseGaugePressure);
const temperature = (label: string) => typed(label, parseTemperature);
/** Vacuum checked against the standard atmosphere here; the server checks "inHg vacuum" again at the job's own. */
const vacuum = (label: string) => typed(label, (s) => parseVacuum(s));
const length = (label: string) => typed(label, parseLength);
const mass = (label: string) => typed(label, parseMass);

const sourceText = (what: string) =>
  z
    .string({ error: `Say where ${what} came from.` })
    .trim()
    .min(1, `Say where ${what} came from (the manufacturer’s manual and page, or the code section the job follows).`)
    .max(300, 'The source is at most 300 characters.');

const shortText = (label: string, max: number) =>
  z
    .string({ error: `Type ${label} as text.` })
    .trim()
    .min(1, `Enter ${label}.`)
    .max(max, `${label[0]!.toUpperCase()}${label.slice(1)} is at most ${max} characters.`);

export const TEST_NOTE_LIMIT = textLimit(2000, 'The note');
const note = limited(z.string({ error: 'Type the note as text.' }).trim(), TEST_NOTE_LIMIT);

const yes = (label: string) => z.boolean({ error: `Say yes or no: ${label}.` });
const isoTime = (label: string) =>
  z
    .string({ error: `Enter ${label} (date and time).` })
    .refine((s) => /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d{1,3})?)?(Z|[+-]\d{2}:\d{2})$/.test(s) && !Number.isNaN(Date.parse(s)), {
      message: `Enter ${label} as a date and time with its offset (2026-12-01T08:00:00Z).`,
    });
const minutes = (label: string) =>
  z.number({ error: `Enter ${label} in minutes.` }).positive(`${label[0]!.toUpperCase()}${label.slice(1)}: more than zero minutes.`).max(60 * 24 * 14, `${label[0]!.toUpperCase()}${label.slice(1)}: at most 14 days.`);

// ------------------------------------------------------------------------------------------------
// Create (POST /api/jobs/:jobId/test-records): one schema per kind, a union on `kind`

const common = {
  /** Optional, made on the phone (UUID): the same id again from the same person answers 200 with that record. */
  id: id('test record id').optional(),
  note: note.optional(),
  /** A correction of an earlier record of the same kind and system (or unit): that record is kept and marked superseded. */
  supersedesId: id('record to correct').optional(),
  /** One per photo sent, in the order of the files; omitted: every photo is `test`. */
  photoStages: z.array(z.enum(TEST_PHOTO_STAGES, { error: 'Photo: gauge_start, gauge_end or test.' })).max(10, 'At most 10 photos.').optional(),
};

export const pressureTestInputSchema = z
  .object({
    kind: z.literal('pressure', { error: 'Choose the kind of record: pressure, evacuation, charge, drain or startup.' }),
    systemId: id('system'),
    /** The part of the pipework tested, when not the whole system ("Branch B, risers 3–4"). */
    section: shortText('the part of the pipework tested', 120).optional(),
    /** Levels the tested part covers; omitted: the whole system. Readiness counts it only on these levels. */
    levelIds: z.array(id('level')).max(100).optional(),
    medium: z.enum(TEST_MEDIA, { error: 'Test medium: nitrogen, nitrogen_with_trace_gas, dry_air or other.' }),
    targetPressure: z.object({ value: gaugePressure('the target test pressure'), source: sourceText('the target test pressure') }).strict(),
    startPressure: gaugePressure('the start gauge pressure'),
    endPressure: gaugePressure('the end gauge pressure'),
    startTemperature: temperature('the start temperature'),
    endTemperature: temperature('the end temperature'),
    startAt: isoTime('the start time'),
    endAt: isoTime('the end time'),
    gauge: z
      .object({
        identifier: shortText('the gauge identifier', 80),
        calibratedOn: z.string({ error: 'Enter the calibration date (YYYY-MM-DD).' }).regex(/^\d{4}-\d{2}-\d{2}$/, 'Enter the calibration date as YYYY-MM-DD.'),
        /** The smallest step the gauge shows ("1 psi", "10 kPa"): the default allowed drop. */
        resolution: gaugePressure('the gauge’s resolution'),
      })
      .strict(),
    ...common,
  })
  .strict()
  .refine((r) => Date.parse(r.endAt) > Date.parse(r.startAt), { message: 'The end time is after the start time.', path: ['endAt'] });

export const evacuationInputSchema = z
  .object({
    kind: z.literal('evacuation', { error: 'Choose the kind of record: pressure, evacuation, charge, drain or startup.' }),
    systemId: id('system'),
    deepestReading: vacuum('the deepest reading'),
    /** Reading when the pump was isolated, and after the hold: the decay test. */
    isolatedReading: vacuum('the reading at isolation'),
    afterHoldReading: vacuum('the reading after the hold'),
    holdMinutes: minutes('the hold time'),
    gaugeIdentifier: shortText('the vacuum gauge identifier', 80).optional(),
    ...common,
  })
  .strict();

export const chargeInputSchema = z
  .object({
    kind: z.literal('charge', { error: 'Choose the kind of record: pressure, evacuation, charge, drain or startup.' }),
    systemId: id('system'),
    /** Liquid-line lengths per pipe size, as the manual names the size (its factor is on the system's outdoor model). */
    liquidLines: z
      .array(z.object({ size: shortText('the liquid-line size', 20), length: length('the liquid-line length') }).strict())
      .min(1, 'Enter at least one liquid-line length.')
      .max(20, 'At most 20 liquid-line sizes.'),
    weighedIn: mass('the amount weighed in'),
    scaleIdentifier: shortText('the scale identifier', 80).optional(),
    ...common,
  })
  .strict();

export const drainTestInputSchema = z
  .object({
    kind: z.literal('drain', { error: 'Choose the kind of record: pressure, evacuation, charge, drain or startup.' }),
    unitId: id('unit'),
    waterPoured: yes('water poured'),
    /** As typed ("2 L", "1/2 gal"): free text, not judged. */
    waterAmount: shortText('the amount of water', 40).optional(),
    reachesTermination: yes('reaches its termination'),
    pumpFitted: yes('pump fitted'),
    pumpRunsAndLifts: yes('pump runs and lifts').nullable().optional(),
    floatSwitchFitted: yes('overflow or float switch fitted'),
    floatSwitchStopsUnit: yes('overflow or float switch stops the unit').nullable().optional(),
    noLeakAtJoints: yes('no leak at joints'),
    ...common,
  })
  .strict()
  .refine((r) => r.pumpFitted || r.pumpRunsAndLifts == null, { message: 'No pump is fitted: leave "pump runs and lifts" empty.', path: ['pumpRunsAndLifts'] })
  .refine((r) => r.floatSwitchFitted || r.floatSwitchStopsUnit == null, {
    message: 'No overflow or float switch is fitted: leave "stops the unit" empty.',
    path: ['floatSwitchStopsUnit'],
  });

export const STARTUP_MODES = ['cooling', 'heating', 'fan'] as const;
export const startupInputSchema = z
  .object({
    kind: z.literal('startup', { error: 'Choose the kind of record: pressure, evacuation, charge, drain or startup.' }),
    systemId: id('system'),
    mode: z.enum(STARTUP_MODES, { error: 'Mode: cooling, heating or fan.' }),
    technician: shortText('the technician’s name', 120),
    units: z
      .array(
        z
          .object({
            unitId: id('unit'),
            answers: yes('the unit answers'),
            /** The address the controller shows ("1-03"), when it has one. */
            address: shortText('the address', 20).optional(),
            addressed: yes('the unit is addressed'),
            faultShown: yes('a fault is shown'),
            faultCode: shortText('the fault code', 20).optional(),
            supplyTemperature: temperature('the supply air temperature').optional(),
            returnTemperature: temperature('the return air temperature').optional(),
          })
          .strict(),
      )
      .min(1, 'Enter at least one indoor unit.')
      .max(200, 'At most 200 units.'),
    ...common,
  })
  .strict();

export const createTestRecordSchema = z.discriminatedUnion(
  'kind',
  [pressureTestInputSchema, evacuationInputSchema, chargeInputSchema, drainTestInputSchema, startupInputSchema],
  { error: 'Choose the kind of record: pressure, evacuation, charge, drain or startup.' },
);
export type CreateTestRecordInput = z.input<typeof createTestRecordSchema>;
export type CreateTestRecordParsed = z.output<typeof createTestRecordSchema>;

/** POST /test-records/:recordId/witness (If-Match): an inspector or GC manager confirms the record. */
export const witnessTestRecordSchema = z.object({ note: note.optional() }).strict();
export type WitnessTestRecordInput = z.input<typeof witnessTestRecordSchema>;

export const testRecordParamsSchema = z.object({ jobId: id('job id'), recordId: id('test record id') }).strict();

/** GET /test-records: filters; `current: true` leaves out superseded records. */
export const testRecordListQuerySchema = z
  .object({
    systemId: id('system id').optional(),
    unitId: id('unit id').optional(),
    kind: z.enum(TEST_RECORD_KINDS, { error: 'kind: pressure, evacuation, charge, drain or startup.' }).optional(),
    result: z.enum(TEST_RESULTS, { error: 'result: passed, failed or recorded.' }).optional(),
    witnessed: booleanQuery.optional(),
    current: booleanQuery.optional(),
    ...pageQuery,
  })
  .strict();
export type TestRecordListQuery = z.input<typeof testRecordListQuerySchema>;

/** GET /test-records.csv: the same filters, no paging. */
export const testRecordCsvQuerySchema = testRecordListQuerySchema.omit({ limit: true, cursor: true });

// ------------------------------------------------------------------------------------------------
// Job settings for tests (PATCH /api/jobs/:jobId `testSettings`) and the system's charge basis

const setting = <T>(label: string, parse: (s: string) => Parsed<T>) =>
  z.object({ value: typed(label, parse), source: sourceText(label) }).strict().nullable().optional();

const durationParse = (s: string): Parsed<{ minutes: number }> => {
  const m = /^([0-9]+(?:\.[0-9]+)?) ?(min|mins|minutes?|h|hr|hrs|hours?)$/i.exec(s.trim());
  if (!m) return { ok: false, error: 'Type a time with its unit, e.g. 10 min or 24 h.' };
  const v = Number(m[1]);
  return { ok: true, value: { minutes: /^h/i.test(m[2] ?? '') ? v * 60 : v }, text: s.trim() };
};
export { durationParse as parseDuration };

export const TEST_SETTING_KEYS = ['atmosphericPressure', 'allowedPressureDrop', 'minPressureHold', 'targetVacuum', 'decayRiseLimit', 'minDecayHold'] as const;
export type TestSettingKey = (typeof TEST_SETTING_KEYS)[number];

/** Each setting: the value as typed and where it came from; null removes it (the default applies again). */
export const testSettingsInputSchema = z
  .object({
    atmosphericPressure: setting('the site’s atmospheric pressure', parseAbsolutePressure),
    /** A gauge-pressure difference ("2 psi", "10 kPa"). */
    allowedPressureDrop: setting('the allowed pressure drop', parseGaugePressure),
    minPressureHold: setting('the minimum pressure-test hold', durationParse),
    targetVacuum: setting('the target vacuum', (s) => parseVacuum(s)),
    decayRiseLimit: setting('the decay-test rise limit', (s) => parseVacuum(s)),
    minDecayHold: setting('the minimum decay-test hold', durationParse),
  })
  .strict();
export type TestSettingsInput = z.input<typeof testSettingsInputSchema>;

/** A stored test setting: the base value (Pa or minutes), the text typed and its source. */
export interface TestSettingDto {
  value: number;
  text: string;
  source: string;
}
export type TestSettingsDto = Partial<Record<TestSettingKey, TestSettingDto>>;

/** The outdoor unit's factory charge and per-size additional-charge factors, from its manual (PATCH /systems/:systemId `chargeBasis`). */
export const chargeBasisInputSchema = z
  .object({
    factoryChargeSource: sourceText('the factory charge').optional(),
    factors: z
      .array(
        z
          .object({
            size: shortText('the liquid-line size', 20),
            factor: typed('the factor', parseChargeFactor),
            source: sourceText('the factor'),
          })
          .strict(),
      )
      .max(20, 'At most 20 sizes.'),
  })
  .strict();
export type ChargeBasisInput = z.input<typeof chargeBasisInputSchema>;
export interface ChargeBasisDto {
  factoryChargeSource: string | null;
  factors: Array<{ size: string; kgPerM: number; text: string; source: string }>;
}

// ------------------------------------------------------------------------------------------------
// Answers

export interface TestPhotoDto {
  id: string;
  url: string;
  thumbUrl: string;
  stage: TestPhotoStage;
  contentType: string;
  width: number | null;
  height: number | null;
}

/** A pressure given in Pa and in the unit the gauge was read in. */
export interface PressureFigure {
  pa: number;
  /** In the gauge's unit (`unit` of the figures). */
  value: number;
}

export interface PressureFigures {
  unit: GaugePressureUnit;
  atmospheric: SourcedFigure;
  target: { pa: number; value: number; text: string; source: string };
  start: PressureFigure & { absolutePa: number; kelvin: number };
  end: PressureFigure & { absolutePa: number; kelvin: number };
  /** Side by side: the change as read and the change once the temperature is accounted for (negative: a drop). */
  uncorrectedChange: PressureFigure;
  correctedChange: PressureFigure;
  /** The start pressure carried to the end temperature (P1 × T2 / T1, absolute), as a gauge reading. */
  expectedEnd: PressureFigure;
  allowedDrop: SourcedFigure & { valueInUnit: number };
  holdMinutes: number;
  minHold: SourcedFigure | null;
  reachedTarget: boolean;
  heldLongEnough: boolean | null;
  gaugeResolution: PressureFigure;
}

export interface EvacuationFigures {
  /** Absolute Pa, and in microns (the trade's usual unit). */
  deepest: { pa: number; microns: number };
  isolated: { pa: number; microns: number };
  afterHold: { pa: number; microns: number };
  rise: { pa: number; microns: number };
  holdMinutes: number;
  target: SourcedFigure & { microns: number };
  riseLimit: SourcedFigure & { microns: number };
  minHold: SourcedFigure;
  reachedTarget: boolean;
  riseWithinLimit: boolean;
  heldLongEnough: boolean;
  /** The unit each reading was typed in. */
  typedUnits: { deepest: VacuumUnit; isolated: VacuumUnit; afterHold: VacuumUnit };
}

/** The charge record's figures: the calculation's own result (shared/calc/testRecords.ts). */
export type ChargeFigures = ChargeResult;

export interface DrainFigures {
  needsPower: boolean;
}

export interface StartupFigures {
  mode: StartupMode;
  units: Array<{
    unitId: string;
    tag: string | null;
    /** return − supply, K (= °C difference; × 9/5 for °F). */
    differenceK: number | null;
    supplyKelvin: number | null;
    returnKelvin: number | null;
    ok: boolean;
  }>;
  missingUnits: Array<{ id: string; tag: string }>;
}

interface TestRecordBase {
  id: string;
  jobId: string;
  system: { id: string; name: string } | null;
  unit: { id: string; tag: string; levelId: string } | null;
  /** The company responsible for the system (or the unit's system). */
  company: { id: string; name: string } | null;
  result: TestResult;
  /** Why it failed, in plain words (empty when passed or recorded). */
  reasons: string[];
  note: string | null;
  recordedBy: { id: string; name: string };
  recordedAt: string;
  witnessedBy: { id: string; name: string } | null;
  witnessedAt: string | null;
  witnessNote: string | null;
  /** Witnessed records are locked: a correction is a new record with supersedesId. */
  locked: boolean;
  supersedesId: string | null;
  supersededById: string | null;
  /** Not superseded. */
  current: boolean;
  photos: TestPhotoDto[];
  version: number;
  caution: string;
}

/** The record as typed (the create body without kind, id, note, supersedesId, photoStages). */
type DataOf<S extends z.ZodType> = Omit<z.output<S>, 'kind' | 'id' | 'note' | 'supersedesId' | 'photoStages'>;

export type TestRecordDto =
  | (TestRecordBase & { kind: 'pressure'; data: DataOf<typeof pressureTestInputSchema>; figures: PressureFigures })
  | (TestRecordBase & { kind: 'evacuation'; data: DataOf<typeof evacuationInputSchema>; figures: EvacuationFigures })
  | (TestRecordBase & { kind: 'charge'; data: DataOf<typeof chargeInputSchema>; figures: ChargeFigures })
  | (TestRecordBase & { kind: 'drain'; data: DataOf<typeof drainTestInputSchema>; figures: DrainFigures })
  | (TestRecordBase & { kind: 'startup'; data: DataOf<typeof startupInputSchema>; figures: StartupFigures });

export interface TestRecordList {
  items: TestRecordDto[];
  nextCursor: string | null;
  caution: string;
}

// ------------------------------------------------------------------------------------------------
// Readiness (GET /api/jobs/:jobId/readiness): the records behind each blocker

/**
 * A record readiness waits for. `missing`: none on file; `failed`: the latest (not superseded)
 * record failed; `awaiting_witness`: it passed but nobody has witnessed it yet (where the rule
 * needs a witness). `recordId` links the record behind a failed or awaiting one (null when missing).
 */
export interface TestBlocker {
  kind: TestRecordKind;
  state: 'missing' | 'failed' | 'awaiting_witness';
  systemId: string | null;
  systemName: string | null;
  unitId: string | null;
  unitTag: string | null;
  /** The level the pipework is on (pressure tests, per level). */
  levelId: string | null;
  recordId: string | null;
}

/** What a level adds to the readiness answer. */
export interface LevelTestReadiness {
  /** Every system with pipework on the level has a passed, witnessed pressure test covering it, and every concealed unit a passed drain test. */
  testsReady: boolean;
  testBlockers: TestBlocker[];
}

/** What a system adds to the readiness answer. */
export interface SystemTestReadiness {
  /** Units ready (today's rule), and pressure test (every level) and evacuation passed, charge recorded. */
  startupReady: boolean;
  startupBlockers: TestBlocker[];
  /** Start-up ready, the start-up record passed, and every unit on the system has a passed drain test (pumped units proven with power). */
  accepted: boolean;
  acceptanceBlockers: TestBlocker[];
}

/** Unit kinds hidden above the ceiling, whose drains are tested before it closes: ducted units and the coil kit. */
export const CONCEALED_UNIT_KINDS = ['ducted_low', 'ducted_high', 'ducted_very_high', 'ahu_coil_kit'] as const;

/** GET /api/jobs/:jobId/readiness as it is answered: each level and system with its test figures. */
export type ReadinessWithTests = Omit<ReadinessResponse, 'levels' | 'systems'> & {
  levels: Array<LevelReadiness & LevelTestReadiness>;
  systems: Array<SystemReadiness & SystemTestReadiness>;
};
