import type { Href } from 'expo-router';
import type { BoardCounts } from '../../shared/schemas/board';
import type { FindingStatus, Severity } from '../../shared/words';

/** The board's count columns that open the findings list (coverage is a fraction, not a list). */
export type BoardCountKey = 'open' | 'openCritical' | 'openMajor' | 'fixSubmitted' | 'closed' | 'overdue';

/** The findings list's address filters (read by app/(app)/jobs/[jobId]/findings/index.tsx). */
export interface FindingLinkFilters {
  levelId?: string;
  unitId?: string;
  companyId?: string;
  catalogueItemId?: string;
  status?: FindingStatus | string;
  severity?: Severity | string;
  overdue?: boolean;
}

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

export function jobBase(jobId: string): string {
  return `/jobs/${encodeURIComponent(jobId)}`;
}

/** The findings list, already filtered. Keys in a fixed order so a link reads the same each time. */
export function findingsHref(jobId: string, filters: FindingLinkFilters): Href {
  const order: (keyof FindingLinkFilters)[] = ['levelId', 'unitId', 'companyId', 'catalogueItemId', 'status', 'severity', 'overdue'];
  const parts = order
    .filter((k) => filters[k] !== undefined && filters[k] !== '' && filters[k] !== false)
    .map((k) => `${k}=${encodeURIComponent(String(filters[k]))}`);
  return `${jobBase(jobId)}/findings${parts.length ? `?${parts.join('&')}` : ''}` as Href;
}

/** The link behind one cell of the board: a level's row (levelId) or the totals (none). */
export function boardCellHref(jobId: string, key: BoardCountKey, levelId?: string): Href {
  return findingsHref(jobId, { levelId, ...BOARD_CELL_FILTERS[key] });
}

export function levelHref(jobId: string, levelId: string, rest = ''): Href {
  return `${jobBase(jobId)}/levels/${encodeURIComponent(levelId)}${rest}` as Href;
}

export function boardHref(jobId: string, rest = ''): Href {
  return `${jobBase(jobId)}/board${rest}` as Href;
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
