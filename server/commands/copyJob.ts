/**
 * A GC manager copies a job to start the next building of the same kind: its levels, spaces and
 * the openings between them, its unit models with their stated limits, its defect catalogue as
 * chosen (own items, edits and retired items included), its settings (time zone, units, code
 * editions, due dates, recurring thresholds, stated limits, test settings) and the companies on
 * it with their trades and crews. Not copied: units, systems, checks, findings, test records,
 * level plans and people (the copier is the new job's GC manager; others are invited again).
 * One transaction: all of it or nothing.
 */
import type { Transaction } from 'sequelize';
import type { CopyJobInput } from '../../shared/schemas/setup';
import { mayStartJob, START_JOB_REFUSED } from '../../shared/rules/roles';
import { forbidden } from '../errors';
import { CatalogueItem, Crew, Job, JobCompany, JobMember, Level, Space, SpaceLink, UnitModel } from '../models';

export interface CopyJobContext {
  transaction: Transaction;
  actor: { id: string; companyId: string };
}

export async function copyJob({ transaction, actor }: CopyJobContext, source: Job, input: CopyJobInput): Promise<Job> {
  const roles = (await JobMember.findAll({ where: { userId: actor.id }, attributes: ['role'], transaction })).map((m) => m.role);
  if (!mayStartJob(roles)) throw forbidden(START_JOB_REFUSED, 'gc_manager_only');
  const job = await Job.create(
    {
      ownerCompanyId: actor.companyId,
      name: input.name,
      number: input.number ?? null,
      address: input.address ?? null,
      startsOn: input.startsOn ?? null,
      endsOn: input.endsOn ?? null,
      timeZone: source.timeZone,
      unitSystem: source.unitSystem,
      codeEditions: structuredClone(source.codeEditions),
      severityDueDays: structuredClone(source.severityDueDays),
      recurringThresholds: structuredClone(source.recurringThresholds),
      settings: structuredClone(source.settings),
      testSettings: structuredClone(source.testSettings),
    },
    { transaction },
  );
  await JobMember.create({ jobId: job.id, userId: actor.id, role: 'gc_manager', companyId: actor.companyId }, { transaction });

  const companies = await JobCompany.findAll({ where: { jobId: source.id }, order: [['createdAt', 'ASC'], ['id', 'ASC']], transaction });
  const companyRows = companies.map((c) => ({ jobId: job.id, companyId: c.companyId, trades: [...c.trades] }));
  if (!companies.some((c) => c.companyId === actor.companyId)) companyRows.push({ jobId: job.id, companyId: actor.companyId, trades: ['general'] });
  await JobCompany.bulkCreate(companyRows, { transaction });
  const crews = await Crew.findAll({ where: { jobId: source.id }, order: [['name', 'ASC']], transaction });
  if (crews.length > 0) await Crew.bulkCreate(crews.map((c) => ({ jobId: job.id, companyId: c.companyId, name: c.name })), { transaction });

  const items = await CatalogueItem.findAll({ where: { jobId: source.id }, order: [['position', 'ASC']], transaction });
  await CatalogueItem.bulkCreate(
    items.map((i) => ({
      jobId: job.id,
      code: i.code,
      group: i.group,
      title: i.title,
      description: i.description,
      unitKinds: [...i.unitKinds],
      defaultSeverity: i.defaultSeverity,
      trade: i.trade,
      measuredRule: i.measuredRule ? structuredClone(i.measuredRule) : null,
      fixGuidance: i.fixGuidance,
      caution: i.caution,
      needsCeilingAccess: i.needsCeilingAccess,
      builtin: i.builtin,
      followsBuiltin: i.followsBuiltin,
      isOther: i.isOther,
      position: i.position,
      retiredAt: i.retiredAt,
    })),
    { transaction },
  );

  const models = await UnitModel.findAll({ where: { jobId: source.id }, order: [['name', 'ASC']], transaction });
  if (models.length > 0) {
    await UnitModel.bulkCreate(
      models.map((m) => ({
        jobId: job.id,
        name: m.name,
        modelNumber: m.modelNumber,
        unitKind: m.unitKind,
        nominalCapacity: m.nominalCapacity,
        limits: structuredClone(m.limits),
        mountPosition: m.mountPosition,
      })),
      { transaction },
    );
  }

  // One insert per table; PostgreSQL returns the new rows in the order given, so old ids map by position.
  const levels = await Level.findAll({ where: { jobId: source.id }, order: [['position', 'ASC']], transaction });
  const levelCopies = await Level.bulkCreate(
    levels.map((l) => ({ jobId: job.id, name: l.name, position: l.position })),
    { transaction, returning: true },
  );
  const levelIds = new Map(levels.map((l, i) => [l.id, levelCopies[i]!.id]));
  const spaces = await Space.findAll({ where: { jobId: source.id }, order: [['name', 'ASC']], transaction });
  const spaceCopies = await Space.bulkCreate(
    spaces.map((s) => ({
      jobId: job.id,
      levelId: levelIds.get(s.levelId)!,
      name: s.name,
      floorArea: s.floorArea,
      ceilingHeight: s.ceilingHeight,
      occupancy: s.occupancy,
      enclosed: s.enclosed,
    })),
    { transaction, returning: true },
  );
  const spaceIds = new Map(spaces.map((s, i) => [s.id, spaceCopies[i]!.id]));
  const links = await SpaceLink.findAll({ where: { jobId: source.id }, transaction });
  if (links.length > 0) {
    await SpaceLink.bulkCreate(
      links.map((l) => {
        // A pair is stored in id order (a check in the table): the new ids may sort the other way round.
        const [a, b] = [spaceIds.get(l.spaceAId)!, spaceIds.get(l.spaceBId)!].sort();
        return { jobId: job.id, spaceAId: a!, spaceBId: b! };
      }),
      { transaction },
    );
  }
  return job;
}
