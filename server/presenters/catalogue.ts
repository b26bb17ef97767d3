/** A catalogue item → CatalogueItemDto. */
import type { CatalogueItemDto } from '../../shared/schemas/setup';
import type { CatalogueItem } from '../models';

export function presentCatalogueItem(item: CatalogueItem): CatalogueItemDto {
  return {
    id: item.id,
    code: item.code,
    group: item.group,
    title: item.title,
    description: item.description,
    unitKinds: item.unitKinds,
    defaultSeverity: item.defaultSeverity,
    trade: item.trade,
    measuredRule: (item.measuredRule ?? null) as CatalogueItemDto['measuredRule'],
    fixGuidance: item.fixGuidance,
    caution: item.caution,
    needsCeilingAccess: item.needsCeilingAccess,
    builtin: item.builtin,
    retiredAt: item.retiredAt ? item.retiredAt.toISOString() : null,
    version: item.version,
  };
}
