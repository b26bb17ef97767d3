/**
 * One change to many findings at once (POST /findings/bulk).
 */
import { z } from 'zod';
import { dueOnChange } from './change';
import { id, reason } from './fields';
import type { FindingDto } from './finding';

export const BULK_FINDINGS_MAX = 200;

/**
 * POST /api/jobs/:jobId/findings/bulk (GC manager, inspector) → 200 BulkChangeResponse.
 * All or nothing, one transaction. Any id not on the job → 404 with `fields.findingIds` listing
 * them; any finding whose status refuses the change → 409 listing them; nothing is changed.
 * Idempotency-Key honoured.
 */
export const bulkChangeSchema = z
  .object({
    findingIds: z
      .array(id('finding'), { error: 'Send findingIds: a list of finding ids.' })
      .min(1, 'Choose at least one finding.')
      .max(BULK_FINDINGS_MAX, `At most ${BULK_FINDINGS_MAX} findings at once.`)
      .refine((ids) => new Set(ids).size === ids.length, 'A finding appears twice.'),
    change: z
      .object({
        reassign: z.object({ companyId: id('responsible company'), reason: reason('a reason for the reassignment') }).strict().optional(),
        dueOn: dueOnChange.optional(),
      })
      .strict()
      .refine((c) => (c.reassign === undefined) !== (c.dueOn === undefined), {
        message: 'Send exactly one change: reassign or dueOn.',
      }),
  })
  .strict();
export type BulkChangeInput = z.input<typeof bulkChangeSchema>;
export type BulkChangeParsed = z.output<typeof bulkChangeSchema>;
export interface BulkChangeResponse {
  /** The changed findings, in the order sent, with their new versions. */
  items: FindingDto[];
}
