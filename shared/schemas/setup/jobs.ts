/**
 * Jobs and their settings: code editions, days to fix per severity, recurring thresholds, limits.
 */
import { z } from 'zod';
import { CODE_DOCUMENTS, UNIT_SYSTEMS, type CodeDocument, type JobSettingKey, type UnitSystem } from '../../catalogue/types';
import { CODE_LIMIT_VARIANTS, DEFAULT_EDITIONS } from '../../calc/limits';
import { CONCENTRATION_LIMITS } from '../../calc/refrigerant';
import type { Role, Severity } from '../../words';
import { timeZoneSchema } from './common';
import { text, optionalText, dateOnly } from './fields';
import { type StatedLimitDto, jobSettingsInputSchema } from './limits';
import { testSettingsInputSchema, type TestSettingsDto } from '../testRecords';

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
const MIN_UNITS = 'Minimum units: a whole number from 2 to 1000.';
/** Sent as a fraction, typed as a percent on the settings screen: the words name the percent. */
const MIN_SHARE = 'Minimum share: from 0 to 100 % of the checked units.';
const WINDOW_DAYS = 'Days counted: a whole number from 1 to 365.';

export const recurringThresholdsSchema = z
  .object({
    minUnits: z.number(MIN_UNITS).int(MIN_UNITS).min(2, MIN_UNITS).max(1000, MIN_UNITS),
    minShare: z.number(MIN_SHARE).min(0, MIN_SHARE).max(1, MIN_SHARE).optional(),
    windowDays: z.number(WINDOW_DAYS).int(WINDOW_DAYS).min(1, WINDOW_DAYS).max(365, WINDOW_DAYS).optional(),
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

/**
 * POST /api/jobs/:jobId/copy (GC manager of the job): a new job with the same structure, catalogue,
 * settings and companies (server/commands/copyJob.ts); its own name, number, address and dates.
 */
export const copyJobSchema = z
  .object({ name: jobFields.name, number: jobFields.number, address: jobFields.address, startsOn: jobFields.startsOn, endsOn: jobFields.endsOn })
  .strict()
  .refine(datesInOrder, { message: 'The end date is before the start date.', path: ['endsOn'] });
export type CopyJobInput = z.input<typeof copyJobSchema>;

/** PATCH /api/jobs/:jobId (If-Match) */
export const updateJobSchema = z
  .object({
    ...jobFields,
    name: jobFields.name.optional(),
    codeEditions: codeEditionsSchema.optional(),
    severityDueDays: severityDueDaysSchema.optional(),
    recurringThresholds: recurringThresholdsSchema.optional(),
    settings: jobSettingsInputSchema.optional(),
    /** Settings that decide test records, each with its source (shared/schemas/testRecords.ts); null removes one. */
    testSettings: testSettingsInputSchema.optional(),
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
  /** The job's own test settings (a setting left out uses Trimout's stated default: see GET /test-records answers). */
  testSettings: TestSettingsDto;
  version: number;
}
