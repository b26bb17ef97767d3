/**
 * A model's limits cite one manual, each with an optional page: composed into the stored source
 * and split back for the form. No published source: these are the product's own words.
 */
import fc from 'fast-check';
import { isPageOnly, limitSource, splitLimitSources } from '../../../shared/rules/limitSource';

const MANUAL = 'Cassette 24 installation manual, 2nd edition';

describe('a limit’s source from the model’s manual', () => {
  it('a page cites the manual at that page; nothing cites the manual; other text is its own source', () => {
    expect(limitSource(MANUAL, '12')).toBe(`${MANUAL}, p. 12`);
    expect(limitSource(MANUAL, 'p. 12')).toBe(`${MANUAL}, p. 12`);
    expect(limitSource(MANUAL, 'page 14-15')).toBe(`${MANUAL}, p. 14-15`);
    expect(limitSource(MANUAL, '12, fig. 4')).toBe(`${MANUAL}, p. 12, fig. 4`);
    expect(limitSource(MANUAL, '')).toBe(MANUAL);
    expect(limitSource(MANUAL, 'IMC 2021 section 307.2.2')).toBe('IMC 2021 section 307.2.2');
    expect(limitSource('', 'Installation manual, p. 12')).toBe('Installation manual, p. 12');
  });

  it('a page with no manual names nothing', () => {
    expect(limitSource('', '12')).toBe('');
    expect(limitSource('  ', '')).toBe('');
    expect(isPageOnly('p. 12')).toBe(true);
    expect(isPageOnly('Installation manual, p. 12')).toBe(false);
  });

  it('splits stored sources back into the manual and each limit’s page or own source', () => {
    expect(splitLimitSources([`${MANUAL}, p. 12`, MANUAL, 'IMC 2021 section 307.2.2', `${MANUAL}, p. 14-15`, ''])).toEqual({
      manual: MANUAL,
      perLimit: ['12', '', 'IMC 2021 section 307.2.2', '14-15', ''],
    });
    // Limits with sources of their own share no manual.
    expect(splitLimitSources(['Manual A, p. 3', 'Manual B, p. 4'])).toEqual({ manual: '', perLimit: ['Manual A, p. 3', 'Manual B, p. 4'] });
    // One limit alone: its manual is the model's.
    expect(splitLimitSources(['Manual A, p. 3', ''])).toEqual({ manual: 'Manual A', perLimit: ['3', ''] });
  });

  it('what the form shows composes back to what was stored', () => {
    const page = fc.integer({ min: 1, max: 400 }).map(String);
    const own = fc.constantFrom('IMC 2021 section 307.2.2', 'Job specification 23 81 26, 2.4', 'Submittal sheet, rev. B');
    fc.assert(
      fc.property(fc.array(fc.oneof(page.map((p) => `${MANUAL}, p. ${p}`), fc.constant(MANUAL), own, fc.constant('')), { minLength: 2, maxLength: 11 }), (stored) => {
        const { manual, perLimit } = splitLimitSources(stored);
        return perLimit.every((text, i) => (stored[i]!.trim() === '' ? text === '' : limitSource(manual, text) === stored[i]));
      }),
    );
  });
});
