import { useQuery } from '@tanstack/react-query';
import type { CreateSystemInput, SystemDetail, SystemDto, UpdateSystemInput } from '../../shared/schemas/setup';
import { apiGet } from '../api/client';
import { fetchAll, jobPath, versionTag } from '../api/lists';
import { newWrite, sendWrite } from '../api/mutations';
import { setupKeys, useSetupWrite } from './setupKeys';

export const systemKeys = {
  all: (jobId: string) => setupKeys.resource(jobId, 'systems'),
  list: (jobId: string) => [...systemKeys.all(jobId), 'list'] as const,
  detail: (jobId: string, systemId: string) => [...systemKeys.all(jobId), 'detail', systemId] as const,
};

export function useSystemsQuery(jobId: string) {
  return useQuery({
    queryKey: systemKeys.list(jobId),
    queryFn: () => fetchAll<SystemDto>(jobPath(jobId, 'systems')),
    enabled: Boolean(jobId),
  });
}

/** One system with its refrigerant concentration result. */
export function useSystemQuery(jobId: string, systemId: string | null) {
  return useQuery({
    queryKey: systemKeys.detail(jobId, systemId ?? ''),
    queryFn: () => apiGet<SystemDetail>(jobPath(jobId, 'systems', systemId ?? '')),
    enabled: Boolean(jobId && systemId),
  });
}

export function useCreateSystemMutation(jobId: string) {
  return useSetupWrite(jobId, (input: CreateSystemInput) =>
    sendWrite<SystemDto>(newWrite({ method: 'POST', path: jobPath(jobId, 'systems'), body: input })),
  );
}

export function useUpdateSystemMutation(jobId: string) {
  return useSetupWrite(jobId, ({ system, input }: { system: SystemDto; input: UpdateSystemInput }) =>
    sendWrite<SystemDto>(
      newWrite({ method: 'PATCH', path: jobPath(jobId, 'systems', system.id), body: input, ifMatch: versionTag(system.version) }),
    ),
  );
}

export function useDeleteSystemMutation(jobId: string) {
  return useSetupWrite(jobId, (system: SystemDto) =>
    sendWrite<void>(newWrite({ method: 'DELETE', path: jobPath(jobId, 'systems', system.id), ifMatch: versionTag(system.version) })),
  );
}
