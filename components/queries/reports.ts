import { useMutation, useQuery } from '@tanstack/react-query';
import type { CreateReportBody, ReportRunDto } from '../../shared/schemas/reports';
import { apiGet } from '../api/client';
import { newWrite, sendWrite } from '../api/mutations';
import { reportUrls } from '../reports/reportUrls';

export const reportKeys = {
  run: (jobId: string, reportId: string) => ['jobs', jobId, 'reports', reportId] as const,
};

/** A report built in the background: asked every two seconds until it is done or failed. */
export function useReportRunQuery(jobId: string, reportId: string) {
  return useQuery({
    queryKey: reportKeys.run(jobId, reportId),
    queryFn: () => apiGet<ReportRunDto>(reportUrls.run(jobId, reportId)),
    enabled: Boolean(jobId && reportId),
    refetchInterval: (q) => (q.state.data && (q.state.data.status === 'done' || q.state.data.status === 'failed') ? false : 2000),
  });
}

/** Asks for a close-out report (POST /reports, 202); the caller goes to its page. One write object per press. */
export function useStartReportMutation(jobId: string) {
  return useMutation({
    mutationFn: (body: CreateReportBody) => sendWrite<ReportRunDto>(newWrite({ method: 'POST', path: reportUrls.reports(jobId), body })),
  });
}
