import { useInfiniteQuery, useMutation, useQuery, useQueryClient, type QueryClient } from '@tanstack/react-query';
import type { WalkDetail, WalkDto, WalkUnitsQuery, WalkUnitsResponse } from '../../shared/schemas/findings';
import type { ListResponse } from '../../shared/schemas/setup';
import { apiGet } from '../api/client';
import { jobPath, queryString } from '../api/lists';
import { newWrite, sendWrite } from '../api/mutations';
import { submitWrite } from '../outbox';
import { forgetOpenWalk, rememberOpenWalk } from '../outbox/walks';

/** The level's units as filtered on the walk screen (no paging fields). */
export type WalkUnitFilters = Omit<WalkUnitsQuery, 'limit' | 'cursor'>;

export const WALK_UNITS_PAGE_SIZE = 100;

/** Every walk key starts with ['walk', jobId]: a check or a finding refreshes them all at once. */
export const walkKeys = {
  job: (jobId: string) => ['walk', jobId] as const,
  units: (jobId: string, levelId: string, filters: WalkUnitFilters) => [...walkKeys.job(jobId), 'units', levelId, filters] as const,
  open: (jobId: string, levelId: string, inspectorId: string) => [...walkKeys.job(jobId), 'open', levelId, inspectorId] as const,
  walk: (jobId: string, walkId: string) => [...walkKeys.job(jobId), 'detail', walkId] as const,
};

type WalkStarted = (jobId: string, levelId: string) => void;
const walkStartedListeners = new Set<WalkStarted>();

/** Called when this phone starts a walk (the level is then kept on the phone for it). */
export function onWalkStarted(listener: WalkStarted): () => void {
  walkStartedListeners.add(listener);
  return () => walkStartedListeners.delete(listener);
}

export function announceWalkStarted(jobId: string, levelId: string) {
  for (const l of walkStartedListeners) l(jobId, levelId);
}

/**
 * Refresh every walk, check and finding screen of a job (after a check or a finding is saved), in
 * the background: nothing waits for it. A mutation whose onSettled returned this promise would not
 * finish before the refetches did, and with no signal react-query pauses them until the signal is
 * back: a finding kept on the phone then left its form spinning.
 */
export function refreshWalkData(queryClient: QueryClient, jobId: string): void {
  void queryClient.invalidateQueries({ queryKey: walkKeys.job(jobId) });
}

/** GET /levels/:levelId/walk-units: units with their state, counts and the level's coverage; "Load more" pages. */
export function useWalkUnitsQuery(jobId: string, levelId: string, filters: WalkUnitFilters) {
  return useInfiniteQuery({
    queryKey: walkKeys.units(jobId, levelId, filters),
    queryFn: ({ pageParam }) =>
      apiGet<WalkUnitsResponse>(
        `${jobPath(jobId, 'levels', levelId, 'walk-units')}${queryString({ ...filters, limit: WALK_UNITS_PAGE_SIZE, cursor: pageParam })}`,
      ),
    initialPageParam: null as string | null,
    getNextPageParam: (last) => last.nextCursor,
    enabled: Boolean(jobId && levelId),
  });
}

/** The inspector's walk on this level that is not finished yet, or null. */
export function useOpenWalkQuery(jobId: string, levelId: string, inspectorId: string | undefined) {
  return useQuery({
    queryKey: walkKeys.open(jobId, levelId, inspectorId ?? ''),
    queryFn: async () => {
      const res = await apiGet<ListResponse<WalkDto>>(
        `${jobPath(jobId, 'walks')}${queryString({ levelId, inspectorId, open: 'true', limit: 1 })}`,
      );
      const walk = res.items[0] ?? null;
      // Remembered on the phone: a check saved later with no signal still belongs to this walk.
      if (walk && inspectorId) rememberOpenWalk(inspectorId, jobId, levelId, walk.id);
      return walk;
    },
    enabled: Boolean(jobId && levelId && inspectorId),
  });
}

/**
 * GET /walks/:walkId: the walk with its level's coverage and its summary (findings logged on it by
 * severity, units left unchecked), read fresh when finishing asks for it (null: not asked yet).
 */
export function useWalkQuery(jobId: string, walkId: string | null) {
  return useQuery({
    queryKey: walkKeys.walk(jobId, walkId ?? ''),
    queryFn: () => apiGet<WalkDetail>(jobPath(jobId, 'walks', walkId!)),
    enabled: Boolean(jobId && walkId),
    staleTime: 0,
  });
}

export function useStartWalkMutation(jobId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (levelId: string) => sendWrite<WalkDetail>(newWrite({ method: 'POST', path: jobPath(jobId, 'walks'), body: { levelId } })),
    onSuccess: (_walk, levelId) => announceWalkStarted(jobId, levelId),
    onSettled: () => refreshWalkData(queryClient, jobId),
  });
}

/**
 * Ends a walk through the outbox: with no signal the end waits on the phone, and the walk is over
 * here at once (the next check on the level starts another walk, sent after this end).
 */
export function useFinishWalkMutation(jobId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    networkMode: 'always',
    mutationFn: (walk: Pick<WalkDto, 'id' | 'levelId' | 'levelName'> & { inspectorId: string }) =>
      submitWrite<WalkDetail>(newWrite({ method: 'POST', path: jobPath(jobId, 'walks', walk.id, 'finish'), body: {} }), walk.levelName || undefined),
    onSuccess: (_answer, walk) => {
      forgetOpenWalk(walk.inspectorId, jobId, walk.levelId);
      queryClient.setQueryData(walkKeys.open(jobId, walk.levelId, walk.inspectorId), null);
    },
    onSettled: () => refreshWalkData(queryClient, jobId),
  });
}

/** A level's coverage only (one unit fetched), for the list of levels. */
export function useLevelCoverageQuery(jobId: string, levelId: string) {
  return useQuery({
    queryKey: [...walkKeys.job(jobId), 'coverage', levelId] as const,
    queryFn: async () =>
      (await apiGet<WalkUnitsResponse>(`${jobPath(jobId, 'levels', levelId, 'walk-units')}${queryString({ limit: 1 })}`)).coverage,
    enabled: Boolean(jobId && levelId),
  });
}
