import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { JobMember } from '../../../server/models';
import { caller, jobPath, newJobFor, signInCrew, type SignedCrew } from '../../support/api';
import { buildTestApp, signIn } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { addMember, buildJobWithCrew, buildUser } from '../../support/factories';

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

async function memberId(jobId: string, userId: string) {
  return (await JobMember.findOne({ where: { jobId, userId } }))!.id;
}

describe('members', () => {
  it('answers 401 signed out', async () => {
    const job = await newJobFor(crew);
    await request(trimout.app).get(jobPath(job.id, '/members')).expect(401);
  });

  it('lists members by name: e-mail addresses for GC managers only', async () => {
    const job = await newJobFor(crew);
    const gcList = await crew.gc.get(jobPath(job.id, '/members'));
    expect(gcList.status).toBe(200);
    expect(gcList.body.items).toHaveLength(4);
    expect(gcList.body.items.every((m: { email: string | null }) => typeof m.email === 'string')).toBe(true);
    for (const who of [crew.insp, crew.sub]) {
      const list = await who.get(jobPath(job.id, '/members'));
      expect(list.status).toBe(200);
      expect(list.body.items).toHaveLength(4);
      expect(list.body.items.every((m: { email: string | null; name: string; role: string }) => m.email === null && m.name && m.role)).toBe(true);
    }
    const subs = await crew.insp.get(jobPath(job.id, '/members?role=subcontractor'));
    expect(subs.body.items.map((m: { userId: string }) => m.userId).sort()).toEqual([crew.subA.id, crew.subB.id].sort());
    const byCompany = await crew.insp.get(jobPath(job.id, `/members?companyId=${crew.gcCompany.id}`));
    expect(byCompany.body.items.map((m: { userId: string }) => m.userId)).toEqual([crew.gcManager.id]);
    const page = await crew.gc.get(jobPath(job.id, '/members?limit=3'));
    const rest = await crew.gc.get(jobPath(job.id, `/members?limit=3&cursor=${page.body.nextCursor}`));
    expect([...page.body.items, ...rest.body.items].map((m: { id: string }) => m.id)).toHaveLength(4);
    expect(rest.body.nextCursor).toBeNull();
  });

  it('changes a role (400 for an unknown role) and removes a member, whose access ends at once', async () => {
    const job = await newJobFor(crew);
    const id = await memberId(job.id, crew.inspector.id);
    const bad = await crew.gc.patch(jobPath(job.id, `/members/${id}`), { role: 'owner' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toBe('role: Choose a role.');
    const ok = await crew.gc.patch(jobPath(job.id, `/members/${id}`), { role: 'gc_manager' });
    expect(ok.status).toBe(200);
    expect(ok.body).toMatchObject({ userId: crew.inspector.id, role: 'gc_manager' });
    await crew.gc.patch(jobPath(job.id, `/members/${id}`), { role: 'inspector' });
    expect((await crew.insp.get(jobPath(job.id, '/levels'))).status).toBe(200);
    expect((await crew.gc.del(jobPath(job.id, `/members/${id}`))).status).toBe(204);
    expect((await crew.insp.get(jobPath(job.id, '/levels'))).status).toBe(404);
  });

  it('keeps at least one GC manager (409)', async () => {
    const job = await newJobFor(crew);
    const own = await memberId(job.id, crew.gcManager.id);
    const demote = await crew.gc.patch(jobPath(job.id, `/members/${own}`), { role: 'inspector' });
    expect(demote.status).toBe(409);
    expect(demote.body.error.message).toBe("This is the job's only GC manager: add another GC manager before changing this role.");
    expect((await crew.gc.del(jobPath(job.id, `/members/${own}`))).status).toBe(409);
    const second = await buildUser({ companyId: crew.gcCompany.id });
    await addMember(job.id, second.id, 'gc_manager');
    const secondCaller = caller(await signIn(trimout.app, second.email));
    expect((await secondCaller.del(jobPath(job.id, `/members/${own}`))).status).toBe(204);
  });

  it.each(['insp', 'sub'] as const)('refuses member changes to the %s (403)', async (who) => {
    const job = await newJobFor(crew);
    const id = await memberId(job.id, crew.subB.id);
    expect((await crew[who].patch(jobPath(job.id, `/members/${id}`), { role: 'inspector' })).status).toBe(403);
    expect((await crew[who].del(jobPath(job.id, `/members/${id}`))).status).toBe(403);
    expect(await JobMember.count({ where: { id } })).toBe(1);
  });

  it("answers 404 for another job's members", async () => {
    const other = await buildJobWithCrew();
    expect((await crew.gc.get(jobPath(other.job.id, '/members'))).status).toBe(404);
    const job = await newJobFor(crew);
    const theirs = await memberId(other.job.id, other.inspector.id);
    expect((await crew.gc.del(jobPath(job.id, `/members/${theirs}`))).status).toBe(404);
    expect(await JobMember.count({ where: { id: theirs } })).toBe(1);
  });
});
