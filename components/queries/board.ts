import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { ReadinessWithTests } from '../../shared/schemas/testRecords';
import type {
  BoardResponse,
  FloorSystemsResponse,
  ReadinessQuery,
  RecurringResponse,
  ScorecardsResponse,
  TrendQuery,
  TrendResponse,
} from '../../shared/schemas/board';
import type { CeilingExclusionInput, CeilingExclusionResult } from '../../shared/schemas/setup';
import { apiGet } from '../api/client';
import { jobPath, queryString, versionTag } from '../api/lists';
import { newWrite, sendWrite, type Write } from '../api/mutations';
import { walkKeys } from './walks';

/**
 * The GC's view (shared/schemas/board.ts). Keys sit under the job's walk keys, so saving a
 * unit check or changing a finding (refreshWalkData) refreshes the board too.
 */
export const boardKeys = {
  all: (jobId: string) => [...walkKeys.job(jobId), 'board'] as const,
  board: (jobId: string) => [...boardKeys.all(jobId), 'levels'] as const,
  systems: (jobId: string) => [...boardKeys.all(jobId), 'systems'] as const,
  readiness: (jobId: string, query: ReadinessQuery) => [...boardKeys.all(jobId), 'readiness', query] as const,
  scorecards: (jobId: string) => [...boardKeys.all(jobId), 'scorecards'] as const,
  recurring: (jobId: string) => [...boardKeys.all(jobId), 'recurring'] as const,
  trend: (jobId: string, query: TrendQuery) => [...boardKeys.all(jobId), 'trend', query] as const,
};

/** GET /board: counts per level in building order, and the job's totals. */
export function useBoardQuery(jobId: string) {
  return useQuery({
    queryKey: boardKeys.board(jobId),
    queryFn: () => apiGet<BoardResponse>(jobPath(jobId, 'board')),
    enabled: Boolean(jobId),
  });
}

/** GET /board/systems: each system's floors, refrigerant verdict and the records its start-up waits for. */
export function useFloorSystemsQuery(jobId: string, enabled = true) {
  return useQuery({
    queryKey: boardKeys.systems(jobId),
    queryFn: () => apiGet<FloorSystemsResponse>(jobPath(jobId, 'board', 'systems')),
    enabled: Boolean(jobId) && enabled,
  });
}

/** GET /readiness: systems ready for startup, levels ready to close ceilings, and what blocks each. */
export function useReadinessQuery(jobId: string, query: ReadinessQuery = {}) {
  return useQuery({
    queryKey: boardKeys.readiness(jobId, query),
    queryFn: () => apiGet<ReadinessWithTests>(`${jobPath(jobId, 'readiness')}${queryString({ ...query })}`),
    enabled: Boolean(jobId),
  });
}

/** GET /scorecards (GC managers and inspectors; others get 403, so do not ask). */
export function useScorecardsQuery(jobId: string, enabled = true) {
  return useQuery({
    queryKey: boardKeys.scorecards(jobId),
    queryFn: () => apiGet<ScorecardsResponse>(jobPath(jobId, 'scorecards')),
    enabled: Boolean(jobId) && enabled,
  });
}

/** GET /recurring: defect types found on many units of the job. */
export function useRecurringQuery(jobId: string) {
  return useQuery({
    queryKey: boardKeys.recurring(jobId),
    queryFn: () => apiGet<RecurringResponse>(jobPath(jobId, 'recurring')),
    enabled: Boolean(jobId),
  });
}

/** GET /trend: open and fix-submitted counts at the end of each day (the job or one level). */
export function useTrendQuery(jobId: string, query: TrendQuery = {}) {
  return useQuery({
    queryKey: boardKeys.trend(jobId, query),
    queryFn: () => apiGet<TrendResponse>(`${jobPath(jobId, 'trend')}${queryString({ ...query })}`),
    enabled: Boolean(jobId),
  });
}

/** PUT /units/:unitId/ceiling-exclusion: a GC manager excludes a unit from the ceiling rule, with the version they saw. */
export function ceilingExclusionWrite(jobId: string, unitId: string, version: number, input: CeilingExclusionInput): Write {
  return newWrite({ method: 'PUT', path: jobPath(jobId, 'units', unitId, 'ceiling-exclusion'), body: input, ifMatch: versionTag(version) });
}

/** DELETE /units/:unitId/ceiling-exclusion: "Count it again". */
export function liftCeilingExclusionWrite(jobId: string, unitId: string, version: number): Write {
  return newWrite({ method: 'DELETE', path: jobPath(jobId, 'units', unitId, 'ceiling-exclusion'), ifMatch: versionTag(version) });
}

/**
 * Both ceiling-exclusion writes: sent at once (a GC manager's office decision, not field work kept
 * in the outbox); the board and readiness are read again after either, refused or not.
 */
export function useCeilingExclusionMutation(jobId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (write: Write) => sendWrite<CeilingExclusionResult>(write),
    onSettled: () => queryClient.invalidateQueries({ queryKey: boardKeys.all(jobId) }),
  });
}
