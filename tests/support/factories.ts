/**
 * Test factories: each test builds its own companies, users and jobs with unique names, so
 * tests never depend on each other's rows or on the demo seed.
 */
import { randomUUID } from 'node:crypto';
import { hashPassword } from '../../server/auth/passwords';
import { Company, Job, JobMember, User } from '../../server/models';
import type { Role } from '../../shared/words';

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

export async function addMember(jobId: string, userId: string, role: Role) {
  return JobMember.create({ jobId, userId, role });
}

/**
 * A job with one member of each role: a GC manager and an inspector, a subcontractor of
 * company A and one of company B. Enough for most permission tests.
 */
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
