/**
 * Fixes (POST /findings/:findingId/fixes).
 */
import { z } from 'zod';
import { NOTE_MAX, type PersonRef } from './common';
import type { PhotoDto, FindingDetail } from './finding';

/**
 * POST /findings/:findingId/fixes (the finding's subcontractor company, GC manager) → 201 FixDetail.
 * multipart/form-data: `data` = this JSON, and 1 to 10 files in `photos` (same rules as findings).
 * Idempotency-Key honoured. Only an open finding takes a fix (409 otherwise).
 */
export const submitFixSchema = z
  .object({
    note: z
      .string({ error: 'Say what was fixed.' })
      .trim()
      .min(1, 'Say what was fixed.')
      .max(NOTE_MAX, `The note is at most ${NOTE_MAX} characters.`),
  })
  .strict();
export type SubmitFixInput = z.input<typeof submitFixSchema>;

export interface FixDto {
  id: string;
  findingId: string;
  note: string;
  submittedBy: PersonRef;
  submittedAt: string;
  photos: PhotoDto[];
}

/** POST /fixes → 201: the fix and the finding as it is now (ETag of the finding). */
export interface FixDetail {
  fix: FixDto;
  finding: FindingDetail;
}
