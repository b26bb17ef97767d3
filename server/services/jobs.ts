/** A job's details and settings (PATCH /jobs/:jobId). */
import type { Transaction } from 'sequelize';
import { JOB_SETTINGS } from '../../shared/catalogue/types';
import type { StatedLimitInput, UpdateJobInput } from '../../shared/schemas/setup';
import type { Role } from '../../shared/words';
import { badRequest } from '../errors';
import { Job } from '../models';
import { presentJobDetail } from '../presenters/job';
import { statedLimit } from './quantities';
import { mergeTestSettings } from './testRecords';
import { lockVersioned } from './records';

export interface JobWrite {
  transaction: Transaction;
  jobId: string;
  ifMatch?: string;
  /** The caller's role, for the current job sent with a 412. */
  role: Role;
}

/** Changes the job (If-Match); settings merge by key, null removes one. */
export async function changeJob(
  { transaction, jobId, ifMatch, role }: JobWrite,
  input: UpdateJobInput & { number?: string | null; address?: string | null },
): Promise<Job> {
  const job = await lockVersioned(Job, { id: jobId }, transaction, 'Job not found.', ifMatch, (j) => presentJobDetail(j, role));
  if (input.name !== undefined) job.name = input.name;
  if (input.number !== undefined) job.number = input.number;
  if (input.address !== undefined) job.address = input.address;
  if (input.startsOn !== undefined) job.startsOn = input.startsOn;
  if (input.endsOn !== undefined) job.endsOn = input.endsOn;
  if (job.startsOn && job.endsOn && job.startsOn > job.endsOn) {
    throw badRequest('endsOn: The end date is before the start date.', { endsOn: 'The end date is before the start date.' });
  }
  if (input.timeZone !== undefined) job.timeZone = input.timeZone;
  if (input.unitSystem !== undefined) job.unitSystem = input.unitSystem;
  if (input.codeEditions !== undefined) job.codeEditions = { ...input.codeEditions };
  if (input.severityDueDays !== undefined) job.severityDueDays = { ...input.severityDueDays };
  if (input.recurringThresholds !== undefined) job.recurringThresholds = { ...input.recurringThresholds };
  if (input.settings !== undefined) {
    const next = { ...(job.settings ?? {}) };
    for (const def of JOB_SETTINGS) {
      const entry = (input.settings as Record<string, StatedLimitInput | null | undefined>)[def.key];
      if (entry === undefined) continue;
      if (entry === null) delete next[def.key];
      else next[def.key] = statedLimit(entry, def.quantity, `settings.${def.key}.value`);
    }
    job.settings = next;
  }
  if (input.testSettings !== undefined) job.testSettings = mergeTestSettings(job.testSettings, input.testSettings);
  job.version += 1;
  await job.save({ transaction });
  return job;
}
