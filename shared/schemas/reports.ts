/**
 * PDF reports (docs/api-reports.md). Every path is under /api/jobs/:jobId:
 *   GET  /reports/close-out.pdf?levelId=&systemId=&companyId=   the close-out report, at once (small scopes)
 *   GET  /reports/crew-list.pdf?companyId=&levelId=  (or walkId) one company's unresolved findings, printed
 *   GET  /units/:unitId/sheet.pdf                                 one unit's history
 *   POST /reports  { kind: 'close-out', levelId?, systemId?, companyId? } → 202 ReportRunDto (built in the background)
 *   GET  /reports/:reportId                                       ReportRunDto: progress, then `download`
 *   GET  /reports/:reportId/report.pdf                            the built file (whoever asked for it, 7 days)
 */
import { z } from 'zod';
import { id } from './fields';
import './plainWords';

/**
 * Above either figure a close-out report is built in the background (POST /reports): a browser
 * waiting minutes on one download is a download that fails on a phone.
 */
export const REPORT_DIRECT_MAX = { findings: 200, photos: 100 } as const;
/** A built report is kept this long in the photo store, then removed. */
export const REPORT_KEEP_DAYS = 7;

const scopeFields = {
  levelId: id('level id').optional(),
  systemId: id('system id').optional(),
  companyId: id('company id').optional(),
};

export const closeOutQuerySchema = z.object(scopeFields).strict();
export type CloseOutQuery = z.infer<typeof closeOutQuerySchema>;

const CREW_WHERE = 'Name a level or a walk (one of them).';
export const crewListQuerySchema = z
  .object({ companyId: id('company id').optional(), levelId: id('level id').optional(), walkId: id('walk id').optional() })
  .strict()
  .superRefine((q, ctx) => {
    if (!q.levelId === !q.walkId) {
      ctx.addIssue({ code: 'custom', path: [q.levelId ? 'walkId' : 'levelId'], message: CREW_WHERE });
    }
  });
export type CrewListQuery = z.infer<typeof crewListQuerySchema>;

export const REPORT_KINDS = ['close-out'] as const;
export type ReportKind = (typeof REPORT_KINDS)[number];

export const createReportSchema = z
  .object({ kind: z.enum(REPORT_KINDS, { error: 'Choose a report: close-out.' }), ...scopeFields })
  .strict();
export type CreateReportBody = z.infer<typeof createReportSchema>;

export const reportParamsSchema = z.object({ jobId: id('job id'), reportId: id('report id') }).strict();
export const noReportQuerySchema = z.object({}).strict();

export const REPORT_RUN_STATUSES = ['queued', 'running', 'done', 'failed'] as const;
export type ReportRunStatus = (typeof REPORT_RUN_STATUSES)[number];

export interface ReportRunDto {
  id: string;
  jobId: string;
  kind: ReportKind;
  status: ReportRunStatus;
  /** What the report covers, in words ("Level 3, company Northline Mechanical"). */
  scopeLabel: string;
  findingsTotal: number;
  findingsDone: number;
  photosTotal: number;
  /** ISO 8601 */
  createdAt: string;
  finishedAt: string | null;
  /** When the built file is removed (ISO 8601), once done. */
  expiresAt: string | null;
  /** API path of the file once done (same origin; the session decides who may have it). */
  download: string | null;
  byteSize: number | null;
  /** Why it failed, in plain words. */
  message: string | null;
}

/** "Building report: 340 of 1,200 findings" and the other states, one wording for screen and tests. */
export function reportProgressText(run: Pick<ReportRunDto, 'status' | 'findingsDone' | 'findingsTotal'>): string {
  const n = (x: number) => x.toLocaleString('en-US');
  switch (run.status) {
    case 'queued':
      return `Waiting to start: ${n(run.findingsTotal)} findings`;
    case 'running':
      return `Building report: ${n(run.findingsDone)} of ${n(run.findingsTotal)} findings`;
    case 'done':
      return `Report ready: ${n(run.findingsTotal)} findings`;
    case 'failed':
      return 'The report could not be built';
  }
}
