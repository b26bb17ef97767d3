/**
 * A membership carries the company it was invited for, and a subcontractor's scope is that
 * company, not the person's home company. A person of company A, invited to a job as a
 * subcontractor for company B, sees B's findings there (list, detail, photos, inbox, board,
 * findings.csv, digest, critical-finding mails) and never A's; on another job where they work
 * for A they still see A's. The members and companies lists show them under B.
 */
import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { buildDigestContent } from '../../../server/digests/content';
import type { MailService } from '../../../server/mail';
import { JobMember } from '../../../server/models';
import { buildTestApp, csrfFor, signIn, type SignedIn } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { addMember, buildUser, TEST_PASSWORD } from '../../support/factories';
import { buildWalkJob, insertFinding, type WalkJob } from '../../support/findings';
import { startFakeSmtp, testMailService, tokenOf, type FakeSmtp } from '../../support/mail';
import { startFakeS3, type FakeS3 } from '../../support/storage';
import { phoneJpeg } from '../photos/fixtures';

jest.setTimeout(180_000);

let db: Database;
let s3: FakeS3;
let smtp: FakeSmtp;
let mail: MailService;
let trimout: TrimoutApp;

/** Job 1: the person works there for company B. Job 2: for company A, their home company. */
let job1: WalkJob;
let job2: WalkJob;
let person: Awaited<ReturnType<typeof buildUser>>;
let gc: SignedIn;
let me: SignedIn;
let companyA: string;
let companyB: string;
let findings: { a1: Found; b1: Found; a2: { id: string } };

interface Found {
  id: string;
  number: number;
  photoId: string;
}

async function logFinding(w: WalkJob, companyId: string, severity: 'major' | 'critical' = 'major'): Promise<Found> {
  const res = await gc.agent
    .post(`/api/jobs/${w.job.id}/findings`)
    .set('X-CSRF-Token', gc.csrf)
    .field('data', JSON.stringify({ catalogueItemId: w.byCode('DR-03').id, unitId: w.cassette.id, companyId, severity }))
    .attach('photos', await phoneJpeg(), { filename: 'f.jpg', contentType: 'image/jpeg' });
  if (res.status !== 201) throw new Error(`finding: ${res.status} ${JSON.stringify(res.body)}`);
  return { id: res.body.id, number: res.body.number, photoId: res.body.photos[0].id };
}

const criticalMailsTo = (address: string) => smtp.messages().filter((m) => m.to.includes(address) && /Critical finding/.test(m.subject));

beforeAll(async () => {
  db = await connectTestDb();
  s3 = await startFakeS3();
  smtp = await startFakeSmtp();
  mail = testMailService(smtp);
  trimout = buildTestApp(db, { objectStore: s3.store, mail });
  job1 = await buildWalkJob();
  job2 = await buildWalkJob(job1);
  companyA = job1.subA.companyId;
  companyB = job1.subB.companyId;
  // Home company A; on job 2 a subcontractor for A.
  person = await buildUser({ companyId: companyA });
  await addMember(job2.job.id, person.id, 'subcontractor');

  // On job 1 the GC manager invites this existing account as a subcontractor for company B.
  gc = await signIn(trimout.app, job1.gcManager.email);
  const invited = await gc.agent
    .post(`/api/jobs/${job1.job.id}/invitations`)
    .set('X-CSRF-Token', gc.csrf)
    .send({ email: person.email, role: 'subcontractor', companyId: companyB });
  expect(invited.status).toBe(201);
  const token = tokenOf(await smtp.waitFor((m) => m.to.includes(person.email)), '/invite/');
  const agent = request.agent(trimout.app);
  const accepted = await agent.post(`/api/invitations/${token}`).set('X-CSRF-Token', await csrfFor(agent)).send({ password: TEST_PASSWORD });
  expect(accepted.status).toBe(200);
  expect(accepted.body.user.company.id).toBe(companyA); // the person's home company is unchanged
  me = { agent, csrf: accepted.body.csrfToken };

  // Critical findings, logged once the person is a confirmed member: A's must not mail them.
  smtp.clear();
  findings = {
    a1: await logFinding(job1, companyA, 'critical'),
    b1: await logFinding(job1, companyB, 'critical'),
    a2: await insertFinding(job2, { companyId: companyA }),
  };
});
afterAll(async () => {
  await trimout.close();
  await db.close();
  await s3.close();
  await smtp.close();
});

const J1 = (rest = '') => `/api/jobs/${job1.job.id}${rest}`;

describe('a subcontractor invited for another company than their own', () => {
  it('stores the invited company on the membership', async () => {
    const member = await JobMember.findOne({ where: { jobId: job1.job.id, userId: person.id } });
    expect(member!.companyId).toBe(companyB);
    const home = await JobMember.findOne({ where: { jobId: job2.job.id, userId: person.id } });
    expect(home!.companyId).toBe(companyA);
  });

  it('lists and opens company B’s findings on that job, never company A’s (404)', async () => {
    const list = await me.agent.get(J1('/findings')).expect(200);
    expect(list.body.items.map((f: { id: string }) => f.id)).toEqual([findings.b1.id]);
    await me.agent.get(J1(`/findings/${findings.b1.id}`)).expect(200);
    const refused = await me.agent.get(J1(`/findings/${findings.a1.id}`)).expect(404);
    expect(refused.body.error.id).toBe('not_found');
    await me.agent.get(J1(`/findings/${findings.a1.id}/events`)).expect(404);
    await me.agent.post(J1(`/findings/${findings.a1.id}/comments`)).set('X-CSRF-Token', me.csrf).send({ text: 'Ours?' }).expect(404);
  });

  it('serves company B’s photos and not company A’s', async () => {
    await me.agent.get(J1(`/photos/${findings.b1.photoId}`)).expect(200);
    await me.agent.get(J1(`/photos/${findings.b1.photoId}/thumb`)).expect(200);
    await me.agent.get(J1(`/photos/${findings.a1.photoId}`)).expect(404);
    await me.agent.get(J1(`/photos/${findings.a1.photoId}/thumb`)).expect(404);
  });

  it('counts company B’s findings on the board', async () => {
    const board = await me.agent.get(J1('/board')).expect(200);
    expect(board.body.companyScope).toBe(companyB);
    expect(board.body.totals.open).toBe(1);
    expect(board.body.totals.openCritical).toBe(1);
  });

  it('exports company B’s findings only in findings.csv', async () => {
    const csv = await me.agent.get(J1('/findings.csv')).buffer(true).expect(200);
    const rows = csv.text.trim().split(/\r?\n/);
    expect(rows).toHaveLength(2); // header + B's finding
    expect(csv.text).toContain(await companyName(companyB));
    expect(csv.text).not.toContain(await companyName(companyA));
  });

  it('has company B’s finding of job 1 and company A’s of job 2 in the inbox', async () => {
    const inbox = await me.agent.get('/api/inbox').expect(200);
    const ids = inbox.body.items.map((f: { id: string }) => f.id);
    expect(ids).toEqual(expect.arrayContaining([findings.b1.id, findings.a2.id]));
    expect(ids).not.toContain(findings.a1.id);
    expect(ids).toHaveLength(2);
  });

  it('still sees company A’s findings on the job where they work for A', async () => {
    const list = await me.agent.get(`/api/jobs/${job2.job.id}/findings`).expect(200);
    expect(list.body.items.map((f: { id: string }) => f.id)).toEqual([findings.a2.id]);
    await me.agent.get(`/api/jobs/${job2.job.id}/findings/${findings.a2.id}`).expect(200);
    expect((await me.agent.get(`/api/jobs/${job2.job.id}/board`).expect(200)).body.companyScope).toBe(companyA);
  });

  it('is listed under company B among the job’s members and counted for B among its companies', async () => {
    const members = await gc.agent.get(J1('/members')).expect(200);
    const row = members.body.items.find((m: { userId: string }) => m.userId === person.id);
    expect(row).toMatchObject({ companyId: companyB, companyName: await companyName(companyB) });
    const byCompany = await me.agent.get(J1(`/members?companyId=${companyB}`)).expect(200);
    expect(byCompany.body.items.map((m: { userId: string }) => m.userId)).toContain(person.id);
    const companies = await gc.agent.get(J1('/companies')).expect(200);
    const count = (id: string) => companies.body.items.find((c: { id: string }) => c.id === id).memberCount;
    expect(count(companyB)).toBe(2); // subcontractor B and this person
    expect(count(companyA)).toBe(1);
  });

  it('is mailed about company B’s critical finding on that job, not company A’s', async () => {
    await smtp.waitFor((m) => m.to.includes(person.email) && m.subject.includes(`#${findings.b1.number}`));
    await smtp.waitFor((m) => m.to.includes(job1.subA.email) && m.subject.includes(`#${findings.a1.number}`));
    await mail.outbox.idle();
    expect(criticalMailsTo(person.email).map((m) => m.subject)).toEqual([expect.stringContaining(`#${findings.b1.number}`)]);
  });

  it('gets company B’s findings in the digest for that job and A’s for the other', async () => {
    const content = await buildDigestContent(db.sequelize, person.id, 'daily');
    const ids = (jobId: string) => {
      const job = content!.subcontractorJobs.find((j) => j.jobId === jobId)!;
      return [...job.overdue, ...job.returned, ...job.fresh, ...job.rest].map((f) => f.findingId);
    };
    expect(content!.subcontractorJobs.find((j) => j.jobId === job1.job.id)!.company.id).toBe(companyB);
    expect(ids(job1.job.id)).toEqual([findings.b1.id]);
    expect(ids(job2.job.id)).toEqual([findings.a2.id]);
  });
});

async function companyName(id: string): Promise<string> {
  const [row] = (await db.sequelize.query(`SELECT name FROM companies WHERE id = $1`, { bind: [id] }))[0] as { name: string }[];
  return row!.name;
}
