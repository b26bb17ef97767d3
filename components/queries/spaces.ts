import { useQuery } from '@tanstack/react-query';
import type { CreateSpaceInput, SpaceDto, UpdateSpaceInput } from '../../shared/schemas/setup';
import { fetchAll, jobPath, versionTag } from '../api/lists';
import { newWrite, sendWrite } from '../api/mutations';
import { setupKeys, useSetupWrite } from './setupKeys';

export const spaceKeys = {
  all: (jobId: string) => setupKeys.resource(jobId, 'spaces'),
  list: (jobId: string, levelId?: string) => [...spaceKeys.all(jobId), 'list', levelId ?? 'all'] as const,
};

/** Spaces of the job, or of one level. */
export function useSpacesQuery(jobId: string, levelId?: string) {
  return useQuery({
    queryKey: spaceKeys.list(jobId, levelId),
    queryFn: () => fetchAll<SpaceDto>(jobPath(jobId, 'spaces'), { levelId }),
    enabled: Boolean(jobId),
  });
}

export function useCreateSpaceMutation(jobId: string) {
  return useSetupWrite(jobId, (input: CreateSpaceInput) =>
    sendWrite<SpaceDto>(newWrite({ method: 'POST', path: jobPath(jobId, 'spaces'), body: input })),
  );
}

export function useUpdateSpaceMutation(jobId: string) {
  return useSetupWrite(jobId, ({ space, input }: { space: SpaceDto; input: UpdateSpaceInput }) =>
    sendWrite<SpaceDto>(newWrite({ method: 'PATCH', path: jobPath(jobId, 'spaces', space.id), body: input, ifMatch: versionTag(space.version) })),
  );
}

export function useDeleteSpaceMutation(jobId: string) {
  return useSetupWrite(jobId, (space: SpaceDto) =>
    sendWrite<void>(newWrite({ method: 'DELETE', path: jobPath(jobId, 'spaces', space.id), ifMatch: versionTag(space.version) })),
  );
}
