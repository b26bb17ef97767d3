/**
 * The job settings form (JobSettingsScreen): what the fields hold as typed, the zod schema that
 * turns them into the shared PATCH /api/jobs/:jobId pieces (the shared schemas give the rules and
 * their messages: critical ≤ major ≤ minor, minUnits 2..1000, minShare 0..1), and the PATCH body
 * holding only what differs from the job as loaded.
 *
 * The recurring share is typed as a percent ("10" = 10 %) and sent as a fraction (0.1).
 */
import { z } from 'zod';
import { CODE_DOCUMENTS, JOB_SETTINGS, type CodeDocument, type JobSettingKey } from '../../shared/catalogue/types';
import {
  codeEditionsSchema,
  recurringThresholdsSchema,
  severityDueDaysSchema,
  statedLimitInput,
  type JobDetail,
  type StatedLimitInput,
  type UpdateJobInput,
} from '../../shared/schemas/setup';
import { SEVERITIES } from '../../shared/words';

/**
 * What the settings form holds: the text as typed (numbers and the recurring share as a percent,
 * "10" = 10 %); the schema below turns it into the job's values (SettingsFormOutput).
 */
export type SettingsFormValues = z.input<typeof settingsFormSchema>;

/** 0.1 → "10"; 0.125 → "12.5" (two decimals of a percent at most). */
export function shareToPercent(share: number): string {
  return String(Math.round(share * 10000) / 100);
}

/** "10" → 0.1; "12.5" → 0.125 (two decimals of a percent kept). */
export function percentToShare(percent: string): number {
  return Math.round(Number(percent.trim()) * 100) / 10000;
}

/** Typed text → number; empty or not a plain decimal → NaN (the shared schema then says what it wants). */
function toNumber(text: string): number {
  const t = text.trim();
  return /^-?(\d+(\.\d*)?|\.\d+)$/.test(t) ? Number(t) : Number.NaN;
}

export function toSettingsForm(job: JobDetail): SettingsFormValues {
  return {
    codeEditions: { ...job.codeEditions },
    severityDueDays: {
      critical: String(job.severityDueDays.critical),
      major: String(job.severityDueDays.major),
      minor: String(job.severityDueDays.minor),
    },
    recurringThresholds: {
      minUnits: String(job.recurringThresholds.minUnits),
      minShare: shareToPercent(job.recurringThresholds.minShare),
    },
    settings: Object.fromEntries(
      JOB_SETTINGS.map((s) => [s.key, { value: job.settings[s.key]?.text ?? '', source: job.settings[s.key]?.source ?? '' }]),
    ) as SettingsFormValues['settings'],
  };
}

const PERCENT = /^(\d+(\.\d+)?|\.\d+)$/;

const dueDaysForm = z
  .object({ critical: z.string(), major: z.string(), minor: z.string() })
  .transform((d) => ({ critical: toNumber(d.critical), major: toNumber(d.major), minor: toNumber(d.minor) }))
  .pipe(severityDueDaysSchema);

const recurringForm = z
  .object({
    minUnits: z.string().trim().regex(/^\d+$/, 'Units: a whole number, e.g. 3.'),
    minShare: z
      .string()
      .trim()
      .regex(PERCENT, 'Share: a percent from 0 to 100, e.g. 10.')
      .refine((p) => Number(p) <= 100, 'Share: at most 100 %.'),
  })
  .transform((r): z.input<typeof recurringThresholdsSchema> => ({ minUnits: Number(r.minUnits), minShare: percentToShare(r.minShare) }))
  .pipe(recurringThresholdsSchema);

/**
 * One job limit as typed: both empty = no value (null); otherwise the shared stated-limit schema
 * (value with its unit, and a source), whose messages land at `<key>.value` / `<key>.source`.
 */
const limitField = (def: (typeof JOB_SETTINGS)[number]) =>
  z
    .object({ value: z.string(), source: z.string() })
    .transform((d) => (d.value.trim() === '' && d.source.trim() === '' ? null : d))
    .pipe(statedLimitInput(def.quantity, def.label).nullable());

const jobLimitsForm = z
  .object(Object.fromEntries(JOB_SETTINGS.map((def) => [def.key, limitField(def)])) as Record<JobSettingKey, ReturnType<typeof limitField>>)
  .transform((limits) => {
    const out = {} as Record<JobSettingKey, StatedLimitInput | null>;
    for (const def of JOB_SETTINGS) {
      const l = limits[def.key];
      out[def.key] = l ? { value: l.value, source: l.source } : null;
    }
    return out;
  });

export const settingsFormSchema = z.object({
  codeEditions: codeEditionsSchema.transform((e) => e as Record<CodeDocument, string>),
  severityDueDays: dueDaysForm,
  recurringThresholds: recurringForm,
  settings: jobLimitsForm,
});
export type SettingsFormOutput = z.output<typeof settingsFormSchema>;

/**
 * The PATCH body: only the groups that differ from the job as loaded (code editions and due
 * days go whole, as the server stores them whole); a job limit only when it changed (null removes).
 * Empty when nothing changed.
 */
export function settingsPatch(job: JobDetail, values: SettingsFormOutput): UpdateJobInput {
  const patch: UpdateJobInput = {};
  if (CODE_DOCUMENTS.some((d) => values.codeEditions[d] !== job.codeEditions[d])) patch.codeEditions = { ...values.codeEditions };
  if (SEVERITIES.some((s) => values.severityDueDays[s] !== job.severityDueDays[s])) patch.severityDueDays = { ...values.severityDueDays };
  const r = values.recurringThresholds;
  if (r.minUnits !== job.recurringThresholds.minUnits || r.minShare !== job.recurringThresholds.minShare) {
    patch.recurringThresholds = { minUnits: r.minUnits, minShare: r.minShare ?? job.recurringThresholds.minShare };
  }
  const settings: Partial<Record<JobSettingKey, StatedLimitInput | null>> = {};
  for (const def of JOB_SETTINGS) {
    const next = values.settings[def.key];
    const now = job.settings[def.key];
    if (next === null ? now !== undefined : !now || now.text !== next.value || now.source !== next.source) settings[def.key] = next;
  }
  if (Object.keys(settings).length > 0) patch.settings = settings;
  return patch;
}

/** One plain line on when a defect type counts as recurring, with the numbers typed so far. */
export function recurringRuleWords(minUnits: string, percent: string): string {
  const n = /^\d+$/.test(minUnits.trim()) ? minUnits.trim() : 'N';
  const p = PERCENT.test(percent.trim()) ? percent.trim() : 'P';
  return `A defect type found on at least ${n} units and on at least ${p} % of the checked units of the kinds it applies to is flagged recurring.`;
}

/** Field labels, for saying which saved values differ from the typed ones after a conflict. */
export const SETTINGS_FIELD_LABELS: Record<string, string> = {
  ...Object.fromEntries(CODE_DOCUMENTS.map((d) => [`codeEditions.${d}`, `${d} edition`])),
  'severityDueDays.critical': 'Critical due days',
  'severityDueDays.major': 'Major due days',
  'severityDueDays.minor': 'Minor due days',
  'recurringThresholds.minUnits': 'Recurring: units',
  'recurringThresholds.minShare': 'Recurring: share (%)',
  ...Object.fromEntries(
    JOB_SETTINGS.flatMap((s) => [
      [`settings.${s.key}.value`, s.label.replace(' (job setting)', '')],
      [`settings.${s.key}.source`, `${s.label.replace(' (job setting)', '')}: source`],
    ]),
  ),
};

/** Every leaf path of the form with its text ("severityDueDays.critical" → "2"). */
export function flattenForm(values: SettingsFormValues): Record<string, string> {
  const out: Record<string, string> = {};
  const walk = (v: unknown, path: string) => {
    if (v !== null && typeof v === 'object') for (const [k, c] of Object.entries(v)) walk(c, path ? `${path}.${k}` : k);
    else out[path] = typeof v === 'string' ? v.trim() : String(v ?? '');
  };
  walk(values, '');
  return out;
}

/** Paths of the fields whose text differs between two fillings of the form. */
export function changedPaths(before: SettingsFormValues, after: SettingsFormValues): string[] {
  const a = flattenForm(before);
  const b = flattenForm(after);
  return Object.keys(a).filter((k) => a[k] !== b[k]);
}

/** Labels of the fields that differ between two fillings of the form. */
export function differingFields(before: SettingsFormValues, after: SettingsFormValues): string[] {
  return changedPaths(before, after).map((k) => SETTINGS_FIELD_LABELS[k] ?? k);
}
