import type { CompanyScorecard } from '../../shared/schemas/board';

export const SCORECARD_KEYS = ['name', 'open', 'overdue', 'fixesWaiting', 'medianDaysToAccept', 'firstPassRate', 'returns'] as const;
export type ScorecardKey = (typeof SCORECARD_KEYS)[number];
export interface ScorecardSort {
  key: ScorecardKey;
  dir: 'asc' | 'desc';
}

/** Holding the job up first: most overdue. */
export const DEFAULT_SCORECARD_SORT: ScorecardSort = { key: 'overdue', dir: 'desc' };

/** A new column sorts names A→Z and numbers largest first; the same column again turns the order round. */
export function nextSort(now: ScorecardSort, key: ScorecardKey): ScorecardSort {
  if (now.key === key) return { key, dir: now.dir === 'asc' ? 'desc' : 'asc' };
  return { key, dir: key === 'name' ? 'asc' : 'desc' };
}

/** Sorted copy; a company without a value (nothing accepted yet) goes last either way; ties by name. */
export function sortScorecards(rows: readonly CompanyScorecard[], sort: ScorecardSort): CompanyScorecard[] {
  const sign = sort.dir === 'asc' ? 1 : -1;
  return [...rows].sort((a, b) => {
    const byName = a.name.localeCompare(b.name);
    if (sort.key === 'name') return sign * byName || a.companyId.localeCompare(b.companyId);
    const va = a[sort.key];
    const vb = b[sort.key];
    if (va === null && vb === null) return byName;
    if (va === null) return 1;
    if (vb === null) return -1;
    return sign * (va - vb) || byName;
  });
}
