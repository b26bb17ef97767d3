import { useQuery } from '@tanstack/react-query';
import type { AddJobCompanyInput, JobCompanyDto, KnownCompanyDto, UpdateJobCompanyInput } from '../../shared/schemas/setup';
import { apiGet } from '../api/client';
import { fetchAll, jobPath, versionTag } from '../api/lists';
import { newWrite, sendWrite } from '../api/mutations';
import { setupKeys, useSetupWrite } from './setupKeys';

export const companyKeys = {
  all: (jobId: string) => setupKeys.resource(jobId, 'companies'),
  list: (jobId: string) => [...companyKeys.all(jobId), 'list'] as const,
  known: () => ['companies', 'known'] as const,
};

export function useJobCompaniesQuery(jobId: string, options: { enabled?: boolean } = {}) {
  return useQuery({
    queryKey: companyKeys.list(jobId),
    queryFn: () => fetchAll<JobCompanyDto>(jobPath(jobId, 'companies')),
    enabled: Boolean(jobId) && (options.enabled ?? true),
  });
}

/** Companies the caller's company already works with (to link instead of typing a name again). */
export function useKnownCompaniesQuery(enabled: boolean) {
  return useQuery({
    queryKey: companyKeys.known(),
    queryFn: () => apiGet<{ items: KnownCompanyDto[] }>('/api/companies/known').then((r) => r.items),
    enabled,
  });
}

export function useAddCompanyMutation(jobId: string) {
  return useSetupWrite(jobId, (input: AddJobCompanyInput) =>
    sendWrite<JobCompanyDto>(newWrite({ method: 'POST', path: jobPath(jobId, 'companies'), body: input })),
  );
}

export function useUpdateCompanyMutation(jobId: string) {
  return useSetupWrite(jobId, ({ company, input }: { company: JobCompanyDto; input: UpdateJobCompanyInput }) =>
    sendWrite<JobCompanyDto>(
      newWrite({ method: 'PATCH', path: jobPath(jobId, 'companies', company.id), body: input, ifMatch: versionTag(company.version) }),
    ),
  );
}

export function useRemoveCompanyMutation(jobId: string) {
  return useSetupWrite(jobId, (company: JobCompanyDto) =>
    sendWrite<void>(newWrite({ method: 'DELETE', path: jobPath(jobId, 'companies', company.id), ifMatch: versionTag(company.version) })),
  );
}
