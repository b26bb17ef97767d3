/**
 * Planning a sampling audit (POST /audits): a GC manager or inspector chooses the lot by filters;
 * the lot is frozen now (its units and their place in the seeded draw are written once), the plan
 * is computed by shared/calc/sampling.ts and kept with its parameters and source, and the seed is
 * recorded so anyone can draw the same sample again.
 *
 * Refusals: a filter naming another job's level, system, crew or model → 404 (services/audits.ts);
 * a lot too small for the plan → 400 on `lot` (Z1.4 Table I starts at 2 units; the tiered scheme
 * needs 1).
 */
import { randomBytes } from 'node:crypto';
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import { drawSample, drawOrder, planTiered, planZ14, type AuditPlan, type ClassRules } from '../../shared/calc/sampling';
import type { AuditDetail, CreateAuditParsed } from '../../shared/schemas/audits';
import { SEVERITIES } from '../../shared/words';
import { badRequest } from '../errors';
import { Audit } from '../models';
import { auditDetail, lotUnitIds } from '../services/audits';
import { lockJob } from '../services/records';

export interface PlanAuditContext {
  sequelize: Sequelize;
  transaction: Transaction;
  jobId: string;
  actorId: string;
  clock: () => Date;
}

function classRulesOf(body: CreateAuditParsed): ClassRules {
  const rules: ClassRules = {};
  for (const s of SEVERITIES) {
    const choice = body.classes[s];
    if (choice === 'off') continue;
    rules[s] = choice === 'zero' ? { aql: null } : { aql: choice };
  }
  return rules;
}

export async function planAudit(ctx: PlanAuditContext, body: CreateAuditParsed): Promise<AuditDetail> {
  const { sequelize, transaction, jobId } = ctx;
  // Numbers are per job: serialise plans of one job.
  await lockJob(jobId, transaction);
  const lot = await lotUnitIds({ sequelize, transaction }, jobId, body.lot);
  const least = body.scheme === 'z14' ? 2 : 1;
  if (lot.length < least) {
    const message = `The lot has ${lot.length} unit${lot.length === 1 ? '' : 's'}: ${body.scheme === 'z14' ? 'Z1.4 needs at least 2' : 'choose at least 1'}. Widen the filters.`;
    throw badRequest(`lot: ${message}`, { lot: message });
  }
  const classRules = classRulesOf(body);
  const plan: AuditPlan = body.scheme === 'z14' ? planZ14(lot.length, body.inspectionLevel, classRules) : planTiered(lot.length);
  const seed = body.seed ?? randomBytes(8).toString('hex');
  const [{ next }] = (await sequelize.query<{ next: number }>(`SELECT coalesce(max(number), 0) + 1 AS next FROM audits WHERE job_id = $1`, {
    bind: [jobId],
    type: QueryTypes.SELECT,
    transaction,
  })) as [{ next: number }];
  const audit = await Audit.create(
    {
      jobId,
      number: Number(next),
      name: body.name,
      scheme: body.scheme,
      inspectionLevel: body.scheme === 'z14' ? body.inspectionLevel : null,
      lotFilters: body.lot,
      classRules: body.scheme === 'z14' ? classRules : {},
      plan,
      lotSize: lot.length,
      sampleSize: plan.sampleSize,
      seed,
      plannedBy: ctx.actorId,
      startedAt: ctx.clock(),
    },
    { transaction },
  );
  const order = drawOrder(lot, seed);
  const tiers = new Map(drawSample(lot, seed, plan).map((s) => [s.unitId, s.tier]));
  await sequelize.query(
    `INSERT INTO audit_units (audit_id, unit_id, draw_position, tier)
     SELECT $1, u, p, nullif(t, 0)::smallint FROM unnest($2::uuid[], $3::int[], $4::int[]) AS x(u, p, t)`,
    { bind: [audit.id, order, order.map((_, i) => i + 1), order.map((u) => tiers.get(u) ?? 0)], transaction },
  );
  return auditDetail({ sequelize, transaction }, jobId, audit.id);
}
