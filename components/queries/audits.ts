import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { AuditDetail, AuditListResponse, CreateAuditInput } from '../../shared/schemas/audits';
import type { UnitDto } from '../../shared/schemas/setup';
import { apiGet } from '../api/client';
import { fetchAll, jobPath, queryString } from '../api/lists';
import { newWrite, type Write } from '../api/mutations';
import { isQueued, submitWrite, type Queued } from '../outbox';
import { refreshWalkData, walkKeys } from './walks';

/** Under the job's walk keys: a unit check or finding saved refreshes the audits' results. */
export const auditKeys = {
  all: (jobId: string) => [...walkKeys.job(jobId), 'audits'] as const,
  list: (jobId: string, levelId?: string) => [...auditKeys.all(jobId), 'list', levelId ?? null] as const,
  detail: (jobId: string, auditId: string) => [...auditKeys.all(jobId), 'detail', auditId] as const,
};

/** GET /audits; with a level, the marks its walk screens show (sample units, units to check after a rejection). */
export function useAuditsQuery(jobId: string, options: { levelId?: string; enabled?: boolean } = {}) {
  return useQuery({
    queryKey: auditKeys.list(jobId, options.levelId),
    queryFn: () => apiGet<AuditListResponse>(`${jobPath(jobId, 'audits')}${queryString({ levelId: options.levelId })}`),
    enabled: Boolean(jobId) && options.enabled !== false,
  });
}

export function useAuditQuery(jobId: string, auditId: string) {
  return useQuery({
    queryKey: auditKeys.detail(jobId, auditId),
    queryFn: () => apiGet<AuditDetail>(jobPath(jobId, 'audits', auditId)),
    enabled: Boolean(jobId && auditId),
  });
}

/** The write that plans an audit; made once per press so a retry reuses its Idempotency-Key. */
export function planAuditWrite(jobId: string, input: CreateAuditInput): Write {
  return newWrite({ method: 'POST', path: jobPath(jobId, 'audits'), body: input });
}

export function usePlanAuditMutation(jobId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    networkMode: 'always',
    mutationFn: (write: Write) => submitWrite<AuditDetail>(write, 'Audit plan'),
    onSuccess: (audit: AuditDetail | Queued) => {
      if (!isQueued(audit)) queryClient.setQueryData(auditKeys.detail(jobId, audit.id), audit);
    },
    onSettled: () => refreshWalkData(queryClient, jobId),
  });
}

/** Every unit of the job, for the plan form's count of the lot the filters choose (the server freezes the real one). */
export function useLotUnitsQuery(jobId: string) {
  return useQuery({
    queryKey: [...auditKeys.all(jobId), 'units'] as const,
    queryFn: () => fetchAll<UnitDto>(jobPath(jobId, 'units')),
    enabled: Boolean(jobId),
  });
}
