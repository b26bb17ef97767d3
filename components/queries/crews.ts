import { useQuery } from '@tanstack/react-query';
import type { CreateCrewInput, CrewDto, CrewListResponse, UpdateCrewInput } from '../../shared/schemas/setup';
import { apiGet } from '../api/client';
import { jobPath, versionTag } from '../api/lists';
import { newWrite, sendWrite } from '../api/mutations';
import { setupKeys, useSetupWrite } from './setupKeys';

export const crewKeys = {
  all: (jobId: string) => setupKeys.resource(jobId, 'crews'),
  list: (jobId: string) => [...crewKeys.all(jobId), 'list'] as const,
};

/** The job's crews the caller may see (a subcontractor: their own company's). */
export function useCrewsQuery(jobId: string) {
  return useQuery({
    queryKey: crewKeys.list(jobId),
    queryFn: () => apiGet<CrewListResponse>(jobPath(jobId, 'crews')),
    enabled: Boolean(jobId),
  });
}

export function useAddCrewMutation(jobId: string) {
  return useSetupWrite(jobId, (input: CreateCrewInput) => sendWrite<CrewDto>(newWrite({ method: 'POST', path: jobPath(jobId, 'crews'), body: input })));
}

export function useRenameCrewMutation(jobId: string) {
  return useSetupWrite(jobId, ({ crew, input }: { crew: CrewDto; input: UpdateCrewInput }) =>
    sendWrite<CrewDto>(newWrite({ method: 'PATCH', path: jobPath(jobId, 'crews', crew.id), body: input, ifMatch: versionTag(crew.version) })),
  );
}

export function useRemoveCrewMutation(jobId: string) {
  return useSetupWrite(jobId, (crew: CrewDto) =>
    sendWrite<void>(newWrite({ method: 'DELETE', path: jobPath(jobId, 'crews', crew.id), ifMatch: versionTag(crew.version) })),
  );
}
