/**
 * The due date of a finding logged now: today in the job's time zone plus the job's days for the
 * severity (default critical 2, major 7, minor 14: common practice, set per job). The form shows
 * it before saving and the server stores it when the body names no date.
 */
import { DEFAULT_SEVERITY_DUE_DAYS, type SeverityDueDays } from '../schemas/setup';
import type { Severity } from '../words';
import { addDays, todayIn } from './dates';

export interface DuePolicy {
  timeZone: string;
  /** The job's days per severity; missing severities take the defaults. */
  severityDueDays?: Partial<SeverityDueDays> | null;
}

/** Days to fix a finding of this severity on this job. */
export function daysToFix(job: Pick<DuePolicy, 'severityDueDays'>, severity: Severity): number {
  return { ...DEFAULT_SEVERITY_DUE_DAYS, ...(job.severityDueDays ?? {}) }[severity];
}

export function dueOnFor(job: DuePolicy, severity: Severity, now: Date = new Date()): string {
  return addDays(todayIn(job.timeZone || 'UTC', now), daysToFix(job, severity));
}

/**
 * Overdue: the subcontractor still owes the work and its due date has passed in the job's time
 * zone. Only an open finding (new or returned) can be overdue: a fix waiting for re-inspection
 * waits on the inspector, not on the company, and closed or voided findings owe nothing.
 */
export const OVERDUE_STATUSES = ['open'] as const;

export function isOverdue(finding: { status: string; dueOn: string }, today: string): boolean {
  return (OVERDUE_STATUSES as readonly string[]).includes(finding.status) && finding.dueOn < today;
}
