/**
 * Unit checks: each catalogue item that applies to a unit marked ok, defect or not applicable,
 * with measured values evaluated by shared/calc. Recorded even when everything is ok (coverage).
 * POST /jobs/:jobId/units/:unitId/checks   inspector, GC manager (Idempotency-Key) → 201 UnitCheckDto;
 *                                          409 open_finding_on_item for an OK on an item with an unresolved finding
 * GET  /jobs/:jobId/units/:unitId/checks   inspector, GC manager → UnitChecksResponse (state + history)
 * Write: commands/recordUnitCheck.ts; reads: services/checks.ts.
 */
import { Router } from 'express';
import type { z } from 'zod';
import { checkListQuerySchema, checkUnitParamsSchema, recordCheckSchema } from '../../shared/schemas/findings';
import { recordUnitCheck } from '../commands/recordUnitCheck';
import { valid, validate } from '../middleware/validate';
import { policy } from '../policies';
import { unitChecks } from '../services/checks';
import { idempotentWrite } from '../services/idempotency';
import { pageRequest } from '../services/paging';
import { sequelizeOf } from '../services/records';

const CHECK_ROLES = ['gc_manager', 'inspector'] as const;

export function checksRouter(): Router {
  const router = Router();

  router.post(
    '/jobs/:jobId/units/:unitId/checks',
    policy.jobMember(CHECK_ROLES),
    validate({ params: checkUnitParamsSchema, body: recordCheckSchema }),
    async (req, res) => {
      const { unitId } = valid<z.infer<typeof checkUnitParamsSchema>>(req.valid.params);
      const body = valid<z.infer<typeof recordCheckSchema>>(req.valid.body);
      await idempotentWrite(req, res, async (transaction) => {
        const ctx = { sequelize: sequelizeOf(req), transaction, job: req.membership!.job, actor: req.user! };
        return { status: 201, body: await recordUnitCheck(ctx, unitId, body) };
      });
    },
  );

  router.get(
    '/jobs/:jobId/units/:unitId/checks',
    policy.jobMember(CHECK_ROLES),
    validate({ params: checkUnitParamsSchema, query: checkListQuerySchema }),
    async (req, res) => {
      const { unitId } = valid<z.infer<typeof checkUnitParamsSchema>>(req.valid.params);
      const page = () => pageRequest(req, { sort: '-checkedAt', value: 'timestamp' });
      res.json(await unitChecks(sequelizeOf(req), req.membership!.job, unitId, page));
    },
  );

  return router;
}
