/**
 * Excluding a unit from the ceiling rule (shared/rules/ceilings.ts): a GC manager's decision that
 * a unit in or above the ceiling need not hold the level's ceilings open without a unit check,
 * always with a reason.
 *   PUT    /jobs/:jobId/units/:unitId/ceiling-exclusion   { reason }   GC manager (If-Match)
 *   DELETE /jobs/:jobId/units/:unitId/ceiling-exclusion              GC manager (If-Match): count it again
 */
import { z } from 'zod';

export const CEILING_EXCLUSION_REASON_MIN = 3;
export const CEILING_EXCLUSION_REASON_MAX = 500;

export const ceilingExclusionSchema = z
  .object({
    reason: z
      .string({ error: 'Say why this unit need not be checked before the ceiling closes.' })
      .trim()
      .min(CEILING_EXCLUSION_REASON_MIN, `Say why this unit need not be checked before the ceiling closes (at least ${CEILING_EXCLUSION_REASON_MIN} characters).`)
      .max(CEILING_EXCLUSION_REASON_MAX, `The reason is at most ${CEILING_EXCLUSION_REASON_MAX} characters.`),
  })
  .strict();
export type CeilingExclusionInput = z.input<typeof ceilingExclusionSchema>;

/** Who excluded a unit from the ceiling rule, when and why. */
export interface CeilingExclusionDto {
  reason: string;
  by: { id: string; name: string };
  /** ISO date-time. */
  at: string;
}

/** The answer of both writes: the unit's new version (its ETag) and its exclusion now. */
export interface CeilingExclusionResult {
  unitId: string;
  tag: string;
  version: number;
  ceilingExclusion: CeilingExclusionDto | null;
}
