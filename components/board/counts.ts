/**
 * The board's counts: their names, the findings list filters behind each, and coverage. The
 * addresses themselves come from components/links.ts.
 */
import type { BoardCounts } from '../../shared/schemas/board';
import type { FindingLinkFilters } from '../links';

/** The board's count columns that open the findings list (coverage is a fraction, not a list). */
export type BoardCountKey = 'open' | 'openCritical' | 'openMajor' | 'fixSubmitted' | 'closed' | 'total' | 'overdue';

/**
 * Which findings stand behind each board count, as the findings list filters them. The same
 * words as the contract: "open" is status open; "overdue" is unresolved and past due (the
 * list's `overdue` filter means exactly that, whatever the status filter).
 */
export const BOARD_CELL_FILTERS: Record<BoardCountKey, FindingLinkFilters> = {
  open: { status: 'open' },
  openCritical: { status: 'open', severity: 'critical' },
  openMajor: { status: 'open', severity: 'major' },
  fixSubmitted: { status: 'fix_submitted' },
  closed: { status: 'closed' },
  // The three statuses the total partitions: the list without a status filter would add voided ones.
  total: { status: 'open,fix_submitted,closed' },
  overdue: { overdue: true },
};

/** The findings list filters behind one cell of the board: a level's row (levelId) or the totals (none). */
export function boardCellFilters(key: BoardCountKey, levelId?: string): FindingLinkFilters {
  return { levelId, ...BOARD_CELL_FILTERS[key] };
}

/** The numbers a cell shows, for words and links. */
export const COUNT_LABELS: Record<BoardCountKey, string> = {
  open: 'Open',
  openCritical: 'Critical open',
  openMajor: 'Major open',
  fixSubmitted: 'Fix submitted',
  closed: 'Closed',
  total: 'Total',
  overdue: 'Overdue',
};

/**
 * Overdue as a share of the open findings (new or returned), never a status beside them: only an
 * open finding can be overdue (a fix waiting for re-inspection waits on the inspector).
 * "2 of 5 overdue", and the same in words for a screen reader.
 */
export function overdueShare(c: Pick<BoardCounts, 'overdue' | 'open'>, place: string): { text: string; label: string } {
  const noun = c.open === 1 ? 'open finding' : 'open findings';
  return { text: `${c.overdue} of ${c.open} overdue`, label: `${c.overdue} of ${c.open} overdue — ${noun} on ${place}. Show the overdue findings.` };
}

/** "12 of 20 units checked" and the share (0..1; 0 for a level without units). */
export function coverage(c: Pick<BoardCounts, 'unitsChecked' | 'unitsTotal'>): { share: number; text: string } {
  const share = c.unitsTotal > 0 ? c.unitsChecked / c.unitsTotal : 0;
  return { share, text: `${c.unitsChecked} of ${c.unitsTotal}` };
}

export function percent(share: number): string {
  return `${Math.round(share * 100)}%`;
}
