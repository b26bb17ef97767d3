/**
 * Test factories: each test builds its own companies, users and jobs with unique names, so
 * tests never depend on each other's rows or on the demo seed.
 */
import { randomUUID } from 'node:crypto';
import { hashPassword } from '../../server/auth/passwords';
import { CatalogueItem, Company, Job, JobCompany, JobMember, Level, Space, System, Unit, UnitModel, User } from '../../server/models';
import { copyBuiltinCatalogue } from '../../server/services/catalogue';
import type { Refrigerant, Role, TradeKey, UnitKindKey } from '../../shared/words';

export const TEST_PASSWORD = 'correct horse battery staple';
let passwordHash: Promise<string> | undefined;
/** One real scrypt hash per test file, shared by every user it builds. */
export function testPasswordHash(): Promise<string> {
  passwordHash ??= hashPassword(TEST_PASSWORD);
  return passwordHash;
}

const unique = () => randomUUID().slice(0, 8);

export async function buildCompany(overrides: Partial<{ name: string }> = {}) {
  return Company.create({ name: overrides.name ?? `Company ${unique()}` });
}

export async function buildUser(overrides: Partial<{ email: string; name: string; companyId: string }> = {}) {
  const companyId = overrides.companyId ?? (await buildCompany()).id;
  return User.create({
    email: overrides.email ?? `user-${unique()}@test.trimout.example`,
    name: overrides.name ?? `User ${unique()}`,
    companyId,
    passwordHash: await testPasswordHash(),
  });
}

export async function buildJob(overrides: Partial<{ name: string; ownerCompanyId: string; number: string }> = {}) {
  const ownerCompanyId = overrides.ownerCompanyId ?? (await buildCompany()).id;
  return Job.create({ name: overrides.name ?? `Job ${unique()}`, number: overrides.number ?? null, ownerCompanyId });
}

/** A membership for `companyId`, by default the person's home company (an invitation may name another). */
export async function addMember(jobId: string, userId: string, role: Role, companyId?: string) {
  const company = companyId ?? (await User.findByPk(userId, { attributes: ['companyId'], rejectOnEmpty: true })).companyId;
  return JobMember.create({ jobId, userId, role, companyId: company });
}

/**
 * A job with one member of each role: a GC manager and an inspector, a subcontractor of
 * company A and one of company B. Enough for most permission tests.
 */
/** A job and a person of its owner company: who a stored photo belongs to and who uploaded it. */
export async function buildPhotoOwner(): Promise<{ jobId: string; uploadedBy: string }> {
  const user = await buildUser();
  const job = await buildJob({ ownerCompanyId: user.companyId });
  return { jobId: job.id, uploadedBy: user.id };
}

export async function buildJobWithCrew() {
  const gcCompany = await buildCompany({ name: `GC ${unique()}` });
  const job = await buildJob({ ownerCompanyId: gcCompany.id });
  const gcManager = await buildUser({ companyId: gcCompany.id });
  const inspector = await buildUser();
  const subA = await buildUser();
  const subB = await buildUser();
  await addMember(job.id, gcManager.id, 'gc_manager');
  await addMember(job.id, inspector.id, 'inspector');
  await addMember(job.id, subA.id, 'subcontractor');
  await addMember(job.id, subB.id, 'subcontractor');
  return { job, gcCompany, gcManager, inspector, subA, subB };
}

// ---------------------------------------------------------------------------------------------
// Job set-up builders (levels, spaces, systems, unit models, units, companies on a job, catalogue)
// ---------------------------------------------------------------------------------------------

export async function buildLevel(jobId: string, overrides: Partial<{ name: string; position: number }> = {}) {
  const position = overrides.position ?? ((await Level.max<number, Level>('position', { where: { jobId } })) ?? 0) + 1;
  return Level.create({ jobId, name: overrides.name ?? `Level ${unique()}`, position });
}

export async function buildSpace(
  jobId: string,
  levelId: string,
  overrides: Partial<{ name: string; floorArea: number | null; ceilingHeight: number | null; occupancy: 'general' | 'institutional'; enclosed: boolean }> = {},
) {
  return Space.create({
    jobId,
    levelId,
    name: overrides.name ?? `Space ${unique()}`,
    floorArea: overrides.floorArea === undefined ? 20 : overrides.floorArea,
    ceilingHeight: overrides.ceilingHeight === undefined ? 2700 : overrides.ceilingHeight,
    ...(overrides.occupancy ? { occupancy: overrides.occupancy } : {}),
    ...(overrides.enclosed !== undefined ? { enclosed: overrides.enclosed } : {}),
  });
}

export async function buildSystem(
  jobId: string,
  overrides: Partial<{ name: string; refrigerant: Refrigerant; factoryCharge: number | null; fieldCharge: number | null }> = {},
) {
  return System.create({
    jobId,
    name: overrides.name ?? `System ${unique()}`,
    outdoorModel: null,
    refrigerant: overrides.refrigerant ?? 'R-410A',
    factoryCharge: overrides.factoryCharge === undefined ? 10 : overrides.factoryCharge,
    fieldCharge: overrides.fieldCharge === undefined ? 2 : overrides.fieldCharge,
    concentrationLimitOverride: null,
  });
}

export async function buildUnitModel(jobId: string, overrides: Partial<{ name: string; unitKind: UnitKindKey; modelNumber: string | null }> = {}) {
  return UnitModel.create({
    jobId,
    name: overrides.name ?? `Model ${unique()}`,
    modelNumber: overrides.modelNumber ?? null,
    unitKind: overrides.unitKind ?? 'cassette_4way',
    nominalCapacity: null,
  });
}

export async function buildUnit(
  jobId: string,
  levelId: string,
  overrides: Partial<{ tag: string; kind: UnitKindKey; spaceId: string | null; systemId: string | null; modelId: string | null; capacity: number | null }> = {},
) {
  return Unit.create({
    jobId,
    levelId,
    tag: overrides.tag ?? `IU-${unique()}`,
    kind: overrides.kind ?? 'cassette_4way',
    spaceId: overrides.spaceId ?? null,
    systemId: overrides.systemId ?? null,
    modelId: overrides.modelId ?? null,
    capacity: overrides.capacity ?? null,
  });
}

export async function linkCompany(jobId: string, companyId: string, trades: TradeKey[] = []) {
  return JobCompany.create({ jobId, companyId, trades });
}

/** Copies the built-in catalogue into a job (as POST /api/jobs does). */
export async function copyCatalogue(jobId: string) {
  const sequelize = CatalogueItem.sequelize!;
  return sequelize.transaction((transaction) => copyBuiltinCatalogue(jobId, transaction));
}
