/**
 * Comments on a finding.
 */
import { z } from 'zod';
import type { FindingEventDto } from './finding';

export const COMMENT_MAX = 2000;

/**
 * POST /findings/:findingId/comments (everyone who can see the finding) → 201 FindingEventDto
 * (kind 'comment', reason = the text). Idempotency-Key honoured. Any status.
 * GET /findings/:findingId/comments → { items: FindingEventDto[] } oldest first.
 */
export const commentSchema = z
  .object({
    text: z
      .string({ error: 'Write a comment.' })
      .trim()
      .min(1, 'Write a comment.')
      .max(COMMENT_MAX, `A comment is at most ${COMMENT_MAX} characters.`),
  })
  .strict();
export type CommentInput = z.input<typeof commentSchema>;
export interface CommentsResponse {
  items: FindingEventDto[];
}
