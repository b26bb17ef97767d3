/**
 * Sampling audits (shared/calc/sampling.ts computes the plans and the decision).
 *
 * GET  /jobs/:jobId/audits[?levelId=]        GC manager, inspector → AuditListResponse (with levelId: the
 *                                            marks the walk screens show on that level's units)
 * POST /jobs/:jobId/audits                   GC manager, inspector (Idempotency-Key) → 201 AuditDetail;
 *                                            the lot is chosen by the filters and frozen now
 * GET  /jobs/:jobId/audits/:auditId          GC manager, inspector → AuditDetail (state and decision)
 * GET  /jobs/:jobId/audits/:auditId.csv      GC manager, inspector → the audit report as CSV
 */
import { z } from 'zod';
import { AQLS, INSPECTION_LEVELS, type AuditDecision, type AuditPlan, type AuditState } from '../calc/sampling';
import { SEVERITIES, UNIT_KIND_KEYS, type Severity, type UnitKindKey } from '../words';
import { id, text } from './setup/fields';

export const AUDIT_NAME_MAX = 120;
/** Ids per lot filter: more levels or systems than any job has. */
export const LOT_FILTER_MAX = 200;

/** Per severity class: an AQL of Table II-A, none allowed (Ac 0 / Re 1), or not judged. */
export const CLASS_RULE_CHOICES = ['off', 'zero', ...AQLS] as const;
export type ClassRuleChoice = (typeof CLASS_RULE_CHOICES)[number];
export const CLASS_RULE_LABELS: Record<ClassRuleChoice, string> = {
  off: 'Not judged',
  zero: 'None allowed',
  ...(Object.fromEntries(AQLS.map((a) => [a, `AQL ${a}`])) as Record<(typeof AQLS)[number], string>),
};

export const AUDIT_SCHEMES = ['z14', 'tiered'] as const;
export type AuditScheme = (typeof AUDIT_SCHEMES)[number];
export const AUDIT_SCHEME_LABELS: Record<AuditScheme, string> = {
  z14: 'Z1.4 acceptance sampling',
  tiered: 'Tiered 10 percent (commissioning practice)',
};

const ids = (what: string) =>
  z.array(id(what), { error: `A list of ${what}s.` }).max(LOT_FILTER_MAX, `At most ${LOT_FILTER_MAX} ${what}s.`).optional();

/** The filters that choose a lot; an empty or absent filter does not narrow it. */
export const auditLotFiltersSchema = z
  .object({
    levelIds: ids('level'),
    kinds: z.array(z.enum(UNIT_KIND_KEYS, { error: 'Choose a unit kind from the list.' })).max(UNIT_KIND_KEYS.length).optional(),
    systemIds: ids('system'),
    crewIds: ids('crew'),
    modelIds: ids('model'),
  })
  .strict();
export type AuditLotFilters = z.infer<typeof auditLotFiltersSchema>;

const classRule = z.enum(CLASS_RULE_CHOICES, { error: 'Choose an AQL, none allowed, or not judged.' });

export const createAuditSchema = z
  .object({
    name: text('a name for the audit', AUDIT_NAME_MAX),
    scheme: z.enum(AUDIT_SCHEMES, { error: 'Choose Z1.4 or the tiered scheme.' }),
    inspectionLevel: z.enum(INSPECTION_LEVELS, { error: 'Choose inspection level I, II or III.' }).default('II'),
    classes: z
      .object({ critical: classRule.default('zero'), major: classRule.default('1.0'), minor: classRule.default('4.0') })
      .strict()
      .default({ critical: 'zero', major: '1.0', minor: '4.0' }),
    lot: auditLotFiltersSchema.default({}),
    /** A seed to draw with (to repeat a draw made elsewhere); the server makes one when absent. */
    seed: z
      .string({ error: 'Letters, digits, dashes or underscores.' })
      .regex(/^[A-Za-z0-9_-]{1,64}$/, 'Up to 64 letters, digits, dashes or underscores.')
      .optional(),
  })
  .strict()
  .superRefine((v, ctx) => {
    if (v.scheme === 'z14' && SEVERITIES.every((s) => v.classes[s] === 'off')) {
      ctx.addIssue({ code: 'custom', path: ['classes', 'major'], message: 'Judge at least one class: choose an AQL or none allowed.' });
    }
  });
export type CreateAuditInput = z.input<typeof createAuditSchema>;
export type CreateAuditParsed = z.output<typeof createAuditSchema>;

export const auditParamsSchema = z.object({ jobId: id('job id'), auditId: id('audit id') }).strict();
export const auditListQuerySchema = z.object({ levelId: id('level id').optional() }).strict();

export interface AuditPerson {
  id: string;
  name: string;
}

export interface AuditSummary {
  id: string;
  number: number;
  name: string;
  scheme: AuditScheme;
  inspectionLevel: (typeof INSPECTION_LEVELS)[number] | null;
  lotSize: number;
  /** The sample being checked now (both tiers once the second is needed). */
  sampleSize: number;
  checked: number;
  decision: AuditDecision;
  decidedAt: string | null;
  seed: string;
  plannedBy: AuditPerson;
  startedAt: string;
}

export interface AuditSampleUnit {
  unitId: string;
  tag: string;
  kind: UnitKindKey;
  levelId: string;
  levelName: string;
  position: number;
  tier: 1 | 2;
  /** The first complete unit check since the audit started. */
  checkedAt: string | null;
  defects: Record<Severity, number>;
  /** False for a second-tier unit while the second tier is not needed. */
  active: boolean;
}

export interface AuditFollowUpLevel {
  levelId: string;
  levelName: string;
  units: number;
  /** Units of the lot on this level with a complete unit check since the rejection. */
  checkedSince: number;
}

export interface AuditDetail extends AuditSummary {
  lotFilters: AuditLotFilters;
  /** The filters in words ("Levels: Level 2, Level 3 · Kinds: 4-way cassette"). */
  lotDescription: string;
  classRules: Record<Severity, ClassRuleChoice>;
  plan: AuditPlan;
  state: AuditState;
  sample: AuditSampleUnit[];
  /** When rejected: every unit of the lot is to be checked, level by level. */
  followUp: { levels: AuditFollowUpLevel[]; remaining: number } | null;
}

/** A unit's mark on the walk screens: in an open audit's sample, or to check after a rejection. */
export interface AuditUnitMark {
  unitId: string;
  auditId: string;
  number: number;
  mark: 'sample' | 'check_all';
}

export interface AuditListResponse {
  items: AuditSummary[];
  nextCursor: null;
  unitMarks?: AuditUnitMark[];
}
