/**
 * Crews of a job: reads and the writes of routes/crews.ts.
 *
 * Who may manage them: a GC manager, the crews of any company on the job; a subcontractor, the
 * crews of the company their membership is for. A subcontractor never sees another company's
 * crews: those answer 404 like any record out of their scope (the company is in the WHERE).
 */
import { QueryTypes, UniqueConstraintError, type Sequelize, type Transaction } from 'sequelize';
import type { CreateCrewInput, CrewDto, UpdateCrewInput } from '../../shared/schemas/setup';
import type { Role } from '../../shared/words';
import { badRequest, conflict, forbidden, notFound } from '../errors';
import { Crew, JobCompany, type Job } from '../models';
import { presentCrew, type CrewRow } from '../presenters/crew';
import { destroyOrConflict, lockVersioned, refuseIfReferenced } from './records';

/** Who asks: their role and, for a subcontractor, the one company whose crews they manage. */
export interface CrewActor {
  role: Role;
  /** The membership's company for a subcontractor; null for everybody else (all companies). */
  companyId: string | null;
}

export function crewActor(membership: { role: Role; companyId: string }): CrewActor {
  return { role: membership.role, companyId: membership.role === 'subcontractor' ? membership.companyId : null };
}

const NOT_FOUND = 'Crew not found on this job.';
const duplicate = (name: string, company: string) => conflict(`${company} already has a crew named "${name}" on this job.`, 'duplicate');

const CREW_SELECT = `
  SELECT cr.id, cr.company_id, c.name AS company_name, cr.name, cr.version,
         (SELECT count(*) FROM units u WHERE u.installed_by_crew_id = cr.id) AS unit_count
    FROM crews cr JOIN companies c ON c.id = cr.company_id`;

/** The job's crews in the caller's scope, by company name then crew name. */
export async function listCrews(sequelize: Sequelize, jobId: string, actor: CrewActor, companyId?: string, transaction?: Transaction): Promise<CrewDto[]> {
  const bind: unknown[] = [jobId];
  let where = 'cr.job_id = $1';
  if (actor.companyId) where += ` AND cr.company_id = $${bind.push(actor.companyId)}`;
  if (companyId) where += ` AND cr.company_id = $${bind.push(companyId)}`;
  const rows = await sequelize.query<CrewRow>(`${CREW_SELECT} WHERE ${where} ORDER BY lower(c.name), c.id, lower(cr.name), cr.id`, {
    bind,
    type: QueryTypes.SELECT,
    transaction,
  });
  return rows.map(presentCrew);
}

/** One crew in the caller's scope, or 404. */
export async function crewDto(sequelize: Sequelize, jobId: string, crewId: string, actor: CrewActor, transaction?: Transaction): Promise<CrewDto> {
  const bind: unknown[] = [jobId, crewId];
  const scope = actor.companyId ? ` AND cr.company_id = $${bind.push(actor.companyId)}` : '';
  const [row] = await sequelize.query<CrewRow>(`${CREW_SELECT} WHERE cr.job_id = $1 AND cr.id = $2${scope}`, { bind, type: QueryTypes.SELECT, transaction });
  if (!row) throw notFound(NOT_FOUND);
  return presentCrew(row);
}

export interface CrewWrite {
  sequelize: Sequelize;
  transaction: Transaction;
  job: Job;
  actor: CrewActor;
  ifMatch?: string;
}

/** Insert or rename; the unique index (job, company, lower(trimmed name)) decides, and its violation is a 409. */
async function saveName(w: CrewWrite, crew: Crew, companyName: string): Promise<void> {
  try {
    await w.sequelize.transaction({ transaction: w.transaction }, async (savepoint) => {
      await crew.save({ transaction: savepoint });
    });
  } catch (err) {
    if (err instanceof UniqueConstraintError) throw duplicate(crew.name, companyName);
    throw err;
  }
}

export async function createCrew(w: CrewWrite, input: CreateCrewInput): Promise<CrewDto> {
  const { job, actor, transaction } = w;
  if (actor.companyId && input.companyId !== actor.companyId) {
    throw forbidden('You can name crews of your own company only.', 'own_company_only');
  }
  const link = await JobCompany.findOne({ where: { jobId: job.id, companyId: input.companyId }, transaction });
  if (!link) throw badRequest('companyId: That company is not on this job.', { companyId: 'That company is not on this job.' });
  const company = await w.sequelize.query<{ name: string }>(`SELECT name FROM companies WHERE id = $1`, {
    bind: [input.companyId],
    type: QueryTypes.SELECT,
    transaction,
  });
  const crew = Crew.build({ jobId: job.id, companyId: input.companyId, name: input.name });
  await saveName(w, crew, company[0]?.name ?? 'This company');
  return crewDto(w.sequelize, job.id, crew.id, actor, transaction);
}

/** Locks a crew in the caller's scope (404 outside it) and checks If-Match (428 / 412 with the current crew). */
async function lockCrew(w: CrewWrite, crewId: string): Promise<Crew> {
  const where = { id: crewId, jobId: w.job.id, ...(w.actor.companyId ? { companyId: w.actor.companyId } : {}) };
  return lockVersioned(Crew, where, w.transaction, NOT_FOUND, w.ifMatch, (row) => crewDto(w.sequelize, w.job.id, row.id, w.actor, w.transaction));
}

export async function renameCrew(w: CrewWrite, crewId: string, input: UpdateCrewInput): Promise<CrewDto> {
  const crew = await lockCrew(w, crewId);
  const current = await crewDto(w.sequelize, w.job.id, crew.id, w.actor, w.transaction);
  crew.name = input.name;
  crew.version += 1;
  await saveName(w, crew, current.companyName);
  return crewDto(w.sequelize, w.job.id, crew.id, w.actor, w.transaction);
}

/** Deletes a crew no unit names (409 `referenced` otherwise: who installed a unit is kept). */
export async function deleteCrew(w: CrewWrite, crewId: string): Promise<void> {
  const crew = await lockCrew(w, crewId);
  const current = await crewDto(w.sequelize, w.job.id, crew.id, w.actor, w.transaction);
  refuseIfReferenced(`The crew ${current.name}`, [[current.unitCount, 'unit it installed', 'units it installed']], 'Give those units another crew (or none) first.');
  await destroyOrConflict(crew, w.transaction, `The crew ${current.name}`);
}

/** A crew of this job, or a 400 on `field` (units name their crew by id). */
export async function crewOfJob(jobId: string, crewId: string, transaction: Transaction, field = 'installedByCrewId'): Promise<Crew> {
  const crew = await Crew.findOne({ where: { id: crewId, jobId }, transaction });
  if (!crew) throw badRequest(`${field}: Not a crew of this job.`, { [field]: 'Not a crew of this job.' });
  return crew;
}
