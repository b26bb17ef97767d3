/**
 * The demo: an invented six-storey mixed-use job in close-out. No real people, companies,
 * addresses or products. Idempotent: running it again changes nothing. Never runs in production.
 */
import type { Database } from '../db';
import { hashPassword } from '../auth/passwords';
import type { Role } from '../../shared/words';
import { DEMO_COMPANY_TRADES, seedDemoSetup } from './demoSetup';
import { seedDemoFindings } from './demoFindings';
import { seedDemoFixPhotos } from './demoPhotos';
import { seedDemoCrews } from './demoCrews';
import { seedDemoTests } from './demoTests';
import { seedDemoAudits } from './demoAudits';
import { seedDemoCopy } from './demoCopy';
import type { ObjectStore } from '../storage/types';

export { DEMO_COMPANY_TRADES, DEMO_MODELS, DEMO_SYSTEMS } from './demoSetup';

export const DEMO_PASSWORD = 'trimout-demo-2026';

export const DEMO_COMPANIES = {
  gc: 'Halden Row Builders',
  inspection: 'Fernhill Commissioning',
  mechanical: 'Kestrel Vale Mechanical',
  electrical: 'Quillon Electric',
  ceilings: 'Mossgate Ceilings',
} as const;
type CompanyKey = keyof typeof DEMO_COMPANIES;

export const DEMO_ACCOUNTS: { email: string; name: string; company: CompanyKey; role: Role }[] = [
  { email: 'gc.manager@demo.trimout.example', name: 'Maren Holt', company: 'gc', role: 'gc_manager' },
  { email: 'inspector@demo.trimout.example', name: 'Idris Calloway', company: 'inspection', role: 'inspector' },
  { email: 'mechanical@demo.trimout.example', name: 'Tomasz Reed', company: 'mechanical', role: 'subcontractor' },
  { email: 'electrical@demo.trimout.example', name: 'Ana Brightwater', company: 'electrical', role: 'subcontractor' },
  { email: 'ceilings@demo.trimout.example', name: 'Joss Amberley', company: 'ceilings', role: 'subcontractor' },
];

export const DEMO_JOBS = [
  {
    key: 'main',
    name: 'Cinder Lane Commons',
    number: 'CLC-2611',
    address: '1400 Cinder Lane, Harrowgate',
    startsOn: '2025-03-03',
    endsOn: '2027-01-29',
    timeZone: 'America/Chicago',
    members: ['gc.manager', 'inspector', 'mechanical', 'electrical', 'ceilings'],
  },
  {
    key: 'clinic',
    name: 'Orchard Row Clinic fit-out',
    number: 'ORC-2702',
    address: '22 Orchard Row, Harrowgate',
    startsOn: '2026-09-14',
    endsOn: '2027-04-30',
    timeZone: 'America/Chicago',
    members: ['gc.manager', 'inspector'],
  },
] as const;

export interface SeedDemoOptions {
  /**
   * Where the demo's fix photos are stored: the server's own object store. Without one (tests
   * that only need the rows) no photos are made; a later run with a store adds them to every fix
   * that has none.
   */
  store?: ObjectStore;
}

export async function seedDemo(db: Database, options: SeedDemoOptions = {}): Promise<{ created: boolean }> {
  if (process.env.NODE_ENV === 'production') {
    throw new Error('The demo seed never runs in production: it creates accounts with a published password.');
  }
  const { Company, User, Job } = db.models;
  const existing = await User.count({ where: { email: DEMO_ACCOUNTS[0]!.email } });
  let created = false;
  if (existing === 0) {
    await seedAccountsAndJobs(db);
    created = true;
  }
  // Job set-up (levels, spaces, systems, models, units, companies on the job, catalogue): each
  // part only when missing, so a database seeded before set-up existed gets it too.
  let mainJobId: string | null = null;
  const setUp = await db.sequelize.transaction(async (transaction) => {
    const companies = {} as Record<CompanyKey, string>;
    for (const [key, name] of Object.entries(DEMO_COMPANIES) as [CompanyKey, string][]) {
      const company = await Company.findOne({ where: { name }, transaction });
      if (!company) return false;
      companies[key] = company.id;
    }
    const ids: Record<string, string> = {};
    for (const spec of DEMO_JOBS) {
      const job = await Job.findOne({ where: { name: spec.name, ownerCompanyId: companies.gc }, transaction });
      if (!job) return false;
      ids[spec.key] = job.id;
    }
    mainJobId = ids.main!;
    const others = DEMO_JOBS.filter((j) => j.key !== 'main').map((j) => ids[j.key]!);
    const setupCreated = await seedDemoSetup(db, { main: ids.main!, others }, companies, transaction);
    // Crews of the mechanical subcontractor, each unit with the crew that installed it.
    const crewsCreated = await seedDemoCrews(db, ids.main!, companies.mechanical, transaction);
    // Walks, unit checks and findings in every status with their histories; only when the job has none.
    const userIds: Record<string, string> = {};
    for (const account of DEMO_ACCOUNTS) {
      const user = await User.findOne({ where: { email: account.email }, transaction });
      if (!user) return setupCreated;
      userIds[account.email.split('@')[0]!] = user.id;
    }
    const findingsCreated = await seedDemoFindings(
      db,
      ids.main!,
      companies,
      { mechanical: DEMO_COMPANY_TRADES.mechanical, electrical: DEMO_COMPANY_TRADES.electrical, ceilings: DEMO_COMPANY_TRADES.ceilings },
      {
        gc: userIds['gc.manager']!,
        inspector: userIds.inspector!,
        subs: { mechanical: userIds.mechanical!, electrical: userIds.electrical!, ceilings: userIds.ceilings! },
      },
      transaction,
    );
    // Test records in every state (passed, failed then re-tested, awaiting a witness, corrected, missing).
    const testsCreated = await seedDemoTests(
      db,
      ids.main!,
      companies.mechanical,
      { gc: userIds['gc.manager']!, inspector: userIds.inspector!, mechanical: userIds.mechanical! },
      transaction,
    );
    // Sampling audits: one accepted, one in progress.
    const auditsCreated = await seedDemoAudits(db, ids.main!, { gc: userIds['gc.manager']!, inspector: userIds.inspector! }, transaction);
    // The second building: a copy of the main job in set-up, its checklist partly done.
    const copyCreated = await seedDemoCopy(db, ids.main!, { id: userIds['gc.manager']!, companyId: companies.gc }, transaction);
    return setupCreated || crewsCreated || findingsCreated || testsCreated || auditsCreated || copyCreated;
  });
  // Photos after the rows are committed: stored like uploads (pending keys, claimed in their own
  // transaction), never inside the long seed transaction.
  const photos = options.store && mainJobId ? await seedDemoFixPhotos(db, mainJobId, options.store) : 0;
  return { created: created || setUp || photos > 0 };
}

async function seedAccountsAndJobs(db: Database): Promise<void> {
  const { Company, User, Job, JobMember } = db.models;
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  await db.sequelize.transaction(async (transaction) => {
    const companies = {} as Record<CompanyKey, string>;
    for (const [key, name] of Object.entries(DEMO_COMPANIES) as [CompanyKey, string][]) {
      const [company] = await Company.findOrCreate({ where: { name }, defaults: { name }, transaction });
      companies[key] = company.id;
    }
    const users: Record<string, { id: string; role: Role; companyId: string }> = {};
    for (const account of DEMO_ACCOUNTS) {
      const [user] = await User.findOrCreate({
        where: { email: account.email },
        defaults: { email: account.email, name: account.name, companyId: companies[account.company], passwordHash },
        transaction,
      });
      users[account.email.split('@')[0]!] = { id: user.id, role: account.role, companyId: user.companyId };
    }
    for (const spec of DEMO_JOBS) {
      const [job] = await Job.findOrCreate({
        where: { name: spec.name, ownerCompanyId: companies.gc },
        defaults: {
          name: spec.name,
          number: spec.number,
          address: spec.address,
          startsOn: spec.startsOn,
          endsOn: spec.endsOn,
          timeZone: spec.timeZone,
          ownerCompanyId: companies.gc,
        },
        transaction,
      });
      for (const member of spec.members) {
        const user = users[member]!;
        await JobMember.findOrCreate({
          where: { jobId: job.id, userId: user.id },
          defaults: { jobId: job.id, userId: user.id, role: user.role, companyId: user.companyId },
          transaction,
        });
      }
    }
  });
}
