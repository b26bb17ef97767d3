/**
 * A signed-in person creates a job (someone with no job yet, or a GC manager: shared/rules/roles.ts):
 * owned by their company, they are its GC manager, their company
 * is on it (general trade), and its defect catalogue starts as a copy of the built-in one.
 * One transaction.
 */
import type { Transaction } from 'sequelize';
import type { CreateJobInput } from '../../shared/schemas/setup';
import { mayStartJob, START_JOB_REFUSED } from '../../shared/rules/roles';
import { forbidden } from '../errors';
import { Job, JobCompany, JobMember } from '../models';
import { copyBuiltinCatalogue } from '../services/catalogue';

export interface CreateJobContext {
  transaction: Transaction;
  /** Who creates it, and the company they act for. */
  actor: { id: string; companyId: string };
}

export async function createJob({ transaction, actor }: CreateJobContext, input: CreateJobInput & { number?: string | null; address?: string | null }): Promise<Job> {
  const roles = (await JobMember.findAll({ where: { userId: actor.id }, attributes: ['role'], transaction })).map((m) => m.role);
  if (!mayStartJob(roles)) throw forbidden(START_JOB_REFUSED, 'gc_manager_only');
  const job = await Job.create(
    {
      ownerCompanyId: actor.companyId,
      name: input.name,
      number: input.number ?? null,
      address: input.address ?? null,
      startsOn: input.startsOn ?? null,
      endsOn: input.endsOn ?? null,
      ...(input.timeZone ? { timeZone: input.timeZone } : {}),
      ...(input.unitSystem ? { unitSystem: input.unitSystem } : {}),
    },
    { transaction },
  );
  // The creator acts for their own company, the job's GC.
  await JobMember.create({ jobId: job.id, userId: actor.id, role: 'gc_manager', companyId: actor.companyId }, { transaction });
  await JobCompany.create({ jobId: job.id, companyId: actor.companyId, trades: ['general'] }, { transaction });
  await copyBuiltinCatalogue(job.id, transaction);
  return job;
}
