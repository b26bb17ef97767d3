import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { JobMember } from '../../../server/models';
import { buildTestApp, signIn } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildJobWithCrew, buildUser } from '../../support/factories';

let db: Database;
let trimout: TrimoutApp;

beforeAll(async () => {
  db = await connectTestDb();
  trimout = buildTestApp(db);
});
afterAll(async () => {
  await trimout.close();
  await db.close();
});

describe('GET /api/jobs', () => {
  it('answers 401 signed out', async () => {
    await request(trimout.app).get('/api/jobs').expect(401);
  });

  it.each(['gcManager', 'inspector', 'subA'] as const)('lists the job with the role of the %s', async (who) => {
    const crew = await buildJobWithCrew();
    const { agent } = await signIn(trimout.app, crew[who].email);
    const res = await agent.get('/api/jobs').expect(200);
    const role = { gcManager: 'gc_manager', inspector: 'inspector', subA: 'subcontractor' }[who];
    expect(res.body.items).toEqual([{ id: crew.job.id, name: crew.job.name, number: null, address: null, role }]);
  });

  it('is empty for a user with no membership', async () => {
    const user = await buildUser();
    const { agent } = await signIn(trimout.app, user.email);
    expect((await agent.get('/api/jobs').expect(200)).body.items).toEqual([]);
  });
});

describe('GET /api/jobs/:jobId', () => {
  it('answers a member with the job and their role', async () => {
    const crew = await buildJobWithCrew();
    const { agent } = await signIn(trimout.app, crew.subB.email);
    const res = await agent.get(`/api/jobs/${crew.job.id}`).expect(200);
    expect(res.body).toMatchObject({ id: crew.job.id, role: 'subcontractor', timeZone: 'UTC', unitSystem: 'imperial' });
  });

  it("answers 404 for another job (its existence is not leaked)", async () => {
    const mine = await buildJobWithCrew();
    const theirs = await buildJobWithCrew();
    const { agent } = await signIn(trimout.app, mine.gcManager.email);
    const res = await agent.get(`/api/jobs/${theirs.job.id}`).expect(404);
    expect(res.body.error.message).toBe('Job not found.');
  });

  it('answers 400 for an id that is not a UUID', async () => {
    const crew = await buildJobWithCrew();
    const { agent } = await signIn(trimout.app, crew.gcManager.email);
    const res = await agent.get('/api/jobs/not-a-uuid').expect(400);
    expect(res.body.error.fields).toEqual({ jobId: 'This link does not name a job: open the job from its list.' });
  });

  it('reads membership on every request: removing the member takes effect at once', async () => {
    const crew = await buildJobWithCrew();
    const { agent } = await signIn(trimout.app, crew.inspector.email);
    await agent.get(`/api/jobs/${crew.job.id}`).expect(200);
    await JobMember.destroy({ where: { jobId: crew.job.id, userId: crew.inspector.id } });
    await agent.get(`/api/jobs/${crew.job.id}`).expect(404);
  });
});
