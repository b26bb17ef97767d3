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
