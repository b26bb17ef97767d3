/**
 * Builders for the walk, unit-check and finding tests: a job with its crew, the companies on
 * it (GC: general; company A: mechanical; company B: electrical), the built-in catalogue, one
 * level with a space, a cassette with a model whose manual limits the pump lift to 30 in, a
 * second cassette without a model and a wall-mounted unit. Every call makes fresh rows.
 */
import { QueryTypes } from 'sequelize';
import type { AppOptions } from '../../server/app';
import { CatalogueItem, Finding, UnitModel } from '../../server/models';
import { nextFindingNumber, recordFindingEvent } from '../../server/services/findings';
import type { CheckMark, FindingStatus, Severity, UnitKindKey } from '../../shared/words';
import { buildTestApp, signIn } from './app';
import { connectTestDb } from './db';
import { addMember, buildJob, buildJobWithCrew, buildLevel, buildSpace, buildUnit, buildUnitModel, copyCatalogue, linkCompany } from './factories';

/** The people of a crew, to put on another job (signing in is slow: real scrypt). */
export type People = Pick<Awaited<ReturnType<typeof buildJobWithCrew>>, 'gcCompany' | 'gcManager' | 'inspector' | 'subA' | 'subB'>;

async function crewFor(people?: People) {
  if (!people) return buildJobWithCrew();
  const job = await buildJob({ ownerCompanyId: people.gcCompany.id });
  await addMember(job.id, people.gcManager.id, 'gc_manager');
  await addMember(job.id, people.inspector.id, 'inspector');
  await addMember(job.id, people.subA.id, 'subcontractor');
  await addMember(job.id, people.subB.id, 'subcontractor');
  return { ...people, job };
}

/** A fresh job; with `people`, the same users are its crew (so tests can reuse signed-in agents). */
export async function buildWalkJob(people?: People) {
  const crew = await crewFor(people);
  const { job, gcCompany, subA, subB } = crew;
  await linkCompany(job.id, gcCompany.id, ['general']);
  await linkCompany(job.id, subA.companyId, ['mechanical', 'plumbing']);
  await linkCompany(job.id, subB.companyId, ['electrical', 'controls']);
  await copyCatalogue(job.id);
  const level = await buildLevel(job.id, { name: 'Level 3' });
  const otherLevel = await buildLevel(job.id, { name: 'Level 4' });
  const space = await buildSpace(job.id, level.id, { name: 'Corridor 3A' });
  const model = await buildUnitModel(job.id, { name: 'CX-24', unitKind: 'cassette_4way' });
  // 30 in = 762 mm exactly (NIST SP 811: 1 in = 25.4 mm).
  await UnitModel.update(
    { limits: { max_pump_lift: { value: 762, stated: 30, unit: 'in', text: '30 in', source: 'installation manual, p. 12' } } },
    { where: { id: model.id } },
  );
  const cassette = await buildUnit(job.id, level.id, { tag: 'IU-3-01', kind: 'cassette_4way', spaceId: space.id, modelId: model.id });
  const cassette2 = await buildUnit(job.id, level.id, { tag: 'IU-3-02', kind: 'cassette_4way', spaceId: space.id });
  const wall = await buildUnit(job.id, level.id, { tag: 'IU-3-03', kind: 'wall_mounted' });
  const upstairs = await buildUnit(job.id, otherLevel.id, { tag: 'IU-4-01', kind: 'cassette_4way' });
  const catalogue = await CatalogueItem.findAll({ where: { jobId: job.id } });
  const byCode = (code: string) => {
    const item = catalogue.find((c) => c.code === code);
    if (!item) throw new Error(`no catalogue item ${code}`);
    return item;
  };
  /** An item that applies to wall-mounted units but not to cassettes. */
  const notForCassettes = catalogue.find((c) => !c.unitKinds.includes('cassette_4way') && c.unitKinds.includes('wall_mounted'))!;
  return { ...crew, level, otherLevel, space, model, cassette, cassette2, wall, upstairs, catalogue, byCode, notForCassettes };
}

export type WalkJob = Awaited<ReturnType<typeof buildWalkJob>>;

/**
 * Every item of the job's catalogue a check of this unit kind must mark to be complete, read from
 * the database now (so items added by the test or by a changed built-in catalogue count) and
 * filtered here, not by the server's query: job-added items in, retired ones and the
 * "Something else" type out.
 */
export async function applicableTo(jobId: string, kind: UnitKindKey): Promise<CatalogueItem[]> {
  const all = await CatalogueItem.findAll({ where: { jobId }, order: [['position', 'ASC'], ['code', 'ASC']] });
  return all.filter((c) => !c.isOther && c.retiredAt === null && c.unitKinds.includes(kind));
}

/** A complete check's items: every applicable item with `mark`, except the codes in `except`. */
export async function everyItem(jobId: string, kind: UnitKindKey, mark: CheckMark = 'ok', except: string[] = []) {
  return (await applicableTo(jobId, kind)).filter((c) => !except.includes(c.code)).map((c) => ({ catalogueItemId: c.id, mark }));
}

/** A finding written straight to the database (with its "logged" event), for read tests. */
export async function insertFinding(
  w: WalkJob,
  overrides: Partial<{ companyId: string; status: FindingStatus; severity: Severity; unitId: string | null; code: string; note: string; dueOn: string; loggedAt: Date; walkId: string }> = {},
) {
  const sequelize = Finding.sequelize!;
  return sequelize.transaction(async (transaction) => {
    const item = w.byCode(overrides.code ?? 'DR-03');
    const unitId = overrides.unitId === undefined ? w.cassette.id : overrides.unitId;
    const finding = await Finding.create(
      {
        jobId: w.job.id,
        number: await nextFindingNumber(sequelize, w.job.id, transaction),
        unitId,
        spaceId: [w.cassette, w.cassette2, w.wall, w.upstairs].find((u) => u.id === unitId)?.spaceId ?? null,
        levelId: w.level.id,
        catalogueItemId: item.id,
        walkId: overrides.walkId ?? null,
        unitCheckId: null,
        severity: overrides.severity ?? 'major',
        status: overrides.status ?? 'open',
        companyId: overrides.companyId ?? w.subA.companyId,
        dueOn: overrides.dueOn ?? '2026-12-08',
        note: overrides.note ?? '',
        measuredText: null,
        measuredValue: null,
        ruleResult: null,
        loggedBy: w.inspector.id,
        loggedAt: overrides.loggedAt ?? new Date(),
        pinX: null,
        pinY: null,
        voidedReason: overrides.status === 'voided' ? 'Logged in error.' : null,
      },
      { transaction },
    );
    await recordFindingEvent({ findingId: finding.id, jobId: w.job.id, actorId: w.inspector.id, kind: 'logged', to: { status: 'open' } }, transaction);
    return finding;
  });
}

/** Row counts that a refused write must leave unchanged. */
export async function countRows(jobId: string) {
  const sequelize = Finding.sequelize!;
  const [row] = await sequelize.query<{ findings: string; photos: string; events: string }>(
    `SELECT (SELECT count(*) FROM findings WHERE job_id = $1) AS findings,
            (SELECT count(*) FROM photos WHERE job_id = $1) AS photos,
            (SELECT count(*) FROM finding_events WHERE job_id = $1) AS events`,
    { bind: [jobId], type: QueryTypes.SELECT },
  );
  return { findings: Number(row!.findings), photos: Number(row!.photos), events: Number(row!.events) };
}

/**
 * A test app on a fresh walk job with its crew signed in: GC manager, inspector and the two
 * subcontractors. `close` ends the app and the database connection.
 */
export async function startWalkApp(options: Partial<AppOptions> = {}) {
  const db = await connectTestDb();
  const trimout = buildTestApp(db, options);
  const people = await buildWalkJob();
  const gc = await signIn(trimout.app, people.gcManager.email);
  const inspector = await signIn(trimout.app, people.inspector.email);
  const subA = await signIn(trimout.app, people.subA.email);
  const subB = await signIn(trimout.app, people.subB.email);
  const close = async () => {
    await trimout.close();
    await db.close();
  };
  return { db, trimout, people, gc, inspector, subA, subB, close };
}
