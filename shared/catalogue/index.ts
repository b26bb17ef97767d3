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

/**
 * Groups whose work is hazardous by nature (lifting, overhead, electrical, refrigerant, brazing,
 * drilling, rotating fans): every item in them carries a caution. Labelling is the one group that
 * is not; a labelling item that needs the ceiling open is overhead work and needs one too.
 */
export const HAZARDOUS_GROUPS: readonly CatalogueGroup[] = CATALOGUE_GROUPS.map((g) => g.key).filter((g) => g !== 'labelling');

/** Whether a defect type must carry a caution: a hazardous group, or a fix above the ceiling. */
export function needsCaution(item: Pick<CatalogueItem, 'group' | 'needsCeilingAccess'>): boolean {
  return HAZARDOUS_GROUPS.includes(item.group) || item.needsCeilingAccess;
}

/** What a defect type that needs a caution is told when it has none (the form and the server say the same). */
export const CAUTION_REQUIRED =
  "This defect type's work is hazardous: give a caution that names the hazard and says the manufacturer's installation manual, local codes and licensed practice govern.";
