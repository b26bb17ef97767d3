/**
 * The findings list: filters and sorts (GET /findings; the CSV export takes the same).
 */
import { z } from 'zod';
import { FINDING_STATUSES, SEVERITIES, UNIT_KIND_KEYS } from '../../words';
import { id, pageQuery, booleanQuery, enumList } from './fields';

export const FINDING_SORTS = [
  'number',
  '-number',
  'dueOn',
  '-dueOn',
  'loggedAt',
  '-loggedAt',
  'severity',
  '-severity',
] as const;
export type FindingSort = (typeof FINDING_SORTS)[number];

/**
 * GET /findings → FindingListResponse. A subcontractor sees only their company's findings.
 * status / severity take comma-separated lists. Default sort: -number (newest first).
 * `severity` sorts critical first; `-severity` minor first.
 */
export const findingListQuerySchema = z
  .object({
    levelId: id('level id').optional(),
    spaceId: id('space id').optional(),
    unitId: id('unit id').optional(),
    kind: z.enum(UNIT_KIND_KEYS, { error: 'Choose a unit kind from the list.' }).optional(),
    status: enumList(FINDING_STATUSES).optional(),
    severity: enumList(SEVERITIES).optional(),
    companyId: id('company id').optional(),
    catalogueItemId: id('defect type id').optional(),
    /** Only findings past their due date and still open or fix-submitted. */
    overdue: booleanQuery.optional(),
    /** Text in the note, the defect type's title or code, the unit's tag, or the number ("214" or "#214"). */
    q: z.string().trim().max(100, 'At most 100 characters.').optional(),
    sort: z.enum(FINDING_SORTS, { error: `One of ${FINDING_SORTS.join(', ')}.` }).optional(),
    ...pageQuery,
  })
  .strict();
export type FindingListQuery = z.input<typeof findingListQuerySchema>;
export type FindingListQueryParsed = z.output<typeof findingListQuerySchema>;
