/** Companies on a job, with the trades they cover there: reads and the writes of routes/companies.ts. */
import { Op, QueryTypes, type Transaction } from 'sequelize';
import type { JobCompanyDto, KnownCompanyDto, UpdateJobCompanyInput } from '../../shared/schemas/setup';
import type { TradeKey } from '../../shared/words';
import { conflict, notFound } from '../errors';
import { Company, JobCompany, type Job } from '../models';
import { presentJobCompany } from '../presenters/company';
import type { PageRequest } from './paging';
import { destroyOrConflict, lockVersioned, refuseIfReferenced } from './records';

/** Members of the job acting for each company (the membership's company, not the person's home company). */
export async function memberCounts(jobId: string, companyIds: string[], transaction?: Transaction): Promise<Map<string, number>> {
  if (companyIds.length === 0) return new Map();
  const rows = await JobCompany.sequelize!.query<{ company_id: string; n: string }>(
    `SELECT m.company_id, count(*) AS n FROM job_members m
      WHERE m.job_id = $1 AND m.company_id = ANY($2::uuid[]) GROUP BY m.company_id`,
    { bind: [jobId, companyIds], type: QueryTypes.SELECT, transaction },
  );
  return new Map(rows.map((r) => [r.company_id, Number(r.n)]));
}

async function presentLinks(job: Job, links: JobCompany[], transaction?: Transaction): Promise<JobCompanyDto[]> {
  const counts = await memberCounts(job.id, links.map((l) => l.companyId), transaction);
  return links.map((l) =>
    presentJobCompany(l, l.company!, { isOwner: l.companyId === job.ownerCompanyId, memberCount: counts.get(l.companyId) ?? 0 }),
  );
}

/** One company of the job as the set-up screen shows it, or 404. */
export async function jobCompanyDto(job: Job, companyId: string, transaction?: Transaction): Promise<JobCompanyDto> {
  const link = await JobCompany.findOne({ where: { jobId: job.id, companyId }, include: [{ model: Company, as: 'company' }], transaction });
  if (!link) throw notFound('Company not found on this job.');
  return (await presentLinks(job, [link], transaction))[0]!;
}

/** Companies the user's company works with: its own, and every company on a job the user manages. */
export async function knownCompanies(userId: string, ownCompanyId: string, transaction?: Transaction): Promise<KnownCompanyDto[]> {
  const rows = await Company.sequelize!.query<{ id: string; name: string }>(
    `SELECT c.id, c.name FROM companies c WHERE c.id = $2
     UNION
     SELECT c.id, c.name FROM companies c
       JOIN job_companies jc ON jc.company_id = c.id
       JOIN job_members m ON m.job_id = jc.job_id AND m.user_id = $1 AND m.role = 'gc_manager'
     ORDER BY name, id`,
    { bind: [userId, ownCompanyId], type: QueryTypes.SELECT, transaction },
  );
  return rows.map((r) => ({ id: r.id, name: r.name }));
}

/** True when a company with this name (any case) is already on the job. */
export async function companyNameOnJob(jobId: string, name: string, transaction: Transaction): Promise<boolean> {
  const rows = await Company.sequelize!.query<{ id: string }>(
    `SELECT c.id FROM job_companies jc JOIN companies c ON c.id = jc.company_id WHERE jc.job_id = $1 AND lower(c.name) = lower($2)`,
    { bind: [jobId, name], type: QueryTypes.SELECT, transaction },
  );
  return rows.length > 0;
}

export async function listJobCompanies(job: Job, trade: TradeKey | undefined, page: PageRequest): Promise<{ items: JobCompanyDto[]; nextCursor: string | null }> {
  const after = page.after
    ? { [Op.or]: [{ '$company.name$': { [Op.gt]: page.after.value } }, { '$company.name$': page.after.value, companyId: { [Op.gt]: page.after.id } }] }
    : {};
  const rows = await JobCompany.findAll({
    where: { jobId: job.id, ...(trade ? { trades: { [Op.contains]: [trade] } } : {}), ...after },
    include: [{ model: Company, as: 'company', required: true }],
    order: [[{ model: Company, as: 'company' }, 'name', 'ASC'], ['companyId', 'ASC']],
    limit: page.limit + 1,
  });
  const more = rows.length > page.limit;
  const links = more ? rows.slice(0, page.limit) : rows;
  const last = links[links.length - 1];
  const nextCursor = more && last ? page.cursorAfter(last.company!.name, last.companyId) : null;
  return { items: await presentLinks(job, links), nextCursor };
}

export interface JobCompanyWrite {
  transaction: Transaction;
  job: Job;
  ifMatch?: string;
}

/** Changes the trades a company covers on the job (If-Match). */
export async function changeJobCompany({ transaction, job, ifMatch }: JobCompanyWrite, companyId: string, input: UpdateJobCompanyInput): Promise<JobCompanyDto> {
  const link = await lockVersioned(JobCompany, { jobId: job.id, companyId }, transaction, 'Company not found on this job.', ifMatch, () =>
    jobCompanyDto(job, companyId, transaction),
  );
  link.trades = [...input.trades];
  link.version += 1;
  await link.save({ transaction });
  return jobCompanyDto(job, companyId, transaction);
}

/** Takes a company off the job: never the job's GC, never while members act for it (409). */
export async function removeJobCompany({ transaction, job, ifMatch }: JobCompanyWrite, companyId: string): Promise<void> {
  const link = await lockVersioned(JobCompany, { jobId: job.id, companyId }, transaction, 'Company not found on this job.', ifMatch, () =>
    jobCompanyDto(job, companyId, transaction),
  );
  const company = await Company.findByPk(companyId, { transaction });
  const name = company?.name ?? 'This company';
  if (companyId === job.ownerCompanyId) {
    throw conflict(`${name} runs this job (its GC): it cannot be removed from it.`, 'referenced');
  }
  const members = (await memberCounts(job.id, [companyId], transaction)).get(companyId) ?? 0;
  refuseIfReferenced(name, [[members, 'member on this job', 'members on this job']], 'Remove those members first.');
  await destroyOrConflict(link, transaction, name);
}
