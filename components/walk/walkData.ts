import { useQuery } from '@tanstack/react-query';
import type { FindingDto, FindingListResponse, WalkUnitDto, WalkUnitsResponse } from '../../shared/schemas/findings';
import { apiGet } from '../api/client';
import { jobPath, queryString } from '../api/lists';
import { walkKeys } from '../queries/walks';

/** Under the walk keys: saving a check or logging a finding refreshes them. A kept level fills the same keys. */
export const walkDataKeys = {
  order: (jobId: string, levelId: string) => [...walkKeys.job(jobId), 'order', levelId] as const,
  unresolved: (jobId: string, unitId: string) => [...walkKeys.job(jobId), 'unresolved', unitId] as const,
};

/** Every unit of the level in the walk's order (by tag, as the level's list shows them), all pages. */
export function useWalkOrderQuery(jobId: string, levelId: string) {
  return useQuery({
    queryKey: walkDataKeys.order(jobId, levelId),
    queryFn: async () => {
      const out: WalkUnitDto[] = [];
      let cursor: string | null = null;
      do {
        const page: WalkUnitsResponse = await apiGet<WalkUnitsResponse>(
          `${jobPath(jobId, 'levels', levelId, 'walk-units')}${queryString({ limit: 200, cursor })}`,
        );
        out.push(...page.items);
        cursor = page.nextCursor;
      } while (cursor);
      return out;
    },
    enabled: Boolean(jobId && levelId),
  });
}

/** The unit's findings not resolved yet (open or fix submitted): an item with one cannot be marked OK. */
export function useUnresolvedFindingsQuery(jobId: string, unitId: string) {
  return useQuery({
    queryKey: walkDataKeys.unresolved(jobId, unitId),
    queryFn: async () => {
      const out: FindingDto[] = [];
      let cursor: string | null = null;
      do {
        const page: FindingListResponse = await apiGet<FindingListResponse>(
          `${jobPath(jobId, 'findings')}${queryString({ unitId, status: 'open,fix_submitted', limit: 200, cursor })}`,
        );
        out.push(...page.items);
        cursor = page.nextCursor;
      } while (cursor);
      return out;
    },
    enabled: Boolean(jobId && unitId),
  });
}

export interface NextUnit {
  next: WalkUnitDto | null;
  /** Units of the level other than this one not checked to the end yet. */
  left: number;
}

/**
 * The next unit to walk to: the first one after this unit, in the walk's order, that is not
 * checked yet (not checked, or its check not finished), coming round to the level's start.
 */
export function nextUnitAfter(order: readonly WalkUnitDto[], unitId: string): NextUnit {
  const open = (u: WalkUnitDto) => u.id !== unitId && (u.state === 'not_checked' || u.state === 'in_progress');
  const at = order.findIndex((u) => u.id === unitId);
  const after = [...order.slice(at + 1), ...order.slice(0, Math.max(at, 0))];
  return { next: after.find(open) ?? null, left: order.filter(open).length };
}
