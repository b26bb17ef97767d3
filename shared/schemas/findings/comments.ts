/**
 * Comments on a finding.
 */
import { z } from 'zod';
import { limited, textLimit } from '../fields';
import type { FindingEventDto } from './finding';

export const COMMENT_MAX = 2000;
export const COMMENT_LIMIT = textLimit(COMMENT_MAX, 'A comment');

/**
 * POST /findings/:findingId/comments (everyone who can see the finding) → 201 FindingEventDto
 * (kind 'comment', reason = the text). Idempotency-Key honoured. Any status.
 * GET /findings/:findingId/comments → { items: FindingEventDto[] } oldest first.
 */
export const commentSchema = z
  .object({
    text: limited(z.string({ error: 'Write a comment.' }).trim().min(1, 'Write a comment.'), COMMENT_LIMIT),
  })
  .strict();
export type CommentInput = z.input<typeof commentSchema>;
export interface CommentsResponse {
  items: FindingEventDto[];
}
