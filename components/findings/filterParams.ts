import { FINDING_SORTS } from '../../shared/schemas/findings';
import { FINDING_STATUSES, SEVERITIES, UNIT_KIND_KEYS } from '../../shared/words';
import type { FindingFilters } from '../queries/findings';

type Params = Record<string, string | string[] | undefined>;

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

function one(v: string | string[] | undefined): string | undefined {
  const s = Array.isArray(v) ? v[0] : v;
  return s === undefined || s === '' ? undefined : s;
}
function idParam(v: string | string[] | undefined): string | undefined {
  const s = one(v);
  return s && UUID.test(s) ? s : undefined;
}
function listParam(v: string | string[] | undefined, allowed: readonly string[]): string | undefined {
  const s = one(v);
  if (!s) return undefined;
  const parts = s.split(',').filter((p) => allowed.includes(p));
  return parts.length ? [...new Set(parts)].join(',') : undefined;
}

/**
 * The findings list's filters from its address (links from a level's walk, the levels board,
 * readiness and recurring defects): ?levelId, spaceId, unitId, companyId, catalogueItemId, kind,
 * status and severity (comma lists), overdue=true, q, sort. Values that are not valid are left out
 * rather than sent for the API to refuse.
 */
export function findingFiltersFromParams(params: Params): FindingFilters {
  const kind = one(params.kind);
  const sort = one(params.sort);
  const q = one(params.q)?.trim().slice(0, 100);
  const filters: FindingFilters = {
    levelId: idParam(params.levelId),
    spaceId: idParam(params.spaceId),
    unitId: idParam(params.unitId),
    companyId: idParam(params.companyId),
    catalogueItemId: idParam(params.catalogueItemId),
    kind: kind && (UNIT_KIND_KEYS as readonly string[]).includes(kind) ? (kind as FindingFilters['kind']) : undefined,
    status: listParam(params.status, FINDING_STATUSES),
    severity: listParam(params.severity, SEVERITIES),
    overdue: one(params.overdue) === 'true' ? 'true' : undefined,
    q: q || undefined,
    sort: sort && (FINDING_SORTS as readonly string[]).includes(sort) ? (sort as FindingFilters['sort']) : undefined,
  };
  return Object.fromEntries(Object.entries(filters).filter(([, v]) => v !== undefined)) as FindingFilters;
}

/** A key that changes when the address's filters change (the list screen starts over). */
export function filtersKey(filters: FindingFilters): string {
  return JSON.stringify(Object.entries(filters).sort(([a], [b]) => a.localeCompare(b)));
}
