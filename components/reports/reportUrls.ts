/**
 * Addresses of the PDF reports. API paths (same origin, the session cookie goes along), built
 * beside jobPath like the CSV exports (components/api/exports.ts); the in-app page of a report
 * built in the background is links.report.
 */
import { jobPath, queryString } from '../api/lists';

export interface ReportPlace {
  levelId?: string;
  systemId?: string;
  companyId?: string;
}

export const reportUrls = {
  /** The close-out report at once (small scopes; the app asks through POST /reports instead). */
  closeOutPdf: (jobId: string, place: ReportPlace = {}): string => `${jobPath(jobId, 'reports', 'close-out.pdf')}${queryString({ ...place })}`,
  /** One company's unresolved findings on a level or a walk; a subcontractor's own company when none is given. */
  crewListPdf: (jobId: string, where: { companyId?: string; levelId?: string; walkId?: string }): string =>
    `${jobPath(jobId, 'reports', 'crew-list.pdf')}${queryString({ companyId: where.companyId, levelId: where.levelId, walkId: where.walkId })}`,
  unitSheetPdf: (jobId: string, unitId: string): string => jobPath(jobId, 'units', unitId, 'sheet.pdf'),
  reports: (jobId: string): string => jobPath(jobId, 'reports'),
  run: (jobId: string, reportId: string): string => jobPath(jobId, 'reports', reportId),
} as const;
