import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { CreateLevelInput, LevelDto, UpdateLevelInput } from '../../shared/schemas/setup';
import { fetchAll, jobPath, versionTag } from '../api/lists';
import { newWrite, sendWrite } from '../api/mutations';
import { setupKeys } from './setupKeys';

export const levelKeys = {
  all: (jobId: string) => setupKeys.resource(jobId, 'levels'),
  list: (jobId: string) => [...levelKeys.all(jobId), 'list'] as const,
};

/** Every level of the job, in order (position 1 first). */
export function useLevelsQuery(jobId: string) {
  return useQuery({
    queryKey: levelKeys.list(jobId),
    queryFn: async () => (await fetchAll<LevelDto>(jobPath(jobId, 'levels'))).sort((a, b) => a.position - b.position),
    enabled: Boolean(jobId),
  });
}

function useRefreshSetup(jobId: string) {
  const queryClient = useQueryClient();
  return () => queryClient.invalidateQueries({ queryKey: setupKeys.job(jobId) });
}

export function useCreateLevelMutation(jobId: string) {
  const refresh = useRefreshSetup(jobId);
  return useMutation({
    mutationFn: (input: CreateLevelInput) => sendWrite<LevelDto>(newWrite({ method: 'POST', path: jobPath(jobId, 'levels'), body: input })),
    onSettled: refresh,
  });
}

export function useRenameLevelMutation(jobId: string) {
  const refresh = useRefreshSetup(jobId);
  return useMutation({
    mutationFn: ({ level, input }: { level: LevelDto; input: UpdateLevelInput }) =>
      sendWrite<LevelDto>(
        newWrite({ method: 'PATCH', path: jobPath(jobId, 'levels', level.id), body: input, ifMatch: versionTag(level.version) }),
      ),
    onSettled: refresh,
  });
}

/** Sends the whole new order (every level id). */
export function useReorderLevelsMutation(jobId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (levelIds: string[]) =>
      sendWrite<{ items: LevelDto[] }>(newWrite({ method: 'POST', path: jobPath(jobId, 'levels', 'order'), body: { levelIds } })),
    onMutate: async (levelIds) => {
      await queryClient.cancelQueries({ queryKey: levelKeys.list(jobId) });
      const before = queryClient.getQueryData<LevelDto[]>(levelKeys.list(jobId));
      if (before) {
        const byId = new Map(before.map((l) => [l.id, l]));
        const next = levelIds.flatMap((id, i) => {
          const l = byId.get(id);
          return l ? [{ ...l, position: i + 1 }] : [];
        });
        queryClient.setQueryData(levelKeys.list(jobId), next);
      }
      return { before };
    },
    onError: (_err, _ids, context) => {
      if (context?.before) queryClient.setQueryData(levelKeys.list(jobId), context.before);
    },
    onSettled: () => queryClient.invalidateQueries({ queryKey: setupKeys.job(jobId) }),
  });
}

export function useDeleteLevelMutation(jobId: string) {
  const refresh = useRefreshSetup(jobId);
  return useMutation({
    mutationFn: (level: LevelDto) =>
      sendWrite<void>(newWrite({ method: 'DELETE', path: jobPath(jobId, 'levels', level.id), ifMatch: versionTag(level.version) })),
    onSettled: refresh,
  });
}

/** POST /levels/bulk: several levels pasted one per line (all or none). */
export function useCreateLevelsMutation(jobId: string) {
  const refresh = useRefreshSetup(jobId);
  return useMutation({
    mutationFn: (names: string[]) => sendWrite<{ items: LevelDto[] }>(newWrite({ method: 'POST', path: jobPath(jobId, 'levels', 'bulk'), body: { names } })),
    onSettled: refresh,
  });
}
