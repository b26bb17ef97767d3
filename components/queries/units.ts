import { useInfiniteQuery, useQuery } from '@tanstack/react-query';
import type {
  CreateUnitInput,
  ListResponse,
  UnitDto,
  UnitImportInput,
  UnitImportRecordDto,
  UnitImportReport,
  UpdateUnitInput,
} from '../../shared/schemas/setup';
import type { UnitKindKey } from '../../shared/words';
import { apiGet } from '../api/client';
import { jobPath, queryString, versionTag } from '../api/lists';
import { newWrite, sendWrite, type Write } from '../api/mutations';
import { setupKeys, useSetupWrite } from './setupKeys';

export interface UnitFilters {
  levelId?: string;
  spaceId?: string;
  systemId?: string;
  kind?: UnitKindKey;
  /** Tag contains. */
  q?: string;
}

export const UNITS_PAGE_SIZE = 50;

export const unitKeys = {
  all: (jobId: string) => setupKeys.resource(jobId, 'units'),
  list: (jobId: string, filters: UnitFilters) => [...unitKeys.all(jobId), 'list', filters] as const,
};

/** The register, a page at a time (cursor); fetchNextPage() is "Load more". */
export function useUnitsQuery(jobId: string, filters: UnitFilters, pageSize = UNITS_PAGE_SIZE) {
  return useInfiniteQuery({
    queryKey: [...unitKeys.list(jobId, filters), pageSize] as const,
    queryFn: ({ pageParam }) =>
      apiGet<ListResponse<UnitDto>>(`${jobPath(jobId, 'units')}${queryString({ ...filters, limit: pageSize, cursor: pageParam })}`),
    initialPageParam: null as string | null,
    getNextPageParam: (last) => last.nextCursor,
    enabled: Boolean(jobId),
  });
}

export function useCreateUnitMutation(jobId: string) {
  return useSetupWrite(jobId, (input: CreateUnitInput) =>
    sendWrite<UnitDto>(newWrite({ method: 'POST', path: jobPath(jobId, 'units'), body: input })),
  );
}

export function useUpdateUnitMutation(jobId: string) {
  return useSetupWrite(jobId, ({ unit, input }: { unit: UnitDto; input: UpdateUnitInput }) =>
    sendWrite<UnitDto>(newWrite({ method: 'PATCH', path: jobPath(jobId, 'units', unit.id), body: input, ifMatch: versionTag(unit.version) })),
  );
}

export function useDeleteUnitMutation(jobId: string) {
  return useSetupWrite(jobId, (unit: UnitDto) =>
    sendWrite<void>(newWrite({ method: 'DELETE', path: jobPath(jobId, 'units', unit.id), ifMatch: versionTag(unit.version) })),
  );
}

/** The write for one import step (preview or commit); made once per press so a retry reuses its key. */
export function importWrite(jobId: string, input: UnitImportInput): Write {
  return newWrite({ method: 'POST', path: jobPath(jobId, 'units', 'import'), body: input });
}

/** POST /units/import: a dry run (preview) or the all-or-nothing commit. */
export function useImportUnitsMutation(jobId: string) {
  return useSetupWrite(jobId, (write: Write) => sendWrite<UnitImportReport>(write));
}

export const unitImportKeys = {
  list: (jobId: string) => [...unitKeys.all(jobId), 'imports'] as const,
};

/** The job's recorded imports, newest first, each saying whether it can be undone now. */
export function useUnitImportsQuery(jobId: string) {
  return useQuery({
    queryKey: unitImportKeys.list(jobId),
    queryFn: () => apiGet<{ items: UnitImportRecordDto[] }>(jobPath(jobId, 'units', 'imports')),
    enabled: Boolean(jobId),
  });
}

/** The write that undoes one import; made once per press so a retry reuses its key. */
export function undoImportWrite(jobId: string, importId: string): Write {
  return newWrite({ method: 'POST', path: jobPath(jobId, 'units', 'imports', importId, 'undo'), body: {} });
}

export function useUndoImportMutation(jobId: string) {
  return useSetupWrite(jobId, (write: Write) => sendWrite<{ restored: number; deleted: number }>(write));
}

/** The write that deletes several units at once (all or none). */
export function deleteUnitsWrite(jobId: string, unitIds: string[]): Write {
  return newWrite({ method: 'POST', path: jobPath(jobId, 'units', 'delete'), body: { unitIds } });
}

export function useDeleteUnitsMutation(jobId: string) {
  return useSetupWrite(jobId, (write: Write) => sendWrite<{ deleted: number }>(write));
}
