import { z } from 'zod';
import { scorecardParams } from '../links';
import { addressField, readView, type AddressParams, type AddressView } from '../viewParams';
import { DEFAULT_SCORECARD_SORT, SCORECARD_KEYS, type ScorecardKey, type ScorecardSort } from './scorecardSort';

/** The scorecards' order in the address: `sort=name` ascending, `sort=-open` descending; anything else is the default. */
const scorecardViewSchema = z.object({
  sort: addressField(
    z
      .string()
      .regex(new RegExp(`^-?(${SCORECARD_KEYS.join('|')})$`))
      .transform((s): ScorecardSort => (s.startsWith('-') ? { key: s.slice(1) as ScorecardKey, dir: 'desc' } : { key: s as ScorecardKey, dir: 'asc' })),
  ),
});

export function scorecardSortFromParams(params: AddressParams): ScorecardSort {
  return readView(scorecardViewSchema, params).sort ?? DEFAULT_SCORECARD_SORT;
}

export const SCORECARDS_VIEW: AddressView<ScorecardSort> = {
  keys: ['sort'],
  parse: scorecardSortFromParams,
  toParams: scorecardParams,
};
