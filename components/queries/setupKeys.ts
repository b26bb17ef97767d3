import { useMutation, useQueryClient } from '@tanstack/react-query';

/**
 * Key factory shared by the set-up resources of one job. Every key starts with
 * ['setup', jobId, resource], so one write can refresh all of a job's set-up at once
 * (counts on levels and spaces change when units change).
 */
export const setupKeys = {
  job: (jobId: string) => ['setup', jobId] as const,
  resource: (jobId: string, resource: string) => ['setup', jobId, resource] as const,
};

/** A set-up write: when it settles (done or refused), the job's set-up is read again. */
export function useSetupWrite<TVars, TResult>(jobId: string, write: (vars: TVars) => Promise<TResult>) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: write,
    onSettled: () => queryClient.invalidateQueries({ queryKey: setupKeys.job(jobId) }),
  });
}
