/**
 * The address of a unit label sheet (GET /api/jobs/:jobId/labels.pdf). An API path like the CSV
 * exports (the session cookie goes along), with the sheet's defaults left to the server.
 */
import { jobPath, queryString } from '../api/lists';

export type LabelSelection = { levelId: string } | { systemId: string } | { unitIds: readonly string[] };

export function unitLabelsUrl(jobId: string, selection: LabelSelection, page?: 'a4' | 'letter'): string {
  const which = 'unitIds' in selection ? { unitIds: selection.unitIds.join(',') } : selection;
  return `${jobPath(jobId, 'labels.pdf')}${queryString({ ...which, page })}`;
}
