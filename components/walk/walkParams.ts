import { z } from 'zod';
import { UNIT_WALK_STATES } from '../../shared/schemas/findings';
import { UNIT_KIND_KEYS } from '../../shared/words';
import { walkParams } from '../links';
import type { WalkUnitFilters } from '../queries/walks';
import { addressField, addressId, addressText, readView, type AddressParams, type AddressView } from '../viewParams';

/** A level walk's unit filters in its address: ?q (part of a tag), state, spaceId, systemId, kind; a bad value is no filter. */
const walkViewSchema = z.object({
  q: addressText(40),
  state: addressField(z.enum(UNIT_WALK_STATES)),
  spaceId: addressId(),
  systemId: addressId(),
  kind: addressField(z.enum(UNIT_KIND_KEYS)),
});

export function walkFiltersFromParams(params: AddressParams): WalkUnitFilters {
  return readView(walkViewSchema, params) as WalkUnitFilters;
}

/** A level walk's view (the route's `saved` is not part of it: it stays as it is). */
export const WALK_VIEW: AddressView<WalkUnitFilters> = {
  keys: Object.keys(walkViewSchema.shape),
  parse: walkFiltersFromParams,
  toParams: walkParams,
};
