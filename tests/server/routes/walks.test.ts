/**
 * Walks and a level's units at a glance: every route per role (GC manager, inspector,
 * subcontractor, non-member, signed out), validation messages, coverage counts and paging.
 */
import { randomUUID } from 'node:crypto';
import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { buildTestApp, csrfFor, signIn, type SignedIn } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { addMember, buildUser } from '../../support/factories';
import { buildWalkJob, everyItem, insertFinding, type People, type WalkJob } from '../../support/findings';

jest.setTimeout(120_000);

let db: Database;
let trimout: TrimoutApp;
let signedIn: Omit<Crew, 'w'> & { people: People };

beforeAll(async () => {
  db = await connectTestDb();
  trimout = buildTestApp(db);
  const first = await buildWalkJob();
  const outsiderUser = await buildUser();
  signedIn = {
    people: first,
    gc: await signIn(trimout.app, first.gcManager.email),
    inspector: await signIn(trimout.app, first.inspector.email),
    subA: await signIn(trimout.app, first.subA.email),
    outsider: await signIn(trimout.app, outsiderUser.email),
  };
});
afterAll(async () => {
  await trimout.close();
  await db.close();
});

const MISSING = '00000000-0000-4000-8000-000000000000';

interface Crew {
  w: WalkJob;
  gc: SignedIn;
  inspector: SignedIn;
  subA: SignedIn;
  outsider: SignedIn;
}

/** A fresh job whose crew are the users signed in once for this file. */
async function crew(): Promise<Crew> {
  const { people, ...agents } = signedIn;
  return { w: await buildWalkJob(people), ...agents };
}

function startWalk(who: SignedIn, jobId: string, body: unknown, key?: string) {
  const req = who.agent.post(`/api/jobs/${jobId}/walks`).set('X-CSRF-Token', who.csrf);
  if (key) req.set('Idempotency-Key', key);
  return req.send(body as object);
}

function check(who: SignedIn, w: WalkJob, unitId: string, body: unknown) {
  return who.agent.post(`/api/jobs/${w.job.id}/units/${unitId}/checks`).set('X-CSRF-Token', who.csrf).send(body as object);
}

describe('POST /api/jobs/:jobId/walks', () => {
  it('answers 401 to a signed-out caller', async () => {
    const { w } = await crew();
    const agent = request.agent(trimout.app);
    const csrf = await csrfFor(agent);
    const res = await agent.post(`/api/jobs/${w.job.id}/walks`).set('X-CSRF-Token', csrf).send({ levelId: w.level.id }).expect(401);
    expect(res.body.error.id).toBe('unauthorized');
  });

  it('lets the inspector start a walk on a level (201) with the coverage of the level', async () => {
    const { w, inspector } = await crew();
    const res = await startWalk(inspector, w.job.id, { levelId: w.level.id }).expect(201);
    expect(res.body).toMatchObject({
      levelId: w.level.id,
      levelName: 'Level 3',
      inspector: { id: w.inspector.id },
      finishedAt: null,
      checkCount: 0,
      coverage: { checked: 0, total: 3, inProgress: 0, withOpenFindings: 0 },
      checkedInWalk: 0,
    });
  });

  it('lets a GC manager start one too', async () => {
    const { w, gc } = await crew();
    await startWalk(gc, w.job.id, { levelId: w.level.id }).expect(201);
  });

  it('refuses a subcontractor (403) and a non-member (404)', async () => {
    const { w, subA, outsider } = await crew();
    const sub = await startWalk(subA, w.job.id, { levelId: w.level.id }).expect(403);
    expect(sub.body.error.id).toBe('forbidden');
    await startWalk(outsider, w.job.id, { levelId: w.level.id }).expect(404);
  });

  it('answers 400 with a message for a missing level, an unknown key or a level of another job', async () => {
    const { w, inspector } = await crew();
    const other = await buildWalkJob();
    const missing = await startWalk(inspector, w.job.id, {}).expect(400);
    expect(missing.body.error.message).toBe('levelId: Choose a level.');
    const extra = await startWalk(inspector, w.job.id, { levelId: w.level.id, finishedAt: 'now' }).expect(400);
    expect(extra.body.error.message).toMatch(/finishedAt|Unrecognized/i);
    const foreign = await startWalk(inspector, w.job.id, { levelId: other.level.id }).expect(400);
    expect(foreign.body.error.message).toBe('levelId: That level is not on this job.');
  });

  it('replays a retried start with the same Idempotency-Key instead of starting a second walk', async () => {
    const { w, inspector } = await crew();
    const first = await startWalk(inspector, w.job.id, { levelId: w.level.id }, 'walk-start-0001').expect(201);
    const again = await startWalk(inspector, w.job.id, { levelId: w.level.id }, 'walk-start-0001').expect(201);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(again.body.id).toBe(first.body.id);
    const list = await inspector.agent.get(`/api/jobs/${w.job.id}/walks`).expect(200);
    expect(list.body.items).toHaveLength(1);
  });

  it('takes a walk id made on the phone (a walk started with no signal): the checks queued after it name it, and sending it again under another key is that walk again', async () => {
    const { w, inspector, gc } = await crew();
    const id = randomUUID();
    const first = await startWalk(inspector, w.job.id, { levelId: w.level.id, id }, `walk-${id}`).expect(201);
    expect(first.body).toMatchObject({ id, levelId: w.level.id, inspector: { id: w.inspector.id }, finishedAt: null });
    // A check queued after the walk on the phone names it.
    await check(inspector, w, w.cassette.id, { walkId: id, items: await everyItem(w.job.id, 'cassette_4way'), complete: true }).expect(201);
    // The same walk sent again with another key (a key lost with a cleared queue): no second walk.
    const again = await startWalk(inspector, w.job.id, { levelId: w.level.id, id }, `walk-again-${id}`).expect(201);
    expect(again.headers['idempotent-replayed']).toBeUndefined();
    expect(again.body).toMatchObject({ id, checkCount: 1 });
    const list = await inspector.agent.get(`/api/jobs/${w.job.id}/walks`).expect(200);
    expect(list.body.items.map((x: { id: string }) => x.id)).toEqual([id]);
    // The id names another person's walk, or this walk on another level: refused, nothing written.
    const taken = await startWalk(gc, w.job.id, { levelId: w.level.id, id }).expect(409);
    expect(taken.body.error).toMatchObject({ id: 'walk_id_taken', message: 'This walk id is already used. Start the walk again to give it a new id.' });
    await startWalk(inspector, w.job.id, { levelId: w.otherLevel.id, id }).expect(409);
    const other = await crew();
    await startWalk(other.inspector, other.w.job.id, { levelId: other.w.level.id, id }).expect(409);
    expect((await gc.agent.get(`/api/jobs/${w.job.id}/walks`).expect(200)).body.items).toHaveLength(1);
    // Not an id: a field error.
    const bad = await startWalk(inspector, w.job.id, { levelId: w.level.id, id: 'walk-1' }).expect(400);
    expect(Object.keys(bad.body.error.fields)).toEqual(['id']);
  });
});

describe('GET /api/jobs/:jobId/walks and /walks/:walkId', () => {
  it('lists walks newest first with filters and a cursor', async () => {
    const { w, inspector, gc } = await crew();
    const a = (await startWalk(inspector, w.job.id, { levelId: w.level.id }).expect(201)).body;
    const b = (await startWalk(gc, w.job.id, { levelId: w.otherLevel.id }).expect(201)).body;
    const c = (await startWalk(inspector, w.job.id, { levelId: w.level.id }).expect(201)).body;
    const all = await gc.agent.get(`/api/jobs/${w.job.id}/walks`).expect(200);
    expect(all.body.items.map((x: { id: string }) => x.id)).toEqual([c.id, b.id, a.id]);
    const onLevel = await gc.agent.get(`/api/jobs/${w.job.id}/walks?levelId=${w.level.id}`).expect(200);
    expect(onLevel.body.items.map((x: { id: string }) => x.id)).toEqual([c.id, a.id]);
    const mine = await gc.agent.get(`/api/jobs/${w.job.id}/walks?inspectorId=${w.gcManager.id}`).expect(200);
    expect(mine.body.items.map((x: { id: string }) => x.id)).toEqual([b.id]);
    const page1 = await gc.agent.get(`/api/jobs/${w.job.id}/walks?limit=2`).expect(200);
    expect(page1.body.items).toHaveLength(2);
    const page2 = await gc.agent.get(`/api/jobs/${w.job.id}/walks?limit=2&cursor=${page1.body.nextCursor}`).expect(200);
    expect(page2.body.items.map((x: { id: string }) => x.id)).toEqual([a.id]);
    expect(page2.body.nextCursor).toBeNull();
    await inspector.agent.post(`/api/jobs/${w.job.id}/walks/${a.id}/finish`).set('X-CSRF-Token', inspector.csrf).send({}).expect(200);
    const open = await gc.agent.get(`/api/jobs/${w.job.id}/walks?open=true`).expect(200);
    expect(open.body.items.map((x: { id: string }) => x.id)).toEqual([c.id, b.id]);
    const finished = await gc.agent.get(`/api/jobs/${w.job.id}/walks?open=false`).expect(200);
    expect(finished.body.items.map((x: { id: string }) => x.id)).toEqual([a.id]);
  });

  it('answers 400 for a bad filter, 403 to a subcontractor, 404 to a non-member, 401 signed out', async () => {
    const { w, inspector, subA, outsider } = await crew();
    const bad = await inspector.agent.get(`/api/jobs/${w.job.id}/walks?limit=500`).expect(400);
    expect(bad.body.error.message).toBe('query.limit: At most 200.');
    const badOpen = await inspector.agent.get(`/api/jobs/${w.job.id}/walks?open=maybe`).expect(400);
    expect(badOpen.body.error.message).toBe('query.open: Use true or false.');
    await subA.agent.get(`/api/jobs/${w.job.id}/walks`).expect(403);
    await outsider.agent.get(`/api/jobs/${w.job.id}/walks`).expect(404);
    await request(trimout.app).get(`/api/jobs/${w.job.id}/walks`).expect(401);
  });

  it('shows one walk with coverage: units checked of units on the level', async () => {
    const { w, inspector, gc, subA, outsider } = await crew();
    const walk = (await startWalk(inspector, w.job.id, { levelId: w.level.id }).expect(201)).body;
    const mt01 = w.byCode('MT-01');
    await check(inspector, w, w.cassette.id, { walkId: walk.id, items: await everyItem(w.job.id, 'cassette_4way'), complete: true }).expect(201);
    await check(inspector, w, w.cassette2.id, { walkId: walk.id, items: [{ catalogueItemId: mt01.id, mark: 'ok' }], complete: false }).expect(201);
    await insertFinding(w, { unitId: w.wall.id, code: w.notForCassettes.code, severity: 'critical' });
    const res = await gc.agent.get(`/api/jobs/${w.job.id}/walks/${walk.id}`).expect(200);
    expect(res.body.coverage).toEqual({ checked: 1, total: 3, inProgress: 1, withOpenFindings: 1 });
    expect(res.body.checkedInWalk).toBe(1);
    expect(res.body.checkCount).toBe(2);
    await subA.agent.get(`/api/jobs/${w.job.id}/walks/${walk.id}`).expect(403);
    await outsider.agent.get(`/api/jobs/${w.job.id}/walks/${walk.id}`).expect(404);
    await gc.agent.get(`/api/jobs/${w.job.id}/walks/${MISSING}`).expect(404);
    const bad = await gc.agent.get(`/api/jobs/${w.job.id}/walks/not-a-uuid`).expect(400);
    expect(bad.body.error.message).toBe('params.walkId: This link does not name a walk: open the walk from its list.');
  });

  it('counts what the walk recorded in the words of the level: units checked, units in progress (an unfinished check, or a finding logged before the check is saved), findings logged', async () => {
    const { w, inspector } = await crew();
    const walk = (await startWalk(inspector, w.job.id, { levelId: w.level.id }).expect(201)).body;
    expect(walk).toMatchObject({ checkCount: 0, unitsChecked: 0, unitsInProgress: 0, findingCount: 0 });
    // A finding logged from the wall unit's check before the check is saved: one unit in progress, not "0 unit checks".
    await insertFinding(w, { unitId: w.wall.id, code: w.notForCassettes.code, walkId: walk.id });
    const afterFinding = await inspector.agent.get(`/api/jobs/${w.job.id}/walks?levelId=${w.level.id}&open=true`).expect(200);
    expect(afterFinding.body.items[0]).toMatchObject({ id: walk.id, checkCount: 0, unitsChecked: 0, unitsInProgress: 1, findingCount: 1 });
    // A voided finding is not counted; an unfinished check makes its unit in progress; a complete one, checked.
    await insertFinding(w, { unitId: w.cassette2.id, status: 'voided', walkId: walk.id });
    await check(inspector, w, w.cassette2.id, { walkId: walk.id, items: [{ catalogueItemId: w.byCode('MT-01').id, mark: 'ok' }], complete: false }).expect(201);
    await check(inspector, w, w.cassette.id, { walkId: walk.id, items: await everyItem(w.job.id, 'cassette_4way'), complete: true }).expect(201);
    const now = await inspector.agent.get(`/api/jobs/${w.job.id}/walks/${walk.id}`).expect(200);
    expect(now.body).toMatchObject({ checkCount: 2, unitsChecked: 1, unitsInProgress: 2, findingCount: 1 });
    // The wall unit's check completed in the walk: it moves from in progress to checked.
    // Its item with the finding is marked as a defect (an item with an unresolved finding cannot be OK).
    const wallItems = (await everyItem(w.job.id, 'wall_mounted')).map((i) => (i.catalogueItemId === w.notForCassettes.id ? { ...i, mark: 'defect' as const } : i));
    await check(inspector, w, w.wall.id, { walkId: walk.id, items: wallItems, complete: true }).expect(201);
    const done = await inspector.agent.get(`/api/jobs/${w.job.id}/walks/${walk.id}`).expect(200);
    expect(done.body).toMatchObject({ checkCount: 3, unitsChecked: 2, unitsInProgress: 1, findingCount: 1 });
  });

  it('does not show a walk of another job by id (404)', async () => {
    const { w, gc, inspector } = await crew();
    const other = await crew();
    const walk = (await startWalk(inspector, other.w.job.id, { levelId: other.w.level.id }).expect(201)).body;
    await gc.agent.get(`/api/jobs/${w.job.id}/walks/${walk.id}`).expect(404);
    await gc.agent.get(`/api/jobs/${other.w.job.id}/walks/${walk.id}`).expect(200);
  });
});

describe('POST /api/jobs/:jobId/walks/:walkId/finish', () => {
  it('lets the walk inspector or a GC manager finish it, not another inspector; a finished walk takes no checks', async () => {
    const { w, inspector, gc, subA } = await crew();
    const second = await buildUser();
    await addMember(w.job.id, second.id, 'inspector');
    const other = await signIn(trimout.app, second.email);
    const walk = (await startWalk(inspector, w.job.id, { levelId: w.level.id }).expect(201)).body;
    const refused = await other.agent.post(`/api/jobs/${w.job.id}/walks/${walk.id}/finish`).set('X-CSRF-Token', other.csrf).send({}).expect(403);
    expect(refused.body.error.message).toBe('Only the inspector who started this walk or a GC manager can finish it.');
    await subA.agent.post(`/api/jobs/${w.job.id}/walks/${walk.id}/finish`).set('X-CSRF-Token', subA.csrf).send({}).expect(403);
    const bad = await gc.agent.post(`/api/jobs/${w.job.id}/walks/${walk.id}/finish`).set('X-CSRF-Token', gc.csrf).send({ at: 'now' }).expect(400);
    expect(bad.body.error.message).toMatch(/^at: |Leave out at/);
    const done = await gc.agent.post(`/api/jobs/${w.job.id}/walks/${walk.id}/finish`).set('X-CSRF-Token', gc.csrf).send({}).expect(200);
    expect(done.body.finishedAt).toEqual(expect.any(String));
    const again = await inspector.agent.post(`/api/jobs/${w.job.id}/walks/${walk.id}/finish`).set('X-CSRF-Token', inspector.csrf).send({}).expect(200);
    expect(again.body.finishedAt).toBe(done.body.finishedAt);
    const late = await check(inspector, w, w.cassette.id, {
      walkId: walk.id,
      items: [{ catalogueItemId: w.byCode('MT-01').id, mark: 'ok' }],
      complete: true,
    }).expect(409);
    expect(late.body.error.message).toBe('That walk is finished. Start a new walk to record more checks.');
    await gc.agent.post(`/api/jobs/${w.job.id}/walks/${MISSING}/finish`).set('X-CSRF-Token', gc.csrf).send({}).expect(404);
  });
});

describe('GET /api/jobs/:jobId/levels/:levelId/walk-units', () => {
  it('lists the level units with their state, worst severity and counts; filters; pages', async () => {
    const { w, inspector, gc } = await crew();
    const mt01 = w.byCode('MT-01');
    await check(inspector, w, w.cassette.id, { items: await everyItem(w.job.id, 'cassette_4way'), complete: true }).expect(201);
    await check(inspector, w, w.cassette2.id, { items: [{ catalogueItemId: mt01.id, mark: 'ok' }], complete: false }).expect(201);
    await insertFinding(w, { unitId: w.wall.id, code: w.notForCassettes.code, severity: 'minor' });
    await insertFinding(w, { unitId: w.wall.id, code: w.notForCassettes.code, severity: 'critical', companyId: w.subB.companyId });
    await insertFinding(w, { unitId: w.wall.id, code: w.notForCassettes.code, severity: 'critical', status: 'closed' });

    const res = await gc.agent.get(`/api/jobs/${w.job.id}/levels/${w.level.id}/walk-units`).expect(200);
    expect(res.body.items.map((u: { tag: string; state: string }) => [u.tag, u.state])).toEqual([
      ['IU-3-01', 'checked_ok'],
      ['IU-3-02', 'in_progress'],
      ['IU-3-03', 'open_findings'],
    ]);
    const wall = res.body.items[2];
    expect(wall).toMatchObject({ openFindings: 2, worstSeverity: 'critical', lastCheck: null });
    expect(res.body.items[0]).toMatchObject({
      modelName: 'CX-24',
      spaceName: 'Corridor 3A',
      openFindings: 0,
      worstSeverity: null,
      lastCheck: { checkedBy: { id: w.inspector.id }, complete: true },
    });
    expect(res.body.counts).toEqual({ total: 3, checked: 1, notChecked: 1, inProgress: 1, withOpenFindings: 1 });
    expect(res.body.coverage).toEqual({ checked: 1, total: 3, inProgress: 1, withOpenFindings: 1 });

    const q = await inspector.agent.get(`/api/jobs/${w.job.id}/levels/${w.level.id}/walk-units?q=3-0`).expect(200);
    expect(q.body.items).toHaveLength(3);
    const kind = await inspector.agent.get(`/api/jobs/${w.job.id}/levels/${w.level.id}/walk-units?kind=wall_mounted`).expect(200);
    expect(kind.body.items.map((u: { tag: string }) => u.tag)).toEqual(['IU-3-03']);
    expect(kind.body.counts.total).toBe(1);
    expect(kind.body.coverage.total).toBe(3);
    const space = await inspector.agent.get(`/api/jobs/${w.job.id}/levels/${w.level.id}/walk-units?spaceId=${w.space.id}`).expect(200);
    expect(space.body.items.map((u: { tag: string }) => u.tag)).toEqual(['IU-3-01', 'IU-3-02']);
    const state = await inspector.agent.get(`/api/jobs/${w.job.id}/levels/${w.level.id}/walk-units?state=in_progress`).expect(200);
    expect(state.body.items.map((u: { tag: string }) => u.tag)).toEqual(['IU-3-02']);
    const tag = await inspector.agent.get(`/api/jobs/${w.job.id}/levels/${w.level.id}/walk-units?q=%25`).expect(200);
    expect(tag.body.items).toHaveLength(0);

    const p1 = await inspector.agent.get(`/api/jobs/${w.job.id}/levels/${w.level.id}/walk-units?limit=2`).expect(200);
    expect(p1.body.items.map((u: { tag: string }) => u.tag)).toEqual(['IU-3-01', 'IU-3-02']);
    const p2 = await inspector.agent
      .get(`/api/jobs/${w.job.id}/levels/${w.level.id}/walk-units?limit=2&cursor=${p1.body.nextCursor}`)
      .expect(200);
    expect(p2.body.items.map((u: { tag: string }) => u.tag)).toEqual(['IU-3-03']);
    expect(p2.body.nextCursor).toBeNull();
  });

  it('answers 400 for a bad filter, 403 to a subcontractor, 404 for another job or level, 401 signed out', async () => {
    const { w, inspector, subA, outsider } = await crew();
    const other = await buildWalkJob();
    const bad = await inspector.agent.get(`/api/jobs/${w.job.id}/levels/${w.level.id}/walk-units?state=done`).expect(400);
    expect(bad.body.error.message).toBe('query.state: One of not_checked, in_progress, checked_ok, open_findings.');
    await inspector.agent.get(`/api/jobs/${w.job.id}/levels/${w.level.id}/walk-units?color=red`).expect(400);
    await subA.agent.get(`/api/jobs/${w.job.id}/levels/${w.level.id}/walk-units`).expect(403);
    await outsider.agent.get(`/api/jobs/${w.job.id}/levels/${w.level.id}/walk-units`).expect(404);
    await inspector.agent.get(`/api/jobs/${w.job.id}/levels/${other.level.id}/walk-units`).expect(404);
    await request(trimout.app).get(`/api/jobs/${w.job.id}/levels/${w.level.id}/walk-units`).expect(401);
  });
});
