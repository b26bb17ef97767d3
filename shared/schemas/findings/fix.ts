/**
 * Fixes (POST /findings/:findingId/fixes).
 */
import { z } from 'zod';
import type { RuleResult } from '../../calc/rules';
import { limited } from '../fields';
import { NOTE_LIMIT, type PersonRef } from './common';
import { measuredText } from './fields';
import type { PhotoDto, FindingDetail } from './finding';

/**
 * POST /findings/:findingId/fixes (the finding's subcontractor company, GC manager) → 201 FixDetail.
 * multipart/form-data: `data` = this JSON, and 1 to 10 files in `photos` (same rules as findings).
 * Idempotency-Key honoured. Only an open finding takes a fix (409 otherwise).
 * `measuredText`: the new measurement of a measured defect, typed as the trade writes it; required
 * when the finding was logged with a measured value (400 `measuredText` otherwise), refused for a
 * defect type without a measured rule. Judged by the same rule and limit as the finding as logged
 * (shared/rules/remeasure.ts).
 */
export const submitFixSchema = z
  .object({
    note: limited(z.string({ error: 'Say what was fixed.' }).trim().min(1, 'Say what was fixed.'), NOTE_LIMIT),
    measuredText: measuredText.nullable().optional(),
  })
  .strict();
export type SubmitFixInput = z.input<typeof submitFixSchema>;

export interface FixDto {
  id: string;
  findingId: string;
  note: string;
  submittedBy: PersonRef;
  submittedAt: string;
  /** The new measurement sent with the fix, and its verdict against the finding's rule and limit. */
  measuredText: string | null;
  ruleResult: RuleResult | null;
  photos: PhotoDto[];
}

/** POST /fixes → 201: the fix and the finding as it is now (ETag of the finding). */
export interface FixDetail {
  fix: FixDto;
  finding: FindingDetail;
}
