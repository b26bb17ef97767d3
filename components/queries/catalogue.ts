import { useQuery } from '@tanstack/react-query';
import type { CatalogueItemDto, CreateCatalogueItemInput, UpdateCatalogueItemInput } from '../../shared/schemas/setup';
import type { UnitKindKey } from '../../shared/words';
import { fetchAll, jobPath, versionTag } from '../api/lists';
import { newWrite, sendWrite } from '../api/mutations';
import { setupKeys, useSetupWrite } from './setupKeys';

export const catalogueKeys = {
  all: (jobId: string) => setupKeys.resource(jobId, 'catalogue'),
  list: (jobId: string, filters: { unitKind?: UnitKindKey; includeRetired?: boolean }) =>
    [...catalogueKeys.all(jobId), 'list', filters] as const,
};

export function useCatalogueQuery(jobId: string, filters: { unitKind?: UnitKindKey; includeRetired?: boolean }, options: { enabled?: boolean } = {}) {
  return useQuery({
    queryKey: catalogueKeys.list(jobId, filters),
    queryFn: () =>
      fetchAll<CatalogueItemDto>(jobPath(jobId, 'catalogue'), {
        unitKind: filters.unitKind,
        includeRetired: filters.includeRetired ? 'true' : undefined,
      }),
    enabled: Boolean(jobId) && (options.enabled ?? true),
  });
}

export function useCreateCatalogueItemMutation(jobId: string) {
  return useSetupWrite(jobId, (input: CreateCatalogueItemInput) =>
    sendWrite<CatalogueItemDto>(newWrite({ method: 'POST', path: jobPath(jobId, 'catalogue'), body: input })),
  );
}

/** Edit, retire ({ retired: true }) or bring back ({ retired: false }). */
export function useUpdateCatalogueItemMutation(jobId: string) {
  return useSetupWrite(jobId, ({ item, input }: { item: CatalogueItemDto; input: UpdateCatalogueItemInput }) =>
    sendWrite<CatalogueItemDto>(
      newWrite({ method: 'PATCH', path: jobPath(jobId, 'catalogue', item.id), body: input, ifMatch: versionTag(item.version) }),
    ),
  );
}
