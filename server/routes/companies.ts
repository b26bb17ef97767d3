/**
 * Companies on a job, with the trades they cover there.
 * GET    /companies/known                        signed in; companies the caller's company already works with
 * GET    /jobs/:jobId/companies?trade=           all roles
 * POST   /jobs/:jobId/companies                  GC manager (Idempotency-Key); { companyId, trades } or { name, trades }
 * PATCH  /jobs/:jobId/companies/:companyId       GC manager (If-Match); { trades }
 * DELETE /jobs/:jobId/companies/:companyId       GC manager (If-Match); 409 for the owner or while members belong to it
 * Reads and writes: server/services/companies.ts; adding one: commands/addJobCompany.ts.
 */
import { Router } from 'express';
import type { z } from 'zod';
import { addJobCompanySchema, companyListQuerySchema, companyParamsSchema, updateJobCompanySchema } from '../../shared/schemas/setup';
import { addJobCompany } from '../commands/addJobCompany';
import { valid, validate } from '../middleware/validate';
import { policy } from '../policies';
import { presentJobCompany } from '../presenters/company';
import { changeJobCompany, knownCompanies, listJobCompanies, removeJobCompany } from '../services/companies';
import { idempotentWrite } from '../services/idempotency';
import { pageRequest } from '../services/paging';
import { inTransaction } from '../services/records';
import { setEtag } from '../services/versioning';

export function companiesRouter(): Router {
  const router = Router();

  router.get('/companies/known', policy.signedIn(), async (req, res) => {
    res.json({ items: await knownCompanies(req.user!.id, req.user!.companyId), nextCursor: null });
  });

  router.get('/jobs/:jobId/companies', policy.jobMember(), validate({ query: companyListQuerySchema }), async (req, res) => {
    const query = valid<z.infer<typeof companyListQuerySchema>>(req.valid.query);
    const page = pageRequest(req, { sort: 'name', value: 'text' });
    res.json(await listJobCompanies(req.membership!.job, query.trade, page));
  });

  router.post('/jobs/:jobId/companies', policy.jobMember(['gc_manager']), validate({ body: addJobCompanySchema }), async (req, res) => {
    const body = valid<z.infer<typeof addJobCompanySchema>>(req.valid.body);
    const job = req.membership!.job;
    await idempotentWrite(req, res, async (transaction) => {
      const { link, company } = await addJobCompany({ transaction, job, actor: req.user! }, body);
      setEtag(res, link.version);
      return { status: 201, body: presentJobCompany(link, company, { isOwner: company.id === job.ownerCompanyId, memberCount: 0 }) };
    });
  });

  router.patch(
    '/jobs/:jobId/companies/:companyId',
    policy.jobMember(['gc_manager']),
    validate({ params: companyParamsSchema, body: updateJobCompanySchema }),
    async (req, res) => {
      const { companyId } = valid<z.infer<typeof companyParamsSchema>>(req.valid.params);
      const body = valid<z.infer<typeof updateJobCompanySchema>>(req.valid.body);
      const dto = await inTransaction(req, (transaction) =>
        changeJobCompany({ transaction, job: req.membership!.job, ifMatch: req.get('if-match') }, companyId, body),
      );
      setEtag(res, dto.version);
      res.json(dto);
    },
  );

  router.delete('/jobs/:jobId/companies/:companyId', policy.jobMember(['gc_manager']), validate({ params: companyParamsSchema }), async (req, res) => {
    const { companyId } = valid<z.infer<typeof companyParamsSchema>>(req.valid.params);
    await inTransaction(req, (transaction) => removeJobCompany({ transaction, job: req.membership!.job, ifMatch: req.get('if-match') }, companyId));
    res.status(204).end();
  });

  return router;
}
