import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { CatalogueItem, Job, JobCompany, JobMember } from '../../../server/models';
import { BUILTIN_CATALOGUE } from '../../../shared/catalogue';
import { caller, ifMatch, jobPath, newJobFor, signInCrew, type SignedCrew } from '../../support/api';
import { signIn } from '../../support/app';
import { buildTestApp } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildJobWithCrew, buildUser } from '../../support/factories';

jest.setTimeout(60_000);

let db: Database;
let trimout: TrimoutApp;
let crew: SignedCrew;

beforeAll(async () => {
  db = await connectTestDb();
  trimout = buildTestApp(db);
  crew = await signInCrew(trimout.app);
});
afterAll(async () => {
  await trimout.close();
  await db.close();
});

describe('POST /api/jobs', () => {
  it('answers 401 signed out (with a CSRF token)', async () => {
    const agent = request.agent(trimout.app);
    const csrf = (await agent.get('/api/session')).body.csrfToken as string;
    await agent.post('/api/jobs').set('X-CSRF-Token', csrf).send({ name: 'X' }).expect(401);
  });

  it('someone with no job yet starts their first: owned by their company, they are its GC manager, company linked, catalogue copied', async () => {
    const newcomer = await buildUser();
    const them = caller(await signIn(trimout.app, newcomer.email));
    const res = await them.post('/api/jobs', { name: 'Larkspur Yard', number: 'LY-1', timeZone: 'America/Denver', unitSystem: 'metric' });
    expect(res.status).toBe(201);
    expect(res.headers.etag).toBe('"v1"');
    expect(res.body).toMatchObject({
      name: 'Larkspur Yard',
      number: 'LY-1',
      role: 'gc_manager',
      timeZone: 'America/Denver',
      unitSystem: 'metric',
      severityDueDays: { critical: 2, major: 7, minor: 14 },
      codeEditions: { IMC: '2018', 'ASHRAE 34': '2019' },
      version: 1,
    });
    const job = (await Job.findByPk(res.body.id))!;
    expect(job.ownerCompanyId).toBe(newcomer.companyId);
    expect(await JobMember.findOne({ where: { jobId: job.id, userId: newcomer.id } })).toMatchObject({ role: 'gc_manager' });
    expect(await JobCompany.findOne({ where: { jobId: job.id, companyId: newcomer.companyId } })).toMatchObject({ trades: ['general'] });
    expect(await CatalogueItem.count({ where: { jobId: job.id } })).toBe(BUILTIN_CATALOGUE.length);
    // Now a GC manager, they may start another.
    expect((await them.post('/api/jobs', { name: 'Larkspur Yard, phase 2' })).status).toBe(201);
  });

  it('someone who works on jobs only as an inspector or a subcontractor cannot start one (403), and nothing is created', async () => {
    const before = await Job.count();
    for (const who of [crew.sub, crew.insp]) {
      const res = await who.post('/api/jobs', { name: 'Not theirs to start' });
      expect(res.status).toBe(403);
      expect(res.body.error).toMatchObject({ id: 'gc_manager_only', message: expect.stringContaining('Jobs are set up by a GC manager') });
    }
    expect(await Job.count()).toBe(before);
    expect((await crew.gc.post('/api/jobs', { name: 'A GC manager starts another' })).status).toBe(201);
  });

  it('answers 400 with a message for a bad time zone, dates out of order, an unknown key', async () => {
    const tz = await crew.gc.post('/api/jobs', { name: 'X', timeZone: 'Mars/Olympus' });
    expect(tz.status).toBe(400);
    expect(tz.body.error.message).toBe('timeZone: Not a known time zone (use an IANA name such as America/Chicago).');
    const dates = await crew.gc.post('/api/jobs', { name: 'X', startsOn: '2026-05-01', endsOn: '2026-04-01' });
    expect(dates.body.error.message).toBe('endsOn: The end date is before the start date.');
    expect((await crew.gc.post('/api/jobs', { name: 'X', ownerCompanyId: crew.gcCompany.id })).status).toBe(400);
  });

  it('replays with the same Idempotency-Key (one job), 422 with another body', async () => {
    const key = { 'Idempotency-Key': `job-create-${crew.gcManager.id.slice(0, 8)}` };
    const first = await crew.gc.post('/api/jobs', { name: 'Replay Court' }, key);
    const again = await crew.gc.post('/api/jobs', { name: 'Replay Court' }, key);
    expect(again.status).toBe(201);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(again.body.id).toBe(first.body.id);
    expect(await Job.count({ where: { name: 'Replay Court', ownerCompanyId: crew.gcCompany.id } })).toBe(1);
    expect((await crew.gc.post('/api/jobs', { name: 'Other Court' }, key)).status).toBe(422);
  });
});

describe('GET and PATCH /api/jobs/:jobId', () => {
  it('answers the job with its settings and an ETag to every role', async () => {
    const job = await newJobFor(crew);
    for (const who of [crew.gc, crew.insp, crew.sub]) {
      const res = await who.get(jobPath(job.id));
      expect(res.status).toBe(200);
      expect(res.headers.etag).toBe('"v1"');
      expect(res.body).toMatchObject({ id: job.id, recurringThresholds: { minUnits: 3, minShare: 0.1 }, settings: {} });
    }
  });

  it('changes details and settings with If-Match (428 / 412 / 200)', async () => {
    const job = await newJobFor(crew);
    const path = jobPath(job.id);
    expect((await crew.gc.patch(path, { name: 'Renamed' })).status).toBe(428);
    const stale = await crew.gc.patch(path, { name: 'Renamed' }, ifMatch(2));
    expect(stale.status).toBe(412);
    expect(stale.body.current).toMatchObject({ id: job.id, version: 1 });
    const res = await crew.gc.patch(
      path,
      {
        name: 'Renamed',
        address: '9 Quarry Lane',
        startsOn: '2026-01-05',
        endsOn: '2026-12-18',
        timeZone: 'Europe/Dublin',
        unitSystem: 'metric',
        codeEditions: { IMC: '2021', 'NFPA 70': '2020' },
        severityDueDays: { critical: 1, major: 5, minor: 10 },
        recurringThresholds: { minUnits: 3, windowDays: 7 },
        settings: { min_drain_slope: { value: '1/4 in/ft', source: 'Job specification 23 31 00 (invented)' } },
      },
      ifMatch(1),
    );
    expect(res.status).toBe(200);
    expect(res.headers.etag).toBe('"v2"');
    expect(res.body).toMatchObject({
      name: 'Renamed',
      timeZone: 'Europe/Dublin',
      codeEditions: { IMC: '2021', 'NFPA 70': '2020', IRC: '2018' },
      severityDueDays: { critical: 1, major: 5, minor: 10 },
      recurringThresholds: { minUnits: 3, windowDays: 7 },
      version: 2,
    });
    expect(res.body.settings.min_drain_slope).toMatchObject({ stated: 0.25, unit: 'in/ft' });
    expect(res.body.settings.min_drain_slope.value).toBeCloseTo(1 / 48, 12);
    const cleared = await crew.gc.patch(path, { settings: { min_drain_slope: null }, number: '' }, ifMatch(2));
    expect(cleared.body).toMatchObject({ settings: {}, number: null });
  });

  it.each([
    [{ codeEditions: { IMC: '1999' } }, 'codeEditions.IMC: IMC: choose one of 2015, 2018, 2021.'],
    [{ severityDueDays: { critical: 9, major: 5, minor: 10 } }, 'severityDueDays: Due days must not shrink with severity: critical ≤ major ≤ minor.'],
    [{ unitSystem: 'cubits' }, 'unitSystem: Choose imperial or metric.'],
    [{ endsOn: '2026-02-30' }, 'endsOn: Not a real date.'],
  ])('answers 400 for %j', async (body, message) => {
    const job = await newJobFor(crew);
    const res = await crew.gc.patch(jobPath(job.id), body, ifMatch(1));
    expect(res.status).toBe(400);
    expect(res.body.error.message).toBe(message);
  });

  it.each(['insp', 'sub'] as const)('refuses job changes to the %s (403)', async (who) => {
    const job = await newJobFor(crew);
    const res = await crew[who].patch(jobPath(job.id), { name: 'Mine now' }, ifMatch(1));
    expect(res.status).toBe(403);
    expect(res.body.error.message).toMatch(/cannot do that/);
  });

  it('answers 404 for another job', async () => {
    const other = await buildJobWithCrew();
    expect((await crew.gc.patch(jobPath(other.job.id), { name: 'X' }, ifMatch(1))).status).toBe(404);
  });
});
