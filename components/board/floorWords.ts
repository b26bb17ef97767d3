/**
 * The building view's words for one floor: its readiness, its open findings by severity, and the
 * systems on it that need attention. Pure functions, so the screen and its tests say the same.
 */
import type { BoardLevelRow, FloorSystem } from '../../shared/schemas/board';
import type { Severity } from '../../shared/words';

export interface FloorReadiness {
  words: string;
  /** Supports the words on the band's edge: never the only signal. */
  tone: 'ready' | 'blocked' | 'waiting' | 'none';
}

/**
 * "no units yet", "not inspected yet", "ready to close ceilings", "no ceilings to close", or what
 * holds the ceilings: "3 blocking · 2 test records · 5 units to check". Blocking findings and
 * test records are what the readiness screen lists; unchecked units are in or above the ceiling.
 */
export function floorReadiness(row: BoardLevelRow): FloorReadiness {
  if (row.unitsTotal === 0) return { words: 'no units yet', tone: 'none' };
  if (row.unitsChecked === 0 && row.total === 0 && row.ceilingState !== 'ready') return { words: 'not inspected yet', tone: 'none' };
  if (row.ceilingState === 'ready') return { words: 'ready to close ceilings', tone: 'ready' };
  if (row.ceilingState === 'no_ceiling_units') return { words: 'no ceilings to close', tone: 'none' };
  const parts = [
    row.ceilingBlockers > 0 ? `${row.ceilingBlockers} blocking` : null,
    row.ceilingTestBlockers > 0 ? `${row.ceilingTestBlockers} test record${row.ceilingTestBlockers === 1 ? '' : 's'}` : null,
    row.ceilingUnitsUnchecked > 0 ? `${row.ceilingUnitsUnchecked} unit${row.ceilingUnitsUnchecked === 1 ? '' : 's'} to check` : null,
  ].filter((p): p is string => p !== null);
  if (parts.length === 0) return { words: 'not ready to close ceilings', tone: 'blocked' };
  // Only units left to check: work in progress rather than something wrong.
  const onlyUnchecked = row.ceilingBlockers === 0 && row.ceilingTestBlockers === 0;
  return { words: parts.join(' · '), tone: onlyUnchecked ? 'waiting' : 'blocked' };
}

/** Open findings (status open) by severity, worst first, leaving out the severities with none. */
export function openBySeverity(row: Pick<BoardLevelRow, 'open' | 'openCritical' | 'openMajor'>): Array<{ severity: Severity; count: number }> {
  const minor = Math.max(0, row.open - row.openCritical - row.openMajor);
  return (
    [
      { severity: 'critical', count: row.openCritical },
      { severity: 'major', count: row.openMajor },
      { severity: 'minor', count: minor },
    ] as Array<{ severity: Severity; count: number }>
  ).filter((c) => c.count > 0);
}

export interface FloorSystemNote {
  systemId: string;
  kind: 'refrigerant' | 'records';
  words: string;
}

/** The systems on a floor that need attention: over the refrigerant limit first, then those whose start-up waits for records. */
export function floorSystemNotes(systems: FloorSystem[]): FloorSystemNote[] {
  const over = systems
    .filter((s) => s.refrigerant === 'over_limit')
    .map((s) => ({ systemId: s.systemId, kind: 'refrigerant' as const, words: `${s.name}: over its refrigerant limit` }));
  const waiting = systems
    .filter((s) => s.recordsWaiting > 0)
    .map((s) => ({
      systemId: s.systemId,
      kind: 'records' as const,
      words: `${s.name}: start-up waits for ${s.recordsWaiting} test record${s.recordsWaiting === 1 ? '' : 's'}`,
    }));
  return [...over, ...waiting];
}
