/**
 * Puts a company on a job with the trades it covers there: one the GC already works with (by id),
 * or a new company (by name). One transaction: the company (when new) and the job's link to it.
 */
import type { Transaction } from 'sequelize';
import type { AddJobCompanyInput } from '../../shared/schemas/setup';
import { conflict, notFound } from '../errors';
import { Company, JobCompany, type Job } from '../models';
import { companyNameOnJob, knownCompanies } from '../services/companies';

export interface AddJobCompanyContext {
  transaction: Transaction;
  job: Job;
  /** The GC manager adding it: the companies they may pick are the ones their company works with. */
  actor: { id: string; companyId: string };
}

export async function addJobCompany({ transaction, job, actor }: AddJobCompanyContext, input: AddJobCompanyInput): Promise<{ link: JobCompany; company: Company }> {
  let company: Company;
  if ('companyId' in input) {
    const known = await knownCompanies(actor.id, actor.companyId, transaction);
    const found = known.some((c) => c.id === input.companyId) ? await Company.findByPk(input.companyId, { transaction }) : null;
    if (!found) throw notFound('Company not found.');
    company = found;
  } else {
    if (await companyNameOnJob(job.id, input.name, transaction)) throw conflict(`A company named "${input.name}" is already on this job.`, 'duplicate');
    company = await Company.create({ name: input.name }, { transaction });
  }
  if (await JobCompany.findOne({ where: { jobId: job.id, companyId: company.id }, transaction })) {
    throw conflict(`${company.name} is already on this job.`, 'duplicate');
  }
  const link = await JobCompany.create({ jobId: job.id, companyId: company.id, trades: [...input.trades] }, { transaction });
  return { link, company };
}
