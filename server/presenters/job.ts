/** A job → JobDetail (its settings with the defaults filled in). */
import { CODE_DOCUMENTS } from '../../shared/catalogue/types';
import { DEFAULT_EDITIONS } from '../../shared/calc/limits';
import { DEFAULT_RECURRING_THRESHOLDS, DEFAULT_SEVERITY_DUE_DAYS, type JobDetail } from '../../shared/schemas/setup';
import type { Role } from '../../shared/words';
import type { Job } from '../models';

export function presentJobDetail(job: Job, role: Role): JobDetail {
  const chosen = job.codeEditions ?? {};
  return {
    id: job.id,
    name: job.name,
    number: job.number ?? null,
    address: job.address ?? null,
    role,
    startsOn: job.startsOn ?? null,
    endsOn: job.endsOn ?? null,
    timeZone: job.timeZone,
    unitSystem: job.unitSystem,
    codeEditions: Object.fromEntries(CODE_DOCUMENTS.map((d) => [d, chosen[d] ?? DEFAULT_EDITIONS[d]])) as JobDetail['codeEditions'],
    severityDueDays: { ...DEFAULT_SEVERITY_DUE_DAYS, ...(job.severityDueDays ?? {}) },
    recurringThresholds: { ...DEFAULT_RECURRING_THRESHOLDS, ...(job.recurringThresholds ?? {}) },
    settings: job.settings ?? {},
    testSettings: job.testSettings ?? {},
    version: job.version,
  };
}
