/**
 * Re-inspections (POST /findings/:findingId/reinspections) and the re-inspection queue.
 */
import { z } from 'zod';
import { optionalReason } from './fields';
import type { PhotoDto, FindingDto } from './finding';
import type { FixDto } from './fix';

export const REINSPECTION_VERDICTS = ['accept', 'return'] as const;
export type ReinspectionVerdict = (typeof REINSPECTION_VERDICTS)[number];

/**
 * POST /findings/:findingId/reinspections (inspector, GC manager) → 200 FindingDetail (ETag).
 * If-Match required (428 / 412). Idempotency-Key honoured. Only a fix-submitted finding.
 * accept → closed; return → open, returnCount + 1, reason required.
 */
export const reinspectionSchema = z
  .object({
    verdict: z.enum(REINSPECTION_VERDICTS, { error: 'Choose accept or return.' }),
    reason: optionalReason,
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
}
export interface ReinspectionQueueResponse {
  levels: Array<{ levelId: string; levelName: string; items: ReinspectionQueueItem[] }>;
  total: number;
}
