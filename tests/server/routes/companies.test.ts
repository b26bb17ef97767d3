import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { JobCompany } from '../../../server/models';
import { ifMatch, jobPath, newJobFor, signInCrew, type SignedCrew } from '../../support/api';
import { buildTestApp } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { addMember, buildCompany, buildJobWithCrew, buildUser, linkCompany } from '../../support/factories';

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

async function jobWithGc() {
  const job = await newJobFor(crew);
  await linkCompany(job.id, crew.gcCompany.id, ['general']);
  return job;
}

describe('companies on a job', () => {
  it('answers 401 signed out', async () => {
    const job = await jobWithGc();
    await request(trimout.app).get(jobPath(job.id, '/companies')).expect(401);
    await request(trimout.app).get('/api/companies/known').expect(401);
  });

  it('creates a company by name with its trades, and lists the companies for every role', async () => {
    const job = await jobWithGc();
    const res = await crew.gc.post(jobPath(job.id, '/companies'), { name: 'Pellwood Mechanical', trades: ['mechanical', 'controls'] });
    expect(res.status).toBe(201);
    expect(res.headers.etag).toBe('"v1"');
    expect(res.body).toMatchObject({ name: 'Pellwood Mechanical', trades: ['mechanical', 'controls'], isOwner: false, memberCount: 0 });
    for (const who of [crew.gc, crew.insp, crew.sub]) {
      const list = await who.get(jobPath(job.id, '/companies'));
      expect(list.status).toBe(200);
      expect(list.body.items.map((c: { name: string }) => c.name)).toEqual([crew.gcCompany.name, 'Pellwood Mechanical'].sort());
    }
    const byTrade = await crew.insp.get(jobPath(job.id, '/companies?trade=controls'));
    expect(byTrade.body.items.map((c: { name: string }) => c.name)).toEqual(['Pellwood Mechanical']);
    const dup = await crew.gc.post(jobPath(job.id, '/companies'), { name: 'pellwood mechanical', trades: [] });
    expect(dup.status).toBe(409);
  });

  it('links a company the GC already works with by id; an unknown company is 404', async () => {
    const first = await jobWithGc();
    const made = await crew.gc.post(jobPath(first.id, '/companies'), { name: `Tansy Ceilings ${first.id.slice(0, 4)}`, trades: ['ceilings'] });
    const known = await crew.gc.get('/api/companies/known');
    expect(known.body.items.map((c: { id: string }) => c.id)).toEqual(expect.arrayContaining([made.body.id, crew.gcCompany.id]));
    const second = await jobWithGc();
    const linked = await crew.gc.post(jobPath(second.id, '/companies'), { companyId: made.body.id, trades: ['ceilings', 'drywall'] });
    expect(linked.status).toBe(201);
    expect(linked.body).toMatchObject({ id: made.body.id, trades: ['ceilings', 'drywall'] });
    const again = await crew.gc.post(jobPath(second.id, '/companies'), { companyId: made.body.id, trades: [] });
    expect(again.status).toBe(409);
    const stranger = await buildCompany();
    const unknown = await crew.gc.post(jobPath(second.id, '/companies'), { companyId: stranger.id, trades: [] });
    expect(unknown.status).toBe(404);
  });

  it('answers 400 with a message for a bad body', async () => {
    const job = await jobWithGc();
    const res = await crew.gc.post(jobPath(job.id, '/companies'), { name: 'X', trades: ['welding'] });
    expect(res.status).toBe(400);
    const both = await crew.gc.post(jobPath(job.id, '/companies'), { trades: [] });
    expect(both.status).toBe(400);
    expect(both.body.error.message).toMatch(/Send either companyId and trades, or name and trades\./);
  });

  it('changes trades with If-Match (428 / 412 / 200)', async () => {
    const job = await jobWithGc();
    const company = await buildCompany({ name: 'Brindle Electric' });
    await linkCompany(job.id, company.id, ['electrical']);
    const path = jobPath(job.id, `/companies/${company.id}`);
    expect((await crew.gc.patch(path, { trades: ['electrical', 'controls'] })).status).toBe(428);
    const stale = await crew.gc.patch(path, { trades: ['electrical', 'controls'] }, ifMatch(3));
    expect(stale.status).toBe(412);
    expect(stale.body.current).toMatchObject({ trades: ['electrical'] });
    const ok = await crew.gc.patch(path, { trades: ['electrical', 'controls'] }, ifMatch(1));
    expect(ok.body).toMatchObject({ trades: ['electrical', 'controls'], version: 2 });
  });

  it('refuses to remove the GC company or a company with members on the job (409); removes an unused one', async () => {
    const job = await jobWithGc();
    const owner = await crew.gc.del(jobPath(job.id, `/companies/${crew.gcCompany.id}`), ifMatch(1));
    expect(owner.status).toBe(409);
    expect(owner.body.error.message).toMatch(/runs this job \(its GC\)/);
    const company = await buildCompany({ name: 'Corvel Insulation' });
    await linkCompany(job.id, company.id, ['insulation']);
    const worker = await buildUser({ companyId: company.id });
    const member = await addMember(job.id, worker.id, 'subcontractor');
    const refused = await crew.gc.del(jobPath(job.id, `/companies/${company.id}`), ifMatch(1));
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toBe('Corvel Insulation still has 1 member on this job. Remove those members first.');
    await member.destroy();
    expect((await crew.gc.del(jobPath(job.id, `/companies/${company.id}`), ifMatch(1))).status).toBe(204);
  });

  it.each(['insp', 'sub'] as const)('refuses company writes to the %s (403)', async (who) => {
    const job = await jobWithGc();
    expect((await crew[who].post(jobPath(job.id, '/companies'), { name: 'X', trades: [] })).status).toBe(403);
    expect((await crew[who].patch(jobPath(job.id, `/companies/${crew.gcCompany.id}`), { trades: [] }, ifMatch(1))).status).toBe(403);
    expect((await crew[who].del(jobPath(job.id, `/companies/${crew.gcCompany.id}`), ifMatch(1))).status).toBe(403);
    expect(await JobCompany.count({ where: { jobId: job.id } })).toBe(1);
  });

  it("answers 404 for another job's companies", async () => {
    const other = await buildJobWithCrew();
    expect((await crew.gc.get(jobPath(other.job.id, '/companies'))).status).toBe(404);
    const job = await jobWithGc();
    expect((await crew.gc.patch(jobPath(job.id, `/companies/${other.gcCompany.id}`), { trades: [] }, ifMatch(1))).status).toBe(404);
  });

  it('replays a create with the same Idempotency-Key', async () => {
    const job = await jobWithGc();
    const key = { 'Idempotency-Key': `company-${job.id}` };
    const body = { name: 'Wrenfield Controls', trades: ['controls'] };
    await crew.gc.post(jobPath(job.id, '/companies'), body, key);
    const again = await crew.gc.post(jobPath(job.id, '/companies'), body, key);
    expect(again.status).toBe(201);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(await JobCompany.count({ where: { jobId: job.id } })).toBe(2);
    expect((await crew.gc.post(jobPath(job.id, '/companies'), { ...body, name: 'Other' }, key)).status).toBe(422);
  });
});
