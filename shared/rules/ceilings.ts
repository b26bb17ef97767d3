/**
 * When a level's ceilings can close. Closing a ceiling hides what is above it, so every indoor
 * unit that sits in or above the ceiling must have been checked first, and no unresolved finding
 * may still need access above it. (Which kinds sit in or above the ceiling: common practice for
 * these kinds; a cassette is set into the ceiling grid, a ducted unit hangs above it.)
 *
 *   no_ceiling_units  the level has no unit of those kinds: there is nothing to judge, and the
 *                     screens say so instead of "can close"
 *   blocked           a unit of those kinds has no complete unit check, or a finding blocks
 *   ready             every such unit is checked and no unresolved finding needs the access
 */
import type { UnitKindKey } from '../words';

export const CEILING_UNIT_KINDS: readonly UnitKindKey[] = ['cassette_4way', 'cassette_2way', 'cassette_compact', 'ducted_low', 'ducted_high', 'ducted_very_high'];

export type CeilingState = 'ready' | 'blocked' | 'no_ceiling_units';

export interface CeilingFacts {
  /** Units on the level that sit in or above the ceiling. */
  ceilingUnits: number;
  /** Of those, the ones whose latest unit check is not complete (or that have none). */
  ceilingUnitsUnchecked: number;
  /** Unresolved findings on the level whose defect type needs access above the ceiling. */
  blockers: number;
}

export function ceilingState(f: CeilingFacts): CeilingState {
  if (f.ceilingUnits === 0 && f.blockers === 0) return 'no_ceiling_units';
  return f.ceilingUnitsUnchecked === 0 && f.blockers === 0 ? 'ready' : 'blocked';
}
