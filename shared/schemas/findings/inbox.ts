/**
 * A subcontractor's inbox across jobs (GET /api/inbox).
 */
import { z } from 'zod';
import { id, enumList } from './fields';
import type { FindingDto } from './finding';

/**
 * GET /api/inbox (subcontractors; other roles 403) → InboxResponse. Their company's open and
 * fix-submitted findings on every job they are a member of: overdue first, then by due date,
 * then by number. groupBy=area → `groups` by job, level and space (same order inside each).
 */
export const INBOX_GROUPINGS = ['none', 'area'] as const;
export const inboxQuerySchema = z
  .object({
    groupBy: z.enum(INBOX_GROUPINGS, { error: 'Use none or area.' }).optional(),
    jobId: id('job id').optional(),
    status: enumList(['open', 'fix_submitted'] as const).optional(),
  })
  .strict();
export type InboxQuery = z.input<typeof inboxQuerySchema>;
export type InboxQueryParsed = z.output<typeof inboxQuerySchema>;

export interface InboxItem extends FindingDto {
  jobId: string;
  jobName: string;
  /** Set when the finding came back from re-inspection (returnCount > 0): the last return's reason. */
  lastReturnReason: string | null;
}
export interface InboxGroup {
  jobId: string;
  jobName: string;
  levelId: string;
  levelName: string;
  /** null: findings on the level itself (no space). */
  spaceId: string | null;
  spaceName: string | null;
  items: InboxItem[];
}
export interface InboxResponse {
  items: InboxItem[];
  /** Only with groupBy=area; ordered by job name, level, space name. */
  groups: InboxGroup[] | null;
  counts: { total: number; overdue: number; returned: number; fixSubmitted: number };
}
