import { useMutation, useQuery } from '@tanstack/react-query';
import type { CreateSpaceInput, SpaceDto, SpaceImportInput, SpaceImportReport, UpdateSpaceInput } from '../../shared/schemas/setup';
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

/** POST /spaces/bulk: several spaces on one level, pasted one per line (all or none). */
export function useCreateSpacesMutation(jobId: string) {
  return useSetupWrite(jobId, (input: { levelId: string; names: string[] }) =>
    sendWrite<{ items: SpaceDto[] }>(newWrite({ method: 'POST', path: jobPath(jobId, 'spaces', 'bulk'), body: input })),
  );
}

function spaceImportWrite(jobId: string, input: SpaceImportInput) {
  return sendWrite<SpaceImportReport>(newWrite({ method: 'POST', path: jobPath(jobId, 'spaces', 'import'), body: input }));
}

/** POST /spaces/import with apply false: the room schedule's preview (writes nothing, so nothing is read again). */
export function usePreviewSpaceImportMutation(jobId: string) {
  return useMutation({ mutationFn: (rows: SpaceImportInput['rows']) => spaceImportWrite(jobId, { rows, apply: false }) });
}

/** POST /spaces/import with apply true: levels, spaces, areas and heights, all or none. */
export function useApplySpaceImportMutation(jobId: string) {
  return useSetupWrite(jobId, (rows: SpaceImportInput['rows']) => spaceImportWrite(jobId, { rows, apply: true }));
}
