/**
 * Re-inspections (POST /findings/:findingId/reinspections) and the re-inspection queue.
 */
import { z } from 'zod';
import type { MeasuredRule } from '../../catalogue/types';
import { measuredText, optionalReason } from './fields';
import type { PhotoDto, FindingDto } from './finding';
import type { FixDto } from './fix';

export const REINSPECTION_VERDICTS = ['accept', 'return'] as const;
export type ReinspectionVerdict = (typeof REINSPECTION_VERDICTS)[number];

/**
 * POST /findings/:findingId/reinspections (inspector, GC manager) → 200 FindingDetail (ETag).
 * If-Match required (428 / 412). Idempotency-Key honoured. Only a fix-submitted finding.
 * accept → closed; return → open, returnCount + 1, reason required.
 * JSON, or multipart/form-data with this JSON in `data` and up to 10 `photos` (the inspector's own).
 * `measuredText` (optional, a defect type with a measured rule only): the inspector's new
 * measurement, judged by the same rule and limit as the finding as logged. Accepting a fix whose
 * latest new measurement (this one, else the fix's) fails the rule is refused: 409
 * `measurement_fails` (returning it is not).
 */
export const reinspectionSchema = z
  .object({
    verdict: z.enum(REINSPECTION_VERDICTS, { error: 'Choose accept or return.' }),
    reason: optionalReason,
    measuredText: measuredText.nullable().optional(),
  })
  .strict()
  .refine((r) => r.verdict !== 'return' || Boolean(r.reason), { message: 'Say why the fix is returned.', path: ['reason'] });
export type ReinspectionInput = z.input<typeof reinspectionSchema>;

/**
 * GET /api/jobs/:jobId/reinspections/queue (inspector, GC manager; subcontractor 403) →
 * ReinspectionQueueResponse: fix-submitted findings grouped by level (level order), each with
 * the latest fix (note, who, photos) and the photos of the finding as logged.
 */
export interface ReinspectionQueueItem {
  finding: FindingDto;
  latestFix: FixDto | null;
  originalPhotos: PhotoDto[];
  /** The defect type's measured rule: the inspector may measure again at re-inspection (null: none). */
  rule: MeasuredRule | null;
}
export interface ReinspectionQueueResponse {
  levels: Array<{ levelId: string; levelName: string; items: ReinspectionQueueItem[] }>;
  total: number;
}
