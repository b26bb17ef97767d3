import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { SessionJob } from '../../shared/schemas/session';
import type { CopyJobInput, CreateJobInput, JobDetail, UpdateJobInput } from '../../shared/schemas/setup';
import { apiGet } from '../api/client';
import { jobPath, versionTag } from '../api/lists';
import { newWrite, sendWrite } from '../api/mutations';
import { sessionKeys } from './session';
import { setupKeys } from './setupKeys';

export type { JobDetail } from '../../shared/schemas/setup';

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
    queryFn: () => apiGet<JobDetail>(jobPath(jobId)),
    enabled: Boolean(jobId),
  });
}

/** POST /api/jobs: the caller becomes the job's GC manager. */
export function useCreateJobMutation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateJobInput) => sendWrite<JobDetail>(newWrite({ method: 'POST', path: '/api/jobs', body: input })),
    onSuccess: async (job) => {
      queryClient.setQueryData(jobKeys.detail(job.id), job);
      await Promise.all([
        queryClient.invalidateQueries({ queryKey: jobKeys.list() }),
        queryClient.invalidateQueries({ queryKey: sessionKeys.all }),
      ]);
    },
  });
}

/** POST /api/jobs/:jobId/copy: a new job with this one's structure; the caller is its GC manager. */
export function useCopyJobMutation(jobId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: CopyJobInput) => sendWrite<JobDetail>(newWrite({ method: 'POST', path: jobPath(jobId, 'copy'), body: input })),
    onSuccess: async (job) => {
      queryClient.setQueryData(jobKeys.detail(job.id), job);
      await queryClient.invalidateQueries({ queryKey: jobKeys.list() });
    },
  });
}

/** PATCH /api/jobs/:jobId with If-Match from the version the form was filled from. */
export function useUpdateJobMutation(jobId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ input, version }: { input: UpdateJobInput; version: number }) =>
      sendWrite<JobDetail>(newWrite({ method: 'PATCH', path: jobPath(jobId), body: input, ifMatch: versionTag(version) })),
    onSuccess: (job) => {
      queryClient.setQueryData(jobKeys.detail(jobId), job);
    },
    onSettled: async () => {
      await Promise.all([
        queryClient.invalidateQueries({ queryKey: jobKeys.all }),
        queryClient.invalidateQueries({ queryKey: setupKeys.job(jobId) }),
      ]);
    },
  });
}
