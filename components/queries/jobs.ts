import { useQuery } from '@tanstack/react-query';
import type { SessionJob } from '../../shared/schemas/session';
import { apiGet } from '../api/client';

export interface JobDetail extends SessionJob {
  startsOn: string | null;
  endsOn: string | null;
  timeZone: string;
  unitSystem: 'imperial' | 'metric';
}

export const jobKeys = {
  all: ['jobs'] as const,
  list: () => [...jobKeys.all, 'list'] as const,
  detail: (jobId: string) => [...jobKeys.all, 'detail', jobId] as const,
};

export function useJobsQuery() {
  return useQuery({
    queryKey: jobKeys.list(),
    queryFn: () => apiGet<{ items: SessionJob[] }>('/api/jobs').then((r) => r.items),
  });
}

export function useJobQuery(jobId: string) {
  return useQuery({
    queryKey: jobKeys.detail(jobId),
    queryFn: () => apiGet<JobDetail>(`/api/jobs/${encodeURIComponent(jobId)}`),
    enabled: Boolean(jobId),
  });
}
