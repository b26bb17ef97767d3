/** Systems (refrigerant circuits) of a job: reads and the writes of routes/systems.ts. */
import { QueryTypes, UniqueConstraintError, type Transaction } from 'sequelize';
import type { CreateSystemInput, SystemDto, UpdateSystemInput } from '../../shared/schemas/setup';
import { badRequest, conflict, notFound } from '../errors';
import { System, Unit } from '../models';
import { presentSystem } from '../presenters/system';
import { afterCursor, finishPage, type PageRequest } from './paging';
import { optionalQuantity } from './quantities';
import { chargeBasisOf } from './testRecords';
import { destroyOrConflict, lockVersioned, lowerEquals, refuseIfReferenced, type SetupWrite } from './records';

async function unitCounts(ids: string[], transaction?: Transaction): Promise<Map<string, number>> {
  if (ids.length === 0) return new Map();
  const rows = await System.sequelize!.query<{ system_id: string; n: string }>(
    `SELECT system_id, count(*) AS n FROM units WHERE system_id = ANY($1::uuid[]) GROUP BY system_id`,
    { bind: [ids], type: QueryTypes.SELECT, transaction },
  );
  return new Map(rows.map((r) => [r.system_id, Number(r.n)]));
}

/** A responsible company must be one on the job (400 on companyId otherwise). */
async function companyOnJob(jobId: string, companyId: string | null, transaction: Transaction): Promise<string | null> {
  if (companyId === null) return null;
  const [row] = await System.sequelize!.query(`SELECT 1 FROM job_companies WHERE job_id = $1 AND company_id = $2::uuid`, {
    bind: [jobId, companyId],
    type: QueryTypes.SELECT,
    transaction,
  });
  if (!row) throw badRequest('companyId: Choose a company on this job.', { companyId: 'Choose a company on this job.' });
  return companyId;
}

const duplicateName = (name: string) => conflict(`This job already has a system named "${name}".`, 'duplicate');

export async function listSystems(jobId: string, page: PageRequest): Promise<{ items: SystemDto[]; nextCursor: string | null }> {
  const rows = await System.findAll({
    where: { jobId, ...afterCursor('name', page) },
    order: [['name', 'ASC'], ['id', 'ASC']],
    limit: page.limit + 1,
  });
  const { rows: systems, nextCursor } = finishPage(rows, page, (s) => s.name);
  const counts = await unitCounts(systems.map((s) => s.id));
  return { items: systems.map((s) => presentSystem(s, counts.get(s.id) ?? 0)), nextCursor };
}

export async function findSystem(jobId: string, systemId: string): Promise<System> {
  const system = await System.findOne({ where: { id: systemId, jobId } });
  if (!system) throw notFound('System not found.');
  return system;
}

type SystemInput = CreateSystemInput & { outdoorModel?: string | null };

export async function createSystem({ transaction, jobId }: SetupWrite, input: SystemInput): Promise<System> {
  const factoryCharge = optionalQuantity(input.factoryCharge, 'mass', 'factoryCharge') ?? null;
  const fieldCharge = optionalQuantity(input.fieldCharge, 'mass', 'fieldCharge') ?? null;
  if (await System.findOne({ where: { jobId, ...lowerEquals('name', input.name) }, transaction })) throw duplicateName(input.name);
  return System.create(
    {
      jobId,
      name: input.name,
      outdoorModel: input.outdoorModel ?? null,
      refrigerant: input.refrigerant,
      factoryCharge,
      fieldCharge,
      concentrationLimitOverride: input.concentrationLimitOverride ?? null,
      companyId: await companyOnJob(jobId, input.companyId ?? null, transaction),
      chargeBasis: chargeBasisOf(input.chargeBasis ?? null),
    },
    { transaction },
  );
}

export async function changeSystem(
  { transaction, jobId, ifMatch }: SetupWrite,
  systemId: string,
  input: UpdateSystemInput & { outdoorModel?: string | null },
): Promise<System> {
  const factoryCharge = optionalQuantity(input.factoryCharge, 'mass', 'factoryCharge');
  const fieldCharge = optionalQuantity(input.fieldCharge, 'mass', 'fieldCharge');
  try {
    const system = await lockVersioned(System, { id: systemId, jobId }, transaction, 'System not found.', ifMatch, async (s) =>
      presentSystem(s, (await unitCounts([s.id], transaction)).get(s.id) ?? 0),
    );
    if (input.name !== undefined) system.name = input.name;
    if (input.outdoorModel !== undefined) system.outdoorModel = input.outdoorModel;
    if (input.refrigerant !== undefined) system.refrigerant = input.refrigerant;
    if (factoryCharge !== undefined) system.factoryCharge = factoryCharge;
    if (fieldCharge !== undefined) system.fieldCharge = fieldCharge;
    if (input.concentrationLimitOverride !== undefined) system.concentrationLimitOverride = input.concentrationLimitOverride;
    if (input.companyId !== undefined) system.companyId = await companyOnJob(jobId, input.companyId, transaction);
    if (input.chargeBasis !== undefined) system.chargeBasis = chargeBasisOf(input.chargeBasis);
    system.version += 1;
    await system.save({ transaction });
    return system;
  } catch (err) {
    if (err instanceof UniqueConstraintError && input.name) throw duplicateName(input.name);
    throw err;
  }
}

export async function deleteSystem({ transaction, jobId, ifMatch }: SetupWrite, systemId: string): Promise<void> {
  const system = await lockVersioned(System, { id: systemId, jobId }, transaction, 'System not found.', ifMatch, (s) => presentSystem(s, 0));
  const units = await Unit.count({ where: { systemId }, transaction });
  refuseIfReferenced(system.name, [[units, 'unit', 'units']], 'Move those units to another system (or clear their system) first.');
  await destroyOrConflict(system, transaction, system.name);
}
