import { z } from 'zod';
import { TEST_RECORD_KINDS, TEST_RESULTS } from '../../shared/schemas/testRecords';
import { testParams } from '../links';
import type { TestFilters } from '../queries/testRecords';
import { addressField, addressId, readView, type AddressParams, type AddressView } from '../viewParams';

/** The test records list's filters in its address: ?systemId, unitId, kind, result, witnessed, current; a bad value is no filter. */
const testViewSchema = z.object({
  systemId: addressId(),
  unitId: addressId(),
  kind: addressField(z.enum(TEST_RECORD_KINDS)),
  result: addressField(z.enum(TEST_RESULTS)),
  witnessed: addressField(z.enum(['true', 'false'])),
  current: addressField(z.literal('true')),
});

export function testFiltersFromParams(params: AddressParams): TestFilters {
  return readView(testViewSchema, params) as TestFilters;
}

/** The test records list's view: read with the schema above, written by links.tests' own testParams. */
export const TESTS_VIEW: AddressView<TestFilters> = {
  keys: Object.keys(testViewSchema.shape),
  parse: testFiltersFromParams,
  toParams: testParams,
};
