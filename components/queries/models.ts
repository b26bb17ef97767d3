import { useQuery } from '@tanstack/react-query';
import type { CreateModelInput, UnitModelDto, UpdateModelInput } from '../../shared/schemas/setup';
import type { UnitKindKey } from '../../shared/words';
import { fetchAll, jobPath, versionTag } from '../api/lists';
import { newWrite, sendWrite } from '../api/mutations';
import { setupKeys, useSetupWrite } from './setupKeys';

export const modelKeys = {
  all: (jobId: string) => setupKeys.resource(jobId, 'models'),
  list: (jobId: string, unitKind?: UnitKindKey) => [...modelKeys.all(jobId), 'list', unitKind ?? 'all'] as const,
};

export function useModelsQuery(jobId: string, unitKind?: UnitKindKey) {
  return useQuery({
    queryKey: modelKeys.list(jobId, unitKind),
    queryFn: () => fetchAll<UnitModelDto>(jobPath(jobId, 'models'), { unitKind }),
    enabled: Boolean(jobId),
  });
}

export function useCreateModelMutation(jobId: string) {
  return useSetupWrite(jobId, (input: CreateModelInput) =>
    sendWrite<UnitModelDto>(newWrite({ method: 'POST', path: jobPath(jobId, 'models'), body: input })),
  );
}

export function useUpdateModelMutation(jobId: string) {
  return useSetupWrite(jobId, ({ model, input }: { model: UnitModelDto; input: UpdateModelInput }) =>
    sendWrite<UnitModelDto>(
      newWrite({ method: 'PATCH', path: jobPath(jobId, 'models', model.id), body: input, ifMatch: versionTag(model.version) }),
    ),
  );
}

export function useDeleteModelMutation(jobId: string) {
  return useSetupWrite(jobId, (model: UnitModelDto) =>
    sendWrite<void>(newWrite({ method: 'DELETE', path: jobPath(jobId, 'models', model.id), ifMatch: versionTag(model.version) })),
  );
}
