/**
 * The board's counts: their names, the findings list filters behind each, and coverage. The
 * addresses themselves come from components/links.ts.
 */
import type { BoardCounts } from '../../shared/schemas/board';
import type { FindingLinkFilters } from '../links';

/** The board's count columns that open the findings list (coverage is a fraction, not a list). */
export type BoardCountKey = 'open' | 'openCritical' | 'openMajor' | 'fixSubmitted' | 'closed' | 'overdue';

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
  overdue: 'Overdue',
};

/** "12 of 20 units checked" and the share (0..1; 0 for a level without units). */
export function coverage(c: Pick<BoardCounts, 'unitsChecked' | 'unitsTotal'>): { share: number; text: string } {
  const share = c.unitsTotal > 0 ? c.unitsChecked / c.unitsTotal : 0;
  return { share, text: `${c.unitsChecked} of ${c.unitsTotal}` };
}

export function percent(share: number): string {
  return `${Math.round(share * 100)}%`;
}
