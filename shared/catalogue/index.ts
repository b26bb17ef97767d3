/**
 * The defect catalogue: its types, the built-in items, and small look-ups.
 * A job's catalogue starts as a copy of BUILTIN_CATALOGUE; the helpers take an optional
 * item list so they work on a job's own catalogue too.
 */
import type { UnitKindKey } from '../words';
import { BUILTIN_CATALOGUE } from './builtin';
import { CATALOGUE_GROUPS, type CatalogueGroup, type CatalogueItem } from './types';

export * from './types';
export { BUILTIN_CATALOGUE } from './builtin';

/** Items that apply to a unit kind, in catalogue order. */
export function itemsForKind(
  kind: UnitKindKey,
  items: readonly CatalogueItem[] = BUILTIN_CATALOGUE,
): readonly CatalogueItem[] {
  return items.filter((item) => item.unitKinds.includes(kind));
}

/** The item with this code ("dr-03" and " DR-03 " find "DR-03"), or undefined. */
export function findItem(
  code: string,
  items: readonly CatalogueItem[] = BUILTIN_CATALOGUE,
): CatalogueItem | undefined {
  const wanted = code.trim().toUpperCase();
  return items.find((item) => item.code === wanted);
}

/** Items in one group, in catalogue order. */
export function itemsInGroup(
  group: CatalogueGroup,
  items: readonly CatalogueItem[] = BUILTIN_CATALOGUE,
): readonly CatalogueItem[] {
  return items.filter((item) => item.group === group);
}

/** The code prefix of a group ("drainage" → "DR"). */
export function groupPrefix(group: CatalogueGroup): string {
  const found = CATALOGUE_GROUPS.find((g) => g.key === group);
  if (!found) throw new Error(`Unknown catalogue group: ${group}`);
  return found.prefix;
}
