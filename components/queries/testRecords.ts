import { useInfiniteQuery, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { UnitDto } from '../../shared/schemas/setup';
import type { CreateTestRecordInput, TestRecordDto, TestRecordKind, TestRecordList, TestResult, WitnessTestRecordInput } from '../../shared/schemas/testRecords';
import { apiGet } from '../api/client';
import { fetchAll, jobPath, queryString, versionTag } from '../api/lists';
import { newClientId, newWrite, type Write } from '../api/mutations';
import { isQueued, labelWrite, submitWrite, type Queued } from '../outbox';
import type { UploadPhoto } from './findings';
import { refreshWalkData, walkKeys } from './walks';

/** The list's filters as the screen holds them (address values: witnessed as 'true' / 'false'). */
export interface TestFilters {
  systemId?: string;
  unitId?: string;
  kind?: TestRecordKind;
  result?: TestResult;
  witnessed?: 'true' | 'false';
  current?: 'true';
}

export const TESTS_PAGE_SIZE = 50;

/** Under the job's walk keys: a record written refreshes the board and readiness with the rest. */
export const testKeys = {
  all: (jobId: string) => [...walkKeys.job(jobId), 'tests'] as const,
  list: (jobId: string, filters: TestFilters) => [...testKeys.all(jobId), 'list', filters] as const,
  detail: (jobId: string, recordId: string) => [...testKeys.all(jobId), 'detail', recordId] as const,
};

/** GET /test-records, a page at a time (newest first). */
export function useTestRecordsQuery(jobId: string, filters: TestFilters) {
  return useInfiniteQuery({
    queryKey: testKeys.list(jobId, filters),
    queryFn: ({ pageParam }) => apiGet<TestRecordList>(`${jobPath(jobId, 'test-records')}${queryString({ ...filters, limit: TESTS_PAGE_SIZE, cursor: pageParam })}`),
    initialPageParam: null as string | null,
    getNextPageParam: (last) => last.nextCursor,
    enabled: Boolean(jobId),
  });
}

export function useTestRecordQuery(jobId: string, recordId: string) {
  return useQuery({
    queryKey: testKeys.detail(jobId, recordId),
    queryFn: () => apiGet<TestRecordDto>(jobPath(jobId, 'test-records', recordId)),
    enabled: Boolean(jobId && recordId),
  });
}

/** The units the record forms offer (a level's for a drain test, a system's for a start-up record), every page. */
export function useTestUnitsQuery(jobId: string, filters: { levelId?: string; systemId?: string } = {}) {
  return useQuery({
    queryKey: [...testKeys.all(jobId), 'units', filters] as const,
    queryFn: () => fetchAll<UnitDto>(jobPath(jobId, 'units'), filters),
    enabled: Boolean(jobId),
  });
}

/** A photo of a record and what it shows (the request's photoStages, in file order). */
export interface StagedPhoto extends UploadPhoto {
  stage: 'gauge_start' | 'gauge_end' | 'test';
}

/**
 * The write that records a test: JSON without photos, else multipart with `data` (the JSON) and
 * `photos`, their stages in `photoStages` in the same order. Made once per press so a retry reuses
 * its Idempotency-Key; the record's id is made here, so a resend after a lost answer finds it.
 */
export function createTestRecordWrite(jobId: string, input: CreateTestRecordInput, photos: readonly StagedPhoto[], label?: string): Write {
  const path = jobPath(jobId, 'test-records');
  const body: CreateTestRecordInput = { ...input, id: input.id ?? newClientId(), ...(photos.length ? { photoStages: photos.map((p) => p.stage) } : {}) };
  const named = (write: Write) => (label ? labelWrite(write, label) : write);
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

/** A record kept on the phone, not on the server yet. */
export interface QueuedTestRecord extends Queued {
  id: string;
}
export type RecordedTest = TestRecordDto | QueuedTestRecord;

/** Kept in the outbox first (works with no signal), then sent; see components/outbox. */
export function useCreateTestRecordMutation(jobId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    networkMode: 'always',
    mutationFn: async ({ write, id }: { write: Write; id: string }): Promise<RecordedTest> => {
      const answer = await submitWrite<TestRecordDto>(write);
      return isQueued(answer) ? { ...answer, id } : answer;
    },
    onSuccess: (record) => {
      if (!isQueued(record)) queryClient.setQueryData(testKeys.detail(jobId, record.id), record);
    },
    onSettled: () => refreshWalkData(queryClient, jobId),
  });
}

/** POST /test-records/:recordId/witness with the version the person saw (If-Match). */
export function witnessWrite(jobId: string, record: Pick<TestRecordDto, 'id' | 'version'>, input: WitnessTestRecordInput, label?: string): Write {
  const write = newWrite({ method: 'POST', path: jobPath(jobId, 'test-records', record.id, 'witness'), body: input, ifMatch: versionTag(record.version) });
  return label ? labelWrite(write, label) : write;
}

export function useWitnessMutation(jobId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    networkMode: 'always',
    mutationFn: (write: Write) => submitWrite<TestRecordDto>(write),
    onSuccess: (record) => {
      if (!isQueued(record)) queryClient.setQueryData(testKeys.detail(jobId, record.id), record);
    },
    onSettled: () => refreshWalkData(queryClient, jobId),
  });
}
