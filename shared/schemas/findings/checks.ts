/**
 * Unit checks: record one, and a unit's check history.
 */
import { z } from 'zod';
import type { QuantityKind } from '../../catalogue/types';
import type { RuleResult, RuleStatus } from '../../calc/rules';
import { CHECK_MARKS, type CheckMark, type Severity } from '../../words';
import { CHECK_ITEMS_MAX, type PersonRef } from './common';
import { id, pageQuery, measuredText } from './fields';
import type { WalkUnitDto } from './walkUnits';

export const checkItemInputSchema = z
  .object({
    catalogueItemId: id('catalogue item'),
    mark: z.enum(CHECK_MARKS, { error: 'Mark the item OK, defect or not applicable.' }),
    /** Only for items with a measured rule: "34 in", "4' 10-1/2\"", "1486 mm", or yes / no. */
    measuredText: measuredText.nullable().optional(),
  })
  .strict();
export type CheckItemInput = z.input<typeof checkItemInputSchema>;

/**
 * POST /units/:unitId/checks (inspector, GC manager) → 201 UnitCheckDto. Idempotency-Key honoured.
 * Items must apply to the unit's kind and not be retired; each item at most once. A measured
 * item whose value fails its rule is recorded as a defect, whatever mark was sent.
 */
export const recordCheckSchema = z
  .object({
    walkId: id('walk').nullable().optional(),
    items: z
      .array(checkItemInputSchema, { error: 'Send items: the catalogue items checked, each with a mark.' })
      .min(1, 'Mark at least one item.')
      .max(CHECK_ITEMS_MAX, `At most ${CHECK_ITEMS_MAX} items in one check.`)
      .refine((items) => new Set(items.map((i) => i.catalogueItemId)).size === items.length, 'A catalogue item appears twice.'),
    /**
     * What the screen believes: every item that applies has been marked. Kept with the check as
     * sent, never trusted: the server decides completeness from the job's catalogue (see
     * UnitCheckDto.complete) and the response names what is missing.
     */
    complete: z.boolean({ error: 'Send complete: true or false.' }).optional(),
  })
  .strict();
export type RecordCheckInput = z.input<typeof recordCheckSchema>;

/** A failed measurement's suggested finding: the finding form's prefill. */
export interface ProposedFinding {
  unitId: string;
  levelId: string;
  spaceId: string | null;
  catalogueItemId: string;
  code: string;
  title: string;
  severity: Severity;
  /** The job company whose trades include the item's trade (the first by name), or null. */
  companyId: string | null;
  companyName: string | null;
  /** YYYY-MM-DD, from the job's per-severity policy, counted in the job's time zone. */
  dueOn: string;
  measuredText: string | null;
  /** Base units. */
  measuredValue: number | null;
  limit: number | null;
  upper: number | null;
  limitSource: string;
  message: string;
  walkId: string | null;
  unitCheckId: string;
}

export interface CheckItemDto {
  catalogueItemId: string;
  code: string;
  title: string;
  mark: CheckMark;
  measuredText: string | null;
  /** Base units; null when not measured or a yes/no answer. */
  measuredValue: number | null;
  quantity: QuantityKind | null;
  /** The measured rule's evaluation (shared/calc evaluateRule), or null for an item without one. */
  result: RuleResult | null;
  pass: boolean | null;
  status: RuleStatus | null;
  margin: number | null;
  limitSource: string | null;
  message: string | null;
  /** Present for a measured item that failed. */
  proposedFinding: ProposedFinding | null;
}

export interface UnitCheckDto {
  id: string;
  unitId: string;
  walkId: string | null;
  checkedBy: PersonRef;
  checkedAt: string;
  /**
   * Decided by the server when the check is saved: every item of the job's catalogue that applies
   * to the unit's kind (job-added items included, retired ones and the "Something else" type left
   * out) has a mark in this check. Walk progress, the levels board, readiness, ceilings and the
   * recurring-defect denominators all read this value.
   */
  complete: boolean;
  items: CheckItemDto[];
  counts: { ok: number; defect: number; notApplicable: number; failedMeasurements: number };
}

/** A catalogue item that applies to the unit but has no mark in the check. */
export interface MissingCheckItem {
  catalogueItemId: string;
  code: string;
  title: string;
}

/** POST /units/:unitId/checks answer: the check, and what keeps it from being complete (catalogue order). */
export interface RecordedCheckDto extends UnitCheckDto {
  missing: MissingCheckItem[];
}

/** GET /units/:unitId/checks: the unit's state and its check history, newest first. */
export const checkListQuerySchema = z.object({ ...pageQuery }).strict();
export interface UnitChecksResponse {
  unit: WalkUnitDto;
  /** The latest check (the unit's current check), or null. */
  current: UnitCheckDto | null;
  items: UnitCheckDto[];
  nextCursor: string | null;
}
