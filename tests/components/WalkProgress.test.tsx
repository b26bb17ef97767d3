/**
 * The open walk's banner: what the walk recorded, in the level's words.
 */
import { walkProgress } from '../../components/walk/walkProgress';

describe('walkProgress', () => {
  it('says a unit is in progress once a finding is logged from its check, before the check is saved', () => {
    expect(walkProgress({ unitsChecked: 0, unitsInProgress: 1, findingCount: 1 })).toBe('1 unit in progress · 1 finding logged');
  });

  it('names each count in the singular or plural and leaves out the zero ones', () => {
    expect(walkProgress({ unitsChecked: 3, unitsInProgress: 0, findingCount: 2 })).toBe('3 units checked · 2 findings logged');
    expect(walkProgress({ unitsChecked: 1, unitsInProgress: 2, findingCount: 0 })).toBe('1 unit checked · 2 units in progress');
  });

  it('says nothing is recorded yet rather than "0 unit checks"', () => {
    expect(walkProgress({ unitsChecked: 0, unitsInProgress: 0, findingCount: 0 })).toBe('nothing recorded yet');
  });
});
