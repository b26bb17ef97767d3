import { z } from 'zod';
import { FINDING_SORTS } from '../../shared/schemas/findings';
import { FINDING_STATUSES, SEVERITIES, UNIT_KIND_KEYS } from '../../shared/words';
import { DEFAULT_FINDING_SORT, findingParams } from '../links';
import type { FindingFilters } from '../queries/findings';
import { addressField, addressId, addressList, addressText, readView, type AddressParams, type AddressView } from '../viewParams';

/**
 * The findings list's filters in its address: ?levelId, spaceId, unitId, companyId,
 * catalogueItemId, kind, status and severity (comma lists), overdue=true, q, sort. A value that is
 * not valid falls back to no filter (a list keeps its valid members) rather than being sent for the
 * API to refuse; newest first is the default sort and reads back as no sort.
 */
const findingViewSchema = z.object({
  levelId: addressId(),
  spaceId: addressId(),
  unitId: addressId(),
  companyId: addressId(),
  catalogueItemId: addressId(),
  kind: addressField(z.enum(UNIT_KIND_KEYS)),
  status: addressList(FINDING_STATUSES),
  severity: addressList(SEVERITIES),
  overdue: addressField(z.literal('true')),
  q: addressText(100),
  sort: addressField(z.enum(FINDING_SORTS).transform((s) => (s === DEFAULT_FINDING_SORT ? undefined : s))),
});

/** The list's filters from its address (links from a level's walk, the levels board, readiness, recurring defects, or a sent address). */
export function findingFiltersFromParams(params: AddressParams): FindingFilters {
  return readView(findingViewSchema, params) as FindingFilters;
}

/** The findings list's view: read with the schema above, written by links.findings' own findingParams. */
export const FINDINGS_VIEW: AddressView<FindingFilters> = {
  keys: Object.keys(findingViewSchema.shape),
  parse: findingFiltersFromParams,
  toParams: findingParams,
};
