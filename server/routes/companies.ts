/**
 * Companies on a job, with the trades they cover there.
 * GET    /companies/known                        signed in; companies the caller's company already works with
 * GET    /jobs/:jobId/companies?trade=           all roles
 * POST   /jobs/:jobId/companies                  GC manager (Idempotency-Key); { companyId, trades } or { name, trades }
 * PATCH  /jobs/:jobId/companies/:companyId       GC manager (If-Match); { trades }
 * DELETE /jobs/:jobId/companies/:companyId       GC manager (If-Match); 409 for the owner or while members belong to it
 */
import { Router } from 'express';
import { Op, QueryTypes, type Transaction } from 'sequelize';
import {
  addJobCompanySchema,
  companyListQuerySchema,
  companyParamsSchema,
  updateJobCompanySchema,
  type AddJobCompanyInput,
  type JobCompanyDto,
  type KnownCompanyDto,
  type UpdateJobCompanyInput,
} from '../../shared/schemas/setup';
import type { TradeKey } from '../../shared/words';
import { conflict, notFound } from '../errors';
import { valid, validate } from '../middleware/validate';
import { Company, Job, JobCompany } from '../models';
import { policy } from '../policies';
import { presentJobCompany } from '../presenters/setup';
import { idempotentWrite } from '../services/idempotency';
import { pageRequest } from '../services/paging';
import { destroyOrConflict, inTransaction, lockForChange, refuseIfReferenced, sequelizeOf } from '../services/records';
import { setEtag } from '../services/versioning';

/** Members of the job acting for each company (the membership's company, not the person's home company). */
async function memberCounts(jobId: string, companyIds: string[], transaction?: Transaction): Promise<Map<string, number>> {
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

async function presentLink(job: Job, companyId: string, transaction?: Transaction): Promise<JobCompanyDto> {
  const link = await JobCompany.findOne({ where: { jobId: job.id, companyId }, include: [{ model: Company, as: 'company' }], transaction });
  if (!link) throw notFound('Company not found on this job.');
  return (await presentLinks(job, [link], transaction))[0]!;
}

/** Companies the user's company works with: its own, and every company on a job the user manages. */
async function knownCompanies(userId: string, ownCompanyId: string, transaction?: Transaction): Promise<KnownCompanyDto[]> {
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

export function companiesRouter(): Router {
  const router = Router();

  router.get('/companies/known', policy.signedIn(), async (req, res) => {
    res.json({ items: await knownCompanies(req.user!.id, req.user!.companyId), nextCursor: null });
  });

  router.get('/jobs/:jobId/companies', policy.jobMember(), validate({ query: companyListQuerySchema }), async (req, res) => {
    const query = valid<{ trade?: TradeKey; limit?: number; cursor?: string }>(req.valid.query);
    const page = pageRequest(req, { sort: 'name', value: 'text' });
    const job = req.membership!.job;
    const after = page.after
      ? { [Op.or]: [{ '$company.name$': { [Op.gt]: page.after.value } }, { '$company.name$': page.after.value, companyId: { [Op.gt]: page.after.id } }] }
      : {};
    const rows = await JobCompany.findAll({
      where: { jobId: job.id, ...(query.trade ? { trades: { [Op.contains]: [query.trade] } } : {}), ...after },
      include: [{ model: Company, as: 'company', required: true }],
      order: [[{ model: Company, as: 'company' }, 'name', 'ASC'], ['companyId', 'ASC']],
      limit: page.limit + 1,
    });
    const more = rows.length > page.limit;
    const links = more ? rows.slice(0, page.limit) : rows;
    const last = links[links.length - 1];
    const nextCursor = more && last ? page.cursorAfter(last.company!.name, last.companyId) : null;
    res.json({ items: await presentLinks(job, links), nextCursor });
  });

  router.post('/jobs/:jobId/companies', policy.jobMember(['gc_manager']), validate({ body: addJobCompanySchema }), async (req, res) => {
    const body = valid<AddJobCompanyInput>(req.valid.body);
    const job = req.membership!.job;
    await idempotentWrite(req, res, async (transaction) => {
      let company: Company;
      if ('companyId' in body) {
        const known = await knownCompanies(req.user!.id, req.user!.companyId, transaction);
        const found = known.some((c) => c.id === body.companyId) ? await Company.findByPk(body.companyId, { transaction }) : null;
        if (!found) throw notFound('Company not found.');
        company = found;
      } else {
        const sameName = await sequelizeOf(req).query<{ id: string }>(
          `SELECT c.id FROM job_companies jc JOIN companies c ON c.id = jc.company_id WHERE jc.job_id = $1 AND lower(c.name) = lower($2)`,
          { bind: [job.id, body.name], type: QueryTypes.SELECT, transaction },
        );
        if (sameName.length > 0) throw conflict(`A company named "${body.name}" is already on this job.`, 'duplicate');
        company = await Company.create({ name: body.name }, { transaction });
      }
      if (await JobCompany.findOne({ where: { jobId: job.id, companyId: company.id }, transaction })) {
        throw conflict(`${company.name} is already on this job.`, 'duplicate');
      }
      const link = await JobCompany.create({ jobId: job.id, companyId: company.id, trades: [...body.trades] }, { transaction });
      setEtag(res, link.version);
      return { status: 201, body: presentJobCompany(link, company, { isOwner: company.id === job.ownerCompanyId, memberCount: 0 }) };
    });
  });

  router.patch(
    '/jobs/:jobId/companies/:companyId',
    policy.jobMember(['gc_manager']),
    validate({ params: companyParamsSchema, body: updateJobCompanySchema }),
    async (req, res) => {
      const { companyId } = valid<{ companyId: string }>(req.valid.params);
      const body = valid<UpdateJobCompanyInput>(req.valid.body);
      const job = req.membership!.job;
      const dto = await inTransaction(req, async (transaction) => {
        const link = await lockForChange(req, JobCompany, { jobId: job.id, companyId }, transaction, 'Company not found on this job.', () =>
          presentLink(job, companyId, transaction),
        );
        link.trades = [...body.trades];
        link.version += 1;
        await link.save({ transaction });
        return presentLink(job, companyId, transaction);
      });
      setEtag(res, dto.version);
      res.json(dto);
    },
  );

  router.delete(
    '/jobs/:jobId/companies/:companyId',
    policy.jobMember(['gc_manager']),
    validate({ params: companyParamsSchema }),
    async (req, res) => {
      const { companyId } = valid<{ companyId: string }>(req.valid.params);
      const job = req.membership!.job;
      await inTransaction(req, async (transaction) => {
        const link = await lockForChange(req, JobCompany, { jobId: job.id, companyId }, transaction, 'Company not found on this job.', () =>
          presentLink(job, companyId, transaction),
        );
        const company = await Company.findByPk(companyId, { transaction });
        const name = company?.name ?? 'This company';
        if (companyId === job.ownerCompanyId) {
          throw conflict(`${name} runs this job (its GC): it cannot be removed from it.`, 'referenced');
        }
        const members = (await memberCounts(job.id, [companyId], transaction)).get(companyId) ?? 0;
        refuseIfReferenced(name, [[members, 'member on this job', 'members on this job']], 'Remove those members first.');
        await destroyOrConflict(link, transaction, name);
      });
      res.status(204).end();
    },
  );

  return router;
}
