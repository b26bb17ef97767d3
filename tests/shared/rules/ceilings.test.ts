/**
 * The ceiling rule (shared/rules/ceilings.ts): a unit in or above the ceiling holds the level's
 * ceilings open until it has a complete unit check, unless a GC manager excluded it with a reason.
 * Which kinds sit in or above the ceiling is common practice (a cassette is set into the ceiling
 * grid, a ducted unit hangs above it); the rest is the product's own rule.
 */
import { ceilingFactsOf, ceilingState, ceilingUnitStanding, isCeilingUnitKind } from '../../../shared/rules/ceilings';

describe('ceilingUnitStanding', () => {
  it.each([
    ['cassette_4way', false, false, 'unchecked'],
    ['cassette_4way', false, true, 'excluded'],
    // A complete check wins over an exclusion: the unit was looked at after all.
    ['ducted_high', true, true, 'checked'],
    ['ducted_low', true, false, 'checked'],
    // A wall-mounted unit hangs below the ceiling: the rule does not count it, excluded or not.
    ['wall_mounted', false, true, 'not_in_ceiling'],
    ['floor_console', false, false, 'not_in_ceiling'],
  ] as const)('%s checked=%s excluded=%s is %s', (kind, checked, excluded, standing) => {
    expect(ceilingUnitStanding({ kind, checked, excluded })).toBe(standing);
  });

  it('knows the ceiling kinds', () => {
    expect(isCeilingUnitKind('cassette_compact')).toBe(true);
    expect(isCeilingUnitKind('wall_mounted')).toBe(false);
  });
});

describe('ceilingFactsOf and ceilingState', () => {
  const unit = (kind: string, checked: boolean, excluded = false) => ({ kind, checked, excluded });

  it('an excluded unit does not count as unchecked: the ceilings can close', () => {
    const facts = ceilingFactsOf([unit('cassette_4way', true), unit('cassette_4way', false, true), unit('wall_mounted', false)], 0);
    expect(facts).toEqual({ ceilingUnits: 2, ceilingUnitsUnchecked: 0, ceilingUnitsExcluded: 1, blockers: 0 });
    expect(ceilingState(facts)).toBe('ready');
  });

  it('counted again, the same unit holds them open', () => {
    const facts = ceilingFactsOf([unit('cassette_4way', true), unit('cassette_4way', false, false)], 0);
    expect(facts).toMatchObject({ ceilingUnitsUnchecked: 1, ceilingUnitsExcluded: 0 });
    expect(ceilingState(facts)).toBe('blocked');
  });

  it('an exclusion never lifts a finding that needs access above the ceiling', () => {
    expect(ceilingState(ceilingFactsOf([unit('ducted_low', false, true)], 1))).toBe('blocked');
  });

  it('a level with only units below the ceiling has nothing to close', () => {
    expect(ceilingState(ceilingFactsOf([unit('wall_mounted', false, true)], 0))).toBe('no_ceiling_units');
  });
});
