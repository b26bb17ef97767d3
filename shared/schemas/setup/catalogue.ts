/**
 * The defect catalogue of a job.
 */
import { z } from 'zod';
import { CATALOGUE_GROUPS, CODE_CHECK_RULES, CODE_CHECKS, COMPARISONS, JOB_SETTINGS, MODEL_LIMITS, QUANTITY_KINDS, type CatalogueGroup, type Comparison, type JobSettingKey, type ModelLimitKey } from '../../catalogue/types';
import { CODE_LIMIT_VARIANTS } from '../../calc/limits';
import { CAUTION_REQUIRED, needsCaution } from '../../catalogue';
import { SEVERITIES, TRADE_KEYS, UNIT_KIND_KEYS, type Severity, type TradeKey, type UnitKindKey } from '../../words';
import { textLimit } from '../fields';
import { text, optionalText, pageQuery, booleanQuery } from './fields';

/** What the catalogue's long text boxes count down to (components/ui TextField `limit`). */
export const CATALOGUE_TEXT_LIMITS = {
  description: textLimit(2000, 'A description'),
  fixGuidance: textLimit(2000, 'Fix guidance'),
  caution: textLimit(1000, 'Caution'),
} as const;

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
    codeCheck: z.enum(CODE_CHECKS).optional(),
  })
  .strict()
  .superRefine((r, ctx) => {
    const need = (cond: boolean, path: string, message: string) => {
      if (!cond) ctx.addIssue({ code: 'custom', path: [path], message });
    };
    const c: Comparison = r.comparison;
    const decided = r.codeCheck ? CODE_CHECK_RULES[r.codeCheck] : undefined;
    if (decided) {
      need(r.comparison === decided.comparison, 'comparison', `This code check compares ${decided.comparison.replace('_', ' ')}.`);
      need(r.quantity === decided.quantity, 'quantity', `This code check measures a ${decided.quantity}.`);
    }
    if (c === 'yes_no') {
      need(r.quantity === 'boolean', 'quantity', 'A yes/no rule measures a boolean.');
      need(r.expected !== undefined, 'expected', 'A yes/no rule needs the answer that passes.');
      if (r.codeCheck) need(r.expected === true, 'expected', 'A rule the code decides passes on yes.');
    } else {
      need(r.quantity !== 'boolean', 'quantity', 'Only yes/no rules measure a boolean.');
      // A code calculation supplies its own limit.
      if (!decided) need(r.limit !== undefined, 'limit', 'Say where the limit comes from.');
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
  description: text('a description', CATALOGUE_TEXT_LIMITS.description),
  unitKinds: z
    .array(z.enum(UNIT_KIND_KEYS, { error: 'Choose a unit kind from the list.' }))
    .min(1, 'Choose at least one unit kind.')
    .refine((k) => new Set(k).size === k.length, 'A unit kind appears twice.'),
  defaultSeverity: z.enum(SEVERITIES, { error: 'Choose a severity.' }),
  trade: z.enum(TRADE_KEYS, { error: 'Choose the usual trade.' }),
  measuredRule: measuredRuleSchema.nullable().optional(),
  fixGuidance: text('fix guidance', CATALOGUE_TEXT_LIMITS.fixGuidance),
  caution: optionalText('Caution', CATALOGUE_TEXT_LIMITS.caution),
  needsCeilingAccess: z.boolean({ error: 'Say whether the fix needs the ceiling open.' }),
};
/** POST /catalogue: a job-specific defect type; hazardous work needs its caution (shared/catalogue needsCaution). */
export const createCatalogueItemSchema = z
  .object(catalogueFields)
  .strict()
  .superRefine((item, ctx) => {
    if (needsCaution(item) && !item.caution) ctx.addIssue({ code: 'custom', path: ['caution'], message: CAUTION_REQUIRED });
  });
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
    unitKind: z.enum(UNIT_KIND_KEYS, { error: 'Choose a unit kind from the list.' }).optional(),
    group: z.enum(CATALOGUE_GROUP_KEYS, { error: 'Choose a group from the list.' }).optional(),
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
