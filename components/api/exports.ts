/**
 * Addresses of the CSV exports. They are API paths (same origin, the session cookie goes along),
 * so they are built here beside jobPath, not in components/links.ts with the in-app routes. Each
 * takes its screen's own filters, so "Export" gives the rows on screen, every page of them.
 */
import type { FindingFilters } from '../queries/findings';
import type { UnitFilters } from '../queries/units';
import { jobPath, queryString } from './lists';

export const exportUrls = {
  findingsCsv: (jobId: string, filters: FindingFilters): string => `${jobPath(jobId, 'findings.csv')}${queryString({ ...filters })}`,
  scorecardsCsv: (jobId: string): string => jobPath(jobId, 'scorecards.csv'),
  /** The unit register, with the register screen's filters. */
  unitsCsv: (jobId: string, filters: UnitFilters = {}): string => `${jobPath(jobId, 'units.csv')}${queryString({ ...filters })}`,
  /** One sampling audit's report. */
  auditCsv: (jobId: string, auditId: string): string => jobPath(jobId, 'audits', `${auditId}.csv`),
} as const;
