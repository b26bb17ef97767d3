import { useInfiniteQuery, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { CreateFindingInput, FindingDetail, FindingListQuery, FindingListResponse } from '../../shared/schemas/findings';
import { apiGet } from '../api/client';
import { jobPath, queryString } from '../api/lists';
import { newWrite, sendWrite, type Write } from '../api/mutations';
import { refreshWalkData, walkKeys } from './walks';

/** The list's filters as the screen holds them (status and severity as comma lists, like the API). */
export type FindingFilters = Omit<FindingListQuery, 'limit' | 'cursor'>;

export const FINDINGS_PAGE_SIZE = 25;

export const findingKeys = {
  list: (jobId: string, filters: FindingFilters) => [...walkKeys.job(jobId), 'findings', 'list', filters] as const,
  detail: (jobId: string, findingId: string) => [...walkKeys.job(jobId), 'findings', 'detail', findingId] as const,
};

/** GET /findings, a page at a time by cursor; fetchNextPage() is "Load more". */
export function useFindingsQuery(jobId: string, filters: FindingFilters) {
  return useInfiniteQuery({
    queryKey: findingKeys.list(jobId, filters),
    queryFn: ({ pageParam }) =>
      apiGet<FindingListResponse>(`${jobPath(jobId, 'findings')}${queryString({ ...filters, limit: FINDINGS_PAGE_SIZE, cursor: pageParam })}`),
    initialPageParam: null as string | null,
    getNextPageParam: (last) => last.nextCursor,
    enabled: Boolean(jobId),
  });
}

export function useFindingQuery(jobId: string, findingId: string) {
  return useQuery({
    queryKey: findingKeys.detail(jobId, findingId),
    queryFn: () => apiGet<FindingDetail>(jobPath(jobId, 'findings', findingId)),
    enabled: Boolean(jobId && findingId),
  });
}

/** A photo picked from files or taken with the camera, ready to upload. */
export interface UploadPhoto {
  name: string;
  type: string;
  /** The browser's File / Blob. */
  blob?: Blob;
  /** A native file uri (no Blob on phones' native builds). */
  uri: string;
}

/**
 * The write that logs a finding: JSON without photos, else multipart with `data` (the JSON) and
 * `photos`. Made once per press of "Log finding" so a retry reuses its Idempotency-Key.
 */
export function createFindingWrite(jobId: string, input: CreateFindingInput, photos: readonly UploadPhoto[]): Write {
  const path = jobPath(jobId, 'findings');
  if (photos.length === 0) return newWrite({ method: 'POST', path, body: input });
  const form = new FormData();
  form.append('data', JSON.stringify(input));
  for (const p of photos) {
    if (p.blob) form.append('photos', p.blob, p.name);
    // React Native's FormData takes a { uri, name, type } file descriptor in place of a Blob.
    else form.append('photos', { uri: p.uri, name: p.name, type: p.type } as unknown as Blob);
  }
  return newWrite({ method: 'POST', path, body: form });
}

export function useCreateFindingMutation(jobId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (write: Write) => sendWrite<FindingDetail>(write),
    onSuccess: (finding) => queryClient.setQueryData(findingKeys.detail(jobId, finding.id), finding),
    onSettled: () => refreshWalkData(queryClient, jobId),
  });
}
