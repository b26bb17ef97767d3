/**
 * Addresses of the CSV exports for the screens. findings.csv takes the findings list's own
 * filters (the list's state, so "Export" gives the rows on screen, every page of them).
 */
import { jobPath, queryString } from '../api/lists';
import type { FindingFilters } from '../queries/findings';

export function findingsCsvHref(jobId: string, filters: FindingFilters): string {
  return `${jobPath(jobId, 'findings.csv')}${queryString({ ...filters })}`;
}

export function scorecardsCsvHref(jobId: string): string {
  return jobPath(jobId, 'scorecards.csv');
}
