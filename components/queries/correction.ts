/**
 * The correction loop's reads and writes: the subcontractor's inbox, the re-inspection queue,
 * fixes, re-inspections, changes to a finding (PATCH with If-Match), comments and bulk changes.
 * Every write is made once per press with newWrite(...); the field writes (fixes, photos, re-inspections,
 * changes, comments) go through the outbox (kept on the phone first, sent after: components/outbox).
 */
import { useMutation, useQuery, useQueryClient, type QueryClient } from '@tanstack/react-query';
import type {
  AddFindingPhotosInput,
  BulkChangeInput,
  BulkChangeResponse,
  CommentInput,
  CommentsResponse,
  FindingChangeInput,
  FindingDetail,
  FindingEventDto,
  FixDetail,
  InboxResponse,
  ReinspectionInput,
  ReinspectionQueueResponse,
  SubmitFixInput,
} from '../../shared/schemas/findings';
import { apiGet } from '../api/client';
import { jobPath, queryString, versionTag } from '../api/lists';
import { newWrite, sendWrite, type Write } from '../api/mutations';
import { isQueued, submitWrite } from '../outbox';
import { findingKeys, type UploadPhoto } from './findings';
import { refreshWalkData, walkKeys } from './walks';

export type InboxGrouping = 'none' | 'area';

export const correctionKeys = {
  inbox: (groupBy: InboxGrouping) => ['inbox', groupBy] as const,
  inboxAll: ['inbox'] as const,
  queue: (jobId: string) => [...walkKeys.job(jobId), 'reinspections', 'queue'] as const,
  comments: (jobId: string, findingId: string) => [...walkKeys.job(jobId), 'findings', 'comments', findingId] as const,
};

/** GET /api/inbox: the subcontractor's company's findings on all their jobs (overdue first, then by due date). */
export function useInboxQuery(groupBy: InboxGrouping) {
  return useQuery({
    queryKey: correctionKeys.inbox(groupBy),
    queryFn: () => apiGet<InboxResponse>(`/api/inbox${queryString({ groupBy })}`),
  });
}

/** GET /reinspections/queue: fixes waiting, grouped by level. */
export function useReinspectionQueueQuery(jobId: string) {
  return useQuery({
    queryKey: correctionKeys.queue(jobId),
    queryFn: () => apiGet<ReinspectionQueueResponse>(jobPath(jobId, 'reinspections', 'queue')),
    enabled: Boolean(jobId),
  });
}

export function useCommentsQuery(jobId: string, findingId: string) {
  return useQuery({
    queryKey: correctionKeys.comments(jobId, findingId),
    queryFn: () => apiGet<CommentsResponse>(jobPath(jobId, 'findings', findingId, 'comments')).then((r) => r.items),
    enabled: Boolean(jobId && findingId),
  });
}

/** After any change to a finding: its job's walk/finding screens, the queue and every inbox, in the background (see refreshWalkData). */
function refreshAfterChange(queryClient: QueryClient, jobId: string): void {
  refreshWalkData(queryClient, jobId);
  void queryClient.invalidateQueries({ queryKey: correctionKeys.inboxAll });
}

/** A multipart body: `data` (the JSON) and the photos as files. */
function photoForm(data: unknown, photos: readonly UploadPhoto[]): FormData {
  const form = new FormData();
  form.append('data', JSON.stringify(data));
  for (const p of photos) {
    if (p.blob) form.append('photos', p.blob, p.name);
    // React Native's FormData takes a { uri, name, type } file descriptor in place of a Blob.
    else form.append('photos', { uri: p.uri, name: p.name, type: p.type } as unknown as Blob);
  }
  return form;
}

/** The multipart write of a fix: `data` (the JSON) and the photos. Made once per press of "Submit fix". */
export function submitFixWrite(jobId: string, findingId: string, input: SubmitFixInput, photos: readonly UploadPhoto[]): Write {
  return newWrite({ method: 'POST', path: jobPath(jobId, 'findings', findingId, 'fixes'), body: photoForm(input, photos) });
}

/** POST /findings/:findingId/photos: more photos of the defect while the finding is open. Made once per press of "Add photos". */
export function addFindingPhotosWrite(jobId: string, findingId: string, input: AddFindingPhotosInput, photos: readonly UploadPhoto[]): Write {
  return newWrite({ method: 'POST', path: jobPath(jobId, 'findings', findingId, 'photos'), body: photoForm(input, photos) });
}

/** Photos added answer with the finding as it is now. */
export function useAddFindingPhotosMutation(jobId: string, findingId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    networkMode: 'always',
    mutationFn: (write: Write) => submitWrite<FindingDetail>(write),
    onSuccess: (f) => {
      if (!isQueued(f)) queryClient.setQueryData(findingKeys.detail(jobId, findingId), f);
    },
    onSettled: () => refreshAfterChange(queryClient, jobId),
  });
}

/** Fixes, re-inspections, changes and comments are kept in the outbox first (no signal), then sent. */
export function useSubmitFixMutation(jobId: string, findingId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    networkMode: 'always',
    mutationFn: (write: Write) => submitWrite<FixDetail>(write),
    onSuccess: (res) => {
      if (!isQueued(res)) queryClient.setQueryData(findingKeys.detail(jobId, findingId), res.finding);
    },
    onSettled: () => refreshAfterChange(queryClient, jobId),
  });
}

/**
 * POST /reinspections with If-Match from the version the inspector looked at: JSON, or multipart
 * with the inspector's own photos.
 */
export function reinspectionWrite(jobId: string, findingId: string, version: number, input: ReinspectionInput, photos: readonly UploadPhoto[] = []): Write {
  const body = photos.length ? photoForm(input, photos) : input;
  return newWrite({ method: 'POST', path: jobPath(jobId, 'findings', findingId, 'reinspections'), body, ifMatch: versionTag(version) });
}

/** PATCH /findings/:findingId: one change (reassign, severity, due date, void, reopen, close) with If-Match. */
export function findingChangeWrite(jobId: string, findingId: string, version: number, input: FindingChangeInput): Write {
  return newWrite({ method: 'PATCH', path: jobPath(jobId, 'findings', findingId), body: input, ifMatch: versionTag(version) });
}

/** Re-inspections and changes answer with the finding as it is now. */
export function useFindingWriteMutation(jobId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    networkMode: 'always',
    mutationFn: (write: Write) => submitWrite<FindingDetail>(write),
    onSuccess: (f) => {
      if (!isQueued(f)) queryClient.setQueryData(findingKeys.detail(jobId, f.id), f);
    },
    onSettled: () => refreshAfterChange(queryClient, jobId),
  });
}

export function commentWrite(jobId: string, findingId: string, input: CommentInput): Write {
  return newWrite({ method: 'POST', path: jobPath(jobId, 'findings', findingId, 'comments'), body: input });
}

export function useAddCommentMutation(jobId: string, findingId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    networkMode: 'always',
    mutationFn: (write: Write) => submitWrite<FindingEventDto>(write),
    onSettled: () =>
      Promise.all([
        queryClient.invalidateQueries({ queryKey: correctionKeys.comments(jobId, findingId) }),
        queryClient.invalidateQueries({ queryKey: findingKeys.detail(jobId, findingId) }),
      ]),
  });
}

export function bulkChangeWrite(jobId: string, input: BulkChangeInput): Write {
  return newWrite({ method: 'POST', path: jobPath(jobId, 'findings', 'bulk'), body: input });
}

export function useBulkChangeMutation(jobId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (write: Write) => sendWrite<BulkChangeResponse>(write),
    onSettled: () => refreshAfterChange(queryClient, jobId),
  });
}

/** What one of several writes came to: sent (the server's answer), kept on the phone, or refused. */
export type EachOutcome = { findingId: string; sent: true } | { findingId: string; kept: true } | { findingId: string; refused: unknown };

/**
 * Several findings' writes from one press (a fix for each, or an acceptance of each), one after
 * another through the outbox: each its own write and record, so one refusal (a finding someone
 * changed meanwhile) leaves the others done, and the answer says which.
 */
export function useEachFindingWriteMutation(jobId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    networkMode: 'always',
    mutationFn: async (writes: readonly { findingId: string; write: Write }[]): Promise<EachOutcome[]> => {
      const out: EachOutcome[] = [];
      for (const { findingId, write } of writes) {
        try {
          const answer = await submitWrite<unknown>(write);
          out.push(isQueued(answer) ? { findingId, kept: true } : { findingId, sent: true });
        } catch (refused) {
          out.push({ findingId, refused });
        }
      }
      return out;
    },
    onSettled: () => refreshAfterChange(queryClient, jobId),
  });
}
