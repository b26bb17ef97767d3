/**
 * When a level's ceilings can close. Closing a ceiling hides what is above it, so every indoor
 * unit that sits in or above the ceiling must have been checked first (or been excluded from the
 * rule by a GC manager, with a reason), and no unresolved finding may still need access above it.
 * (Which kinds sit in or above the ceiling: common practice for these kinds; a cassette is set
 * into the ceiling grid, a ducted unit hangs above it.)
 *
 *   no_ceiling_units  the level has no unit of those kinds: there is nothing to judge, and the
 *                     screens say so instead of "can close"
 *   blocked           a unit of those kinds has no complete unit check and is not excluded, or a
 *                     finding blocks
 *   ready             every such unit is checked or excluded and no unresolved finding needs the access
 */
import type { UnitKindKey } from '../words';

export const CEILING_UNIT_KINDS: readonly UnitKindKey[] = ['cassette_4way', 'cassette_2way', 'cassette_compact', 'ducted_low', 'ducted_high', 'ducted_very_high'];

export function isCeilingUnitKind(kind: string): boolean {
  return (CEILING_UNIT_KINDS as readonly string[]).includes(kind);
}

export type CeilingState = 'ready' | 'blocked' | 'no_ceiling_units';

/**
 * How one unit stands under the rule. A complete unit check wins over an exclusion (the unit was
 * looked at after all); an excluded unit without one is not counted as unchecked. The server's SQL
 * (services/board/levels.ts, readiness.ts) counts the same way; the board tests check it against this.
 */
export type CeilingUnitStanding = 'not_in_ceiling' | 'checked' | 'excluded' | 'unchecked';

export function ceilingUnitStanding(unit: { kind: string; checked: boolean; excluded: boolean }): CeilingUnitStanding {
  if (!isCeilingUnitKind(unit.kind)) return 'not_in_ceiling';
  if (unit.checked) return 'checked';
  return unit.excluded ? 'excluded' : 'unchecked';
}

export interface CeilingFacts {
  /** Units on the level that sit in or above the ceiling. */
  ceilingUnits: number;
  /** Of those, the ones whose latest unit check is not complete (or that have none) and that are not excluded. */
  ceilingUnitsUnchecked: number;
  /** Unresolved findings on the level whose defect type needs access above the ceiling. */
  blockers: number;
}

export function ceilingState(f: CeilingFacts): CeilingState {
  if (f.ceilingUnits === 0 && f.blockers === 0) return 'no_ceiling_units';
  return f.ceilingUnitsUnchecked === 0 && f.blockers === 0 ? 'ready' : 'blocked';
}

/** The facts of one level from its units (each with its standing) and its blocking findings. */
export function ceilingFactsOf(units: readonly { kind: string; checked: boolean; excluded: boolean }[], blockers: number): CeilingFacts & { ceilingUnitsExcluded: number } {
  const standings = units.map(ceilingUnitStanding);
  return {
    ceilingUnits: standings.filter((s) => s !== 'not_in_ceiling').length,
    ceilingUnitsUnchecked: standings.filter((s) => s === 'unchecked').length,
    ceilingUnitsExcluded: standings.filter((s) => s === 'excluded').length,
    blockers,
  };
}
