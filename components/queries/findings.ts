import { useInfiniteQuery, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { CreateFindingBatchInput, CreateFindingInput, FindingBatchResponse, FindingDetail, FindingListQuery, FindingListResponse } from '../../shared/schemas/findings';
import { apiGet } from '../api/client';
import { jobPath, queryString } from '../api/lists';
import { newClientId, newWrite, type Write } from '../api/mutations';
import { bodyJson } from '../outbox/describe';
import { isQueued, labelWrite, submitWrite, type Queued } from '../outbox';
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
 * `photos`. Made once per press of "Log finding" so a retry reuses its Idempotency-Key. The
 * finding's id is made here, on the phone: a fix, a pin or photos queued after it (no signal) name
 * it before it reaches the server, and the server makes it once whatever happens to the key.
 */
export function createFindingWrite(jobId: string, input: CreateFindingInput, photos: readonly UploadPhoto[], where?: string): Write {
  const path = jobPath(jobId, 'findings');
  const body: CreateFindingInput = { ...input, id: input.id ?? newClientId() };
  const named = (write: Write) => (where ? labelWrite(write, where) : write);
  if (photos.length === 0) return named(newWrite({ method: 'POST', path, body }));
  const form = new FormData();
  form.append('data', JSON.stringify(body));
  for (const p of photos) {
    if (p.blob) form.append('photos', p.blob, p.name);
    // React Native's FormData takes a { uri, name, type } file descriptor in place of a Blob.
    else form.append('photos', { uri: p.uri, name: p.name, type: p.type } as unknown as Blob);
  }
  return named(newWrite({ method: 'POST', path, body: form }));
}

/** A finding kept on the phone, not on the server yet: its id (made on the phone) and what the form knew. */
export interface QueuedFinding extends Queued {
  id: string;
  /** Shown where the server's number would be. */
  label: string;
  /** The defect type's id as sent ('' for "Something else", which has none). */
  catalogueItemId: string;
  /** Not known on the phone (''): the server gives the type's code. */
  code: string;
  /** "Something else": the title as typed. */
  title: string | null;
}

/** What logging a finding answers: the finding as the server holds it, or the one waiting to send. */
export type LoggedFinding = FindingDetail | QueuedFinding;

/** Kept in the outbox first (works with no signal), then sent; see components/outbox. */
export function useCreateFindingMutation(jobId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    networkMode: 'always',
    mutationFn: async (write: Write): Promise<LoggedFinding> => {
      const answer = await submitWrite<FindingDetail>(write);
      if (!isQueued(answer)) return answer;
      const body = bodyJson(write);
      return {
        ...answer,
        id: typeof body?.id === 'string' ? body.id : '',
        label: '(waiting to send)',
        catalogueItemId: typeof body?.catalogueItemId === 'string' ? body.catalogueItemId : '',
        code: '',
        title: typeof body?.title === 'string' ? body.title : null,
      };
    },
    onSuccess: (finding) => {
      if (!isQueued(finding)) queryClient.setQueryData(findingKeys.detail(jobId, finding.id), finding);
    },
    onSettled: () => refreshWalkData(queryClient, jobId),
  });
}

/**
 * The write that logs one defect on many units of a level (POST /findings/batch): JSON, or
 * multipart with `data` and each unit's own photo, the unit naming its photo by position.
 * Made once per press so a retry reuses its Idempotency-Key; sent or kept like any field write.
 */
export function findingBatchWrite(jobId: string, input: CreateFindingBatchInput, photos: ReadonlyMap<string, UploadPhoto>, where: string): Write {
  const path = jobPath(jobId, 'findings', 'batch');
  const files: UploadPhoto[] = [];
  const units = input.units.map((u) => {
    const photo = photos.get(u.unitId);
    if (!photo) return u;
    files.push(photo);
    return { ...u, photo: files.length - 1 };
  });
  const body: CreateFindingBatchInput = { ...input, units };
  if (files.length === 0) return labelWrite(newWrite({ method: 'POST', path, body }), where);
  const form = new FormData();
  form.append('data', JSON.stringify(body));
  for (const p of files) {
    if (p.blob) form.append('photos', p.blob, p.name);
    else form.append('photos', { uri: p.uri, name: p.name, type: p.type } as unknown as Blob);
  }
  return labelWrite(newWrite({ method: 'POST', path, body: form }), where);
}

/** Kept in the outbox first (works with no signal), then sent: the findings logged, or the write waiting. */
export function useFindingBatchMutation(jobId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    networkMode: 'always',
    mutationFn: (write: Write) => submitWrite<FindingBatchResponse>(write),
    onSuccess: (answer) => {
      if (isQueued(answer)) return;
      for (const f of answer.items) queryClient.setQueryData(findingKeys.detail(jobId, f.id), f);
    },
    onSettled: () => refreshWalkData(queryClient, jobId),
  });
}
