/**
 * Systems: refrigerant circuits with their refrigerant and charges (kg).
 * GET    /jobs/:jobId/systems                all roles
 * POST   /jobs/:jobId/systems                GC manager (Idempotency-Key)
 * GET    /jobs/:jobId/systems/:systemId      all roles; with its refrigerant checks
 * PATCH  /jobs/:jobId/systems/:systemId      GC manager (If-Match)
 * DELETE /jobs/:jobId/systems/:systemId      GC manager (If-Match); 409 while units are on it
 */
import { Router } from 'express';
import { QueryTypes, UniqueConstraintError, type Transaction } from 'sequelize';
import {
  createSystemSchema,
  systemListQuerySchema,
  systemParamsSchema,
  updateSystemSchema,
  type CreateSystemInput,
  type UpdateSystemInput,
} from '../../shared/schemas/setup';
import { conflict, notFound } from '../errors';
import { valid, validate } from '../middleware/validate';
import { System, Unit } from '../models';
import { policy } from '../policies';
import { presentSystem } from '../presenters/setup';
import { idempotentWrite } from '../services/idempotency';
import { afterCursor, finishPage, pageRequest } from '../services/paging';
import { optionalQuantity } from '../services/quantities';
import { destroyOrConflict, inTransaction, lockForChange, lowerEquals, refuseIfReferenced } from '../services/records';
import { systemDetail } from '../services/refrigerantChecks';
import { setEtag } from '../services/versioning';

async function unitCounts(ids: string[], transaction?: Transaction): Promise<Map<string, number>> {
  if (ids.length === 0) return new Map();
  const rows = await System.sequelize!.query<{ system_id: string; n: string }>(
    `SELECT system_id, count(*) AS n FROM units WHERE system_id = ANY($1::uuid[]) GROUP BY system_id`,
    { bind: [ids], type: QueryTypes.SELECT, transaction },
  );
  return new Map(rows.map((r) => [r.system_id, Number(r.n)]));
}

const duplicateName = (name: string) => conflict(`This job already has a system named "${name}".`, 'duplicate');

export function systemsRouter(): Router {
  const router = Router();

  router.get('/jobs/:jobId/systems', policy.jobMember(), validate({ query: systemListQuerySchema }), async (req, res) => {
    const page = pageRequest(req, { sort: 'name', value: 'text' });
    const rows = await System.findAll({
      where: { jobId: req.membership!.job.id, ...afterCursor('name', page) },
      order: [['name', 'ASC'], ['id', 'ASC']],
      limit: page.limit + 1,
    });
    const { rows: systems, nextCursor } = finishPage(rows, page, (s) => s.name);
    const counts = await unitCounts(systems.map((s) => s.id));
    res.json({ items: systems.map((s) => presentSystem(s, counts.get(s.id) ?? 0)), nextCursor });
  });

  router.post('/jobs/:jobId/systems', policy.jobMember(['gc_manager']), validate({ body: createSystemSchema }), async (req, res) => {
    const body = valid<CreateSystemInput & { outdoorModel?: string | null }>(req.valid.body);
    const jobId = req.membership!.job.id;
    const factoryCharge = optionalQuantity(body.factoryCharge, 'mass', 'factoryCharge') ?? null;
    const fieldCharge = optionalQuantity(body.fieldCharge, 'mass', 'fieldCharge') ?? null;
    await idempotentWrite(req, res, async (transaction) => {
      if (await System.findOne({ where: { jobId, ...lowerEquals('name', body.name) }, transaction })) throw duplicateName(body.name);
      const system = await System.create(
        {
          jobId,
          name: body.name,
          outdoorModel: body.outdoorModel ?? null,
          refrigerant: body.refrigerant,
          factoryCharge,
          fieldCharge,
          concentrationLimitOverride: body.concentrationLimitOverride ?? null,
        },
        { transaction },
      );
      setEtag(res, system.version);
      return { status: 201, body: presentSystem(system, 0) };
    });
  });

  router.get('/jobs/:jobId/systems/:systemId', policy.jobMember(), validate({ params: systemParamsSchema }), async (req, res) => {
    const { systemId } = valid<{ systemId: string }>(req.valid.params);
    const job = req.membership!.job;
    const system = await System.findOne({ where: { id: systemId, jobId: job.id } });
    if (!system) throw notFound('System not found.');
    setEtag(res, system.version);
    res.json(await systemDetail(job, system));
  });

  router.patch(
    '/jobs/:jobId/systems/:systemId',
    policy.jobMember(['gc_manager']),
    validate({ params: systemParamsSchema, body: updateSystemSchema }),
    async (req, res) => {
      const { systemId } = valid<{ systemId: string }>(req.valid.params);
      const body = valid<UpdateSystemInput & { outdoorModel?: string | null }>(req.valid.body);
      const job = req.membership!.job;
      const factoryCharge = optionalQuantity(body.factoryCharge, 'mass', 'factoryCharge');
      const fieldCharge = optionalQuantity(body.fieldCharge, 'mass', 'fieldCharge');
      try {
        const system = await inTransaction(req, async (transaction) => {
          const system = await lockForChange(req, System, { id: systemId, jobId: job.id }, transaction, 'System not found.', async (s) =>
            presentSystem(s, (await unitCounts([s.id], transaction)).get(s.id) ?? 0),
          );
          if (body.name !== undefined) system.name = body.name;
          if (body.outdoorModel !== undefined) system.outdoorModel = body.outdoorModel;
          if (body.refrigerant !== undefined) system.refrigerant = body.refrigerant;
          if (factoryCharge !== undefined) system.factoryCharge = factoryCharge;
          if (fieldCharge !== undefined) system.fieldCharge = fieldCharge;
          if (body.concentrationLimitOverride !== undefined) system.concentrationLimitOverride = body.concentrationLimitOverride;
          system.version += 1;
          await system.save({ transaction });
          return system;
        });
        setEtag(res, system.version);
        res.json(await systemDetail(job, system));
      } catch (err) {
        if (err instanceof UniqueConstraintError && body.name) throw duplicateName(body.name);
        throw err;
      }
    },
  );

  router.delete(
    '/jobs/:jobId/systems/:systemId',
    policy.jobMember(['gc_manager']),
    validate({ params: systemParamsSchema }),
    async (req, res) => {
      const { systemId } = valid<{ systemId: string }>(req.valid.params);
      const jobId = req.membership!.job.id;
      await inTransaction(req, async (transaction) => {
        const system = await lockForChange(req, System, { id: systemId, jobId }, transaction, 'System not found.', (s) => presentSystem(s, 0));
        const units = await Unit.count({ where: { systemId }, transaction });
        refuseIfReferenced(system.name, [[units, 'unit', 'units']], 'Move those units to another system (or clear their system) first.');
        await destroyOrConflict(system, transaction, system.name);
      });
      res.status(204).end();
    },
  );

  return router;
}
