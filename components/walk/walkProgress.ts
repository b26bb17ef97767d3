import type { WalkDto } from '../../shared/schemas/findings';

function count(n: number, one: string, many: string): string {
  return `${n} ${n === 1 ? one : many}`;
}

/**
 * What a walk has recorded so far, in the words of the level: "1 unit checked · 1 unit in progress ·
 * 2 findings logged". A finding logged from a unit's check before the check is saved makes that
 * unit "in progress", so the banner never says "0 unit checks" after work was done.
 */
export function walkProgress(walk: Pick<WalkDto, 'unitsChecked' | 'unitsInProgress' | 'findingCount'>): string {
  const parts = [
    walk.unitsChecked > 0 ? count(walk.unitsChecked, 'unit checked', 'units checked') : null,
    walk.unitsInProgress > 0 ? count(walk.unitsInProgress, 'unit in progress', 'units in progress') : null,
    walk.findingCount > 0 ? count(walk.findingCount, 'finding logged', 'findings logged') : null,
  ].filter((p): p is string => p !== null);
  return parts.length > 0 ? parts.join(' · ') : 'nothing recorded yet';
}
