/**
 * GET /api/inbox: a subcontractor's findings across their jobs (their company only, open and
 * fix-submitted), overdue first then by due date; groupBy=area groups by job, level and space;
 * a returned finding carries why it came back. Other roles: 403. Signed out: 401.
 */
import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { Finding } from '../../../server/models';
import { recordFindingEvent } from '../../../server/services/findings';
import { addDays, todayIn } from '../../../shared/rules/dates';
import { buildTestApp, signIn, type SignedIn } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildWalkJob, insertFinding, type People, type WalkJob } from '../../support/findings';

jest.setTimeout(180_000);

let db: Database;
let trimout: TrimoutApp;
let people: People;
let gc: SignedIn;
let subA: SignedIn;
let subB: SignedIn;
let job1: WalkJob;
let job2: WalkJob;

beforeAll(async () => {
  db = await connectTestDb();
  trimout = buildTestApp(db);
  job1 = await buildWalkJob();
  people = job1;
  job2 = await buildWalkJob(people);
  gc = await signIn(trimout.app, people.gcManager.email);
  subA = await signIn(trimout.app, people.subA.email);
  subB = await signIn(trimout.app, people.subB.email);
});
afterAll(async () => {
  await trimout.close();
  await db.close();
});

const today = () => todayIn('UTC');

describe('GET /api/inbox', () => {
  let due: Record<string, Finding>;
  beforeAll(async () => {
    due = {
      laterA: await insertFinding(job1, { dueOn: addDays(today(), 10) }),
      overdueOld: await insertFinding(job2, { dueOn: addDays(today(), -5) }),
      soonFix: await insertFinding(job1, { dueOn: addDays(today(), 2), status: 'fix_submitted' }),
      overdueNew: await insertFinding(job1, { dueOn: addDays(today(), -1), unitId: job1.wall.id }),
      closed: await insertFinding(job1, { dueOn: addDays(today(), -9), status: 'closed' }),
      voided: await insertFinding(job1, { dueOn: addDays(today(), -9), status: 'voided' }),
      companyB: await insertFinding(job1, { dueOn: addDays(today(), -9), companyId: job1.subB.companyId }),
      upstairs: await insertFinding(job2, { dueOn: addDays(today(), 4), unitId: job2.upstairs.id }),
    };
    // A finding on the other level: move it there (insertFinding puts findings on level 3).
    await Finding.update({ levelId: job2.otherLevel.id, spaceId: null }, { where: { id: due.upstairs!.id } });
    // A returned finding: return_count 1 with the "returned" event's reason.
    await Finding.update({ returnCount: 1 }, { where: { id: due.laterA!.id } });
    await Finding.sequelize!.transaction((transaction) =>
      recordFindingEvent(
        {
          findingId: due.laterA!.id,
          jobId: job1.job.id,
          actorId: job1.inspector.id,
          kind: 'returned',
          from: { status: 'fix_submitted', returnCount: 0 },
          to: { status: 'open', returnCount: 1 },
          reason: 'Insulation still split at the elbow.',
        },
        transaction,
      ),
    );
  });

  it('401 signed out; 403 for a user who is no job subcontractor; 400 for a bad query', async () => {
    await request(trimout.app).get('/api/inbox').expect(401);
    const refused = await gc.agent.get('/api/inbox').expect(403);
    expect(refused.body.error.message).toMatch(/subcontractor/);
    const bad = await subA.agent.get('/api/inbox?groupBy=trade').expect(400);
    expect(bad.body.error.message).toBe('query.groupBy: Use none or area.');
    await subA.agent.get('/api/inbox?sort=x').expect(400);
  });

  it("lists their company's active findings across jobs: overdue first, then by due date", async () => {
    const res = await subA.agent.get('/api/inbox').expect(200);
    const ids = res.body.items.map((i: { id: string }) => i.id);
    expect(ids).toEqual([due.overdueOld!.id, due.overdueNew!.id, due.soonFix!.id, due.upstairs!.id, due.laterA!.id]);
    expect(res.body.items[0]).toMatchObject({ jobId: job2.job.id, jobName: job2.job.name, overdue: true, companyId: job1.subA.companyId });
    expect(res.body.items.at(-1)).toMatchObject({ returnCount: 1, lastReturnReason: 'Insulation still split at the elbow.', overdue: false });
    expect(res.body.items[2]).toMatchObject({ status: 'fix_submitted', lastReturnReason: null });
    expect(res.body.groups).toBeNull();
    expect(res.body.counts).toEqual({ total: 5, overdue: 2, returned: 1, fixSubmitted: 1 });
    const onlyJob2 = await subA.agent.get(`/api/inbox?jobId=${job2.job.id}&status=open`).expect(200);
    expect(onlyJob2.body.items.map((i: { id: string }) => i.id)).toEqual([due.overdueOld!.id, due.upstairs!.id]);
  });

  it('never shows another company’s findings', async () => {
    const res = await subB.agent.get('/api/inbox').expect(200);
    expect(res.body.items.map((i: { id: string }) => i.id)).toEqual([due.companyB!.id]);
    expect(JSON.stringify(res.body)).not.toContain(due.laterA!.id);
  });

  it('groupBy=area: groups by job, level and space, findings in inbox order inside each', async () => {
    const res = await subA.agent.get('/api/inbox?groupBy=area').expect(200);
    const groups = res.body.groups as Array<{ jobId: string; levelId: string; spaceId: string | null; items: Array<{ id: string }> }>;
    const key = (g: { jobId: string; levelId: string; spaceId: string | null }) => `${g.jobId}|${g.levelId}|${g.spaceId}`;
    const expectedGroups = new Map<string, string[]>();
    for (const i of res.body.items as Array<{ id: string; jobId: string; levelId: string; spaceId: string | null }>) {
      expectedGroups.set(key(i), [...(expectedGroups.get(key(i)) ?? []), i.id]);
    }
    expect(groups).toHaveLength(expectedGroups.size);
    for (const g of groups) expect(g.items.map((i) => i.id)).toEqual(expectedGroups.get(key(g)));
    // job1: level 3 / Corridor 3A (laterA, soonFix in due order) and level 3 with no space (the wall unit).
    const job1Groups = groups.filter((g) => g.jobId === job1.job.id);
    expect(job1Groups.map((g) => [g.levelId, g.spaceId])).toEqual([
      [job1.level.id, job1.space.id],
      [job1.level.id, null],
    ]);
    expect(job1Groups[0]!.items.map((i) => i.id)).toEqual([due.soonFix!.id, due.laterA!.id]);
    // job2: level 3 before level 4 (level order).
    const job2Groups = groups.filter((g) => g.jobId === job2.job.id);
    expect(job2Groups.map((g) => g.levelId)).toEqual([job2.level.id, job2.otherLevel.id]);
  });
});
