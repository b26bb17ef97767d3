/**
 * Sampling audits (shared/schemas/audits.ts; the plans and the decision: shared/calc/sampling.ts).
 * GET  /jobs/:jobId/audits[?levelId=]      GC manager, inspector; with levelId the walk screens' unit marks
 * POST /jobs/:jobId/audits                 GC manager, inspector (Idempotency-Key) → 201; the lot is frozen now
 * GET  /jobs/:jobId/audits/:auditId.csv    GC manager, inspector; the audit report, cells neutralised; rate-limited
 * GET  /jobs/:jobId/audits/:auditId        GC manager, inspector → state and decision
 * Subcontractors are not shown audits: a sample's results count every company's findings.
 */
import { Router } from 'express';
import type { z } from 'zod';
import { auditListQuerySchema, auditParamsSchema, createAuditSchema, type AuditListResponse } from '../../shared/schemas/audits';
import { jobParamsSchema } from '../../shared/schemas/setup';
import { planAudit } from '../commands/planAudit';
import { valid, validate } from '../middleware/validate';
import { policy } from '../policies';
import { auditCsvRows, auditDetail, checkLevel, listAudits } from '../services/audits';
import { csvFileName, exportLimiter } from '../services/csvSafe';
import { sendRecordsAsCsv } from '../services/csvStream';
import { idempotentWrite } from '../services/idempotency';
import { sequelizeOf } from '../services/records';

const AUDIT_ROLES = ['gc_manager', 'inspector'] as const;

export function auditsRouter(): Router {
  const router = Router();

  router.get('/jobs/:jobId/audits', policy.jobMember(AUDIT_ROLES), validate({ params: jobParamsSchema, query: auditListQuerySchema }), async (req, res) => {
    const { levelId } = valid<z.infer<typeof auditListQuerySchema>>(req.valid.query);
    const db = { sequelize: sequelizeOf(req) };
    const jobId = req.membership!.job.id;
    if (levelId) await checkLevel(db, jobId, levelId);
    const body: AuditListResponse = { ...(await listAudits(db, jobId, levelId)), nextCursor: null };
    res.json(body);
  });

  router.post('/jobs/:jobId/audits', policy.jobMember(AUDIT_ROLES), validate({ params: jobParamsSchema, body: createAuditSchema }), async (req, res) => {
    const body = valid<z.output<typeof createAuditSchema>>(req.valid.body);
    await idempotentWrite(req, res, async (transaction) => {
      const detail = await planAudit(
        { sequelize: sequelizeOf(req), transaction, jobId: req.membership!.job.id, actorId: req.user!.id, clock: () => new Date() },
        body,
      );
      return { status: 201, body: detail };
    });
  });

  router.get('/jobs/:jobId/audits/:auditId.csv', policy.jobMember(AUDIT_ROLES), exportLimiter(), validate({ params: auditParamsSchema }), async (req, res) => {
    const { auditId } = valid<z.infer<typeof auditParamsSchema>>(req.valid.params);
    const { job } = req.membership!;
    const rows = await auditCsvRows({ sequelize: sequelizeOf(req) }, job.id, auditId);
    await sendRecordsAsCsv(res, csvFileName(`audit-${rows[1]![2]}`, job.name), rows);
  });

  router.get('/jobs/:jobId/audits/:auditId', policy.jobMember(AUDIT_ROLES), validate({ params: auditParamsSchema }), async (req, res) => {
    const { auditId } = valid<z.infer<typeof auditParamsSchema>>(req.valid.params);
    res.json(await auditDetail({ sequelize: sequelizeOf(req) }, req.membership!.job.id, auditId));
  });

  return router;
}
