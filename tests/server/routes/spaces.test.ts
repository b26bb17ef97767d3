import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { Space, SpaceLink } from '../../../server/models';
import { ifMatch, jobPath, newJobFor, signInCrew, type SignedCrew } from '../../support/api';
import { buildTestApp } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildJobWithCrew, buildLevel, buildSpace, buildUnit } from '../../support/factories';

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

async function setUp() {
  const job = await newJobFor(crew);
  const l1 = await buildLevel(job.id, { name: 'Level 1' });
  const l2 = await buildLevel(job.id, { name: 'Level 2' });
  return { job, l1, l2 };
}

describe('spaces', () => {
  it('answers 401 signed out', async () => {
    const { job } = await setUp();
    await request(trimout.app).get(jobPath(job.id, '/spaces')).expect(401);
  });

  it('creates a space from typed quantities (ft² and ft-in), stored in m² and mm', async () => {
    const { job, l1 } = await setUp();
    const res = await crew.gc.post(jobPath(job.id, '/spaces'), {
      levelId: l1.id,
      name: 'Server room',
      floorArea: '100 sq ft',
      ceilingHeight: `10' 6"`,
      occupancy: 'general',
      enclosed: true,
    });
    expect(res.status).toBe(201);
    expect(res.headers.etag).toBe('"v1"');
    expect(res.body.floorArea).toBeCloseTo(9.290304, 9); // 100 × 0.3048² m² exactly
    expect(res.body.ceilingHeight).toBeCloseTo(3200.4, 9); // 126 in × 25.4 mm
    expect(res.body.volume).toBeCloseTo(9.290304 * 3.2004, 9);
    expect(res.body).toMatchObject({ name: 'Server room', levelName: 'Level 1', occupancy: 'general', enclosed: true, linkedSpaceIds: [] });
    const metric = await crew.gc.post(jobPath(job.id, '/spaces'), { levelId: l1.id, name: 'Flat 1', floorArea: '11.2 m²', ceilingHeight: '3.2 m' });
    expect(metric.body).toMatchObject({ floorArea: 11.2, ceilingHeight: 3200 });
  });

  it('answers 400 with a message for unreadable quantities and an unknown level', async () => {
    const { job, l1 } = await setUp();
    const bad = await crew.gc.post(jobPath(job.id, '/spaces'), { levelId: l1.id, name: 'X', ceilingHeight: '10 6' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toMatch(/^ceilingHeight: /);
    const area = await crew.gc.post(jobPath(job.id, '/spaces'), { levelId: l1.id, name: 'X', floorArea: '10 ft' });
    expect(area.status).toBe(400);
    expect(area.body.error.fields.floorArea).toBeDefined();
    const other = await buildLevel((await newJobFor(crew)).id);
    const level = await crew.gc.post(jobPath(job.id, '/spaces'), { levelId: other.id, name: 'X' });
    expect(level.status).toBe(400);
    expect(level.body.error.message).toBe('levelId: Not a level of this job.');
  });

  it('lists by level for every role', async () => {
    const { job, l1, l2 } = await setUp();
    await buildSpace(job.id, l1.id, { name: 'Office 101' });
    await buildSpace(job.id, l2.id, { name: 'Office 201' });
    for (const who of [crew.gc, crew.insp, crew.sub]) {
      const res = await who.get(jobPath(job.id, `/spaces?levelId=${l2.id}`));
      expect(res.status).toBe(200);
      expect(res.body.items.map((s: { name: string }) => s.name)).toEqual(['Office 201']);
    }
  });

  it('links spaces (permanent openings) symmetrically and replaces the set on PATCH', async () => {
    const { job, l1 } = await setUp();
    const a = await buildSpace(job.id, l1.id, { name: 'A' });
    const b = await buildSpace(job.id, l1.id, { name: 'B' });
    const c = await buildSpace(job.id, l1.id, { name: 'C' });
    const linked = await crew.gc.patch(jobPath(job.id, `/spaces/${a.id}`), { linkedSpaceIds: [b.id, c.id] }, ifMatch(1));
    expect(linked.status).toBe(200);
    expect(linked.body.linkedSpaceIds).toEqual([b.id, c.id].sort());
    expect((await crew.insp.get(jobPath(job.id, `/spaces/${b.id}`))).body.linkedSpaceIds).toEqual([a.id]);
    const replaced = await crew.gc.patch(jobPath(job.id, `/spaces/${a.id}`), { linkedSpaceIds: [c.id] }, ifMatch(2));
    expect(replaced.body.linkedSpaceIds).toEqual([c.id]);
    expect(await SpaceLink.count({ where: { jobId: job.id } })).toBe(1);
    const self = await crew.gc.patch(jobPath(job.id, `/spaces/${a.id}`), { linkedSpaceIds: [a.id] }, ifMatch(3));
    expect(self.status).toBe(400);
    expect(self.body.error.message).toBe('linkedSpaceIds: A space cannot be linked to itself.');
  });

  it('changes with If-Match (428 / 412 / 200); moving a space moves its units', async () => {
    const { job, l1, l2 } = await setUp();
    const space = await buildSpace(job.id, l1.id, { name: 'Office' });
    const unit = await buildUnit(job.id, l1.id, { spaceId: space.id });
    const path = jobPath(job.id, `/spaces/${space.id}`);
    expect((await crew.gc.patch(path, { name: 'Office 1' })).status).toBe(428);
    const stale = await crew.gc.patch(path, { name: 'Office 1' }, ifMatch(9));
    expect(stale.status).toBe(412);
    expect(stale.body.current).toMatchObject({ name: 'Office', version: 1 });
    const ok = await crew.gc.patch(path, { name: 'Office 1', levelId: l2.id, floorArea: null, occupancy: 'institutional' }, ifMatch(1));
    expect(ok.status).toBe(200);
    expect(ok.body).toMatchObject({ name: 'Office 1', levelId: l2.id, floorArea: null, volume: null, occupancy: 'institutional', version: 2 });
    const moved = await crew.gc.get(jobPath(job.id, `/units/${unit.id}`));
    expect(moved.body).toMatchObject({ levelId: l2.id, version: 2 });
  });

  it('refuses to delete a space with units (409 naming them), deletes an empty one', async () => {
    const { job, l1 } = await setUp();
    const space = await buildSpace(job.id, l1.id, { name: 'Flat 3' });
    await buildUnit(job.id, l1.id, { spaceId: space.id });
    const refused = await crew.gc.del(jobPath(job.id, `/spaces/${space.id}`), ifMatch(1));
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toBe('Flat 3 still has 1 unit. Move those units to another space (or clear their space) first.');
    const empty = await buildSpace(job.id, l1.id);
    expect((await crew.gc.del(jobPath(job.id, `/spaces/${empty.id}`))).status).toBe(428);
    expect((await crew.gc.del(jobPath(job.id, `/spaces/${empty.id}`), ifMatch(1))).status).toBe(204);
  });

  it.each(['insp', 'sub'] as const)('refuses space writes to the %s (403)', async (who) => {
    const { job, l1 } = await setUp();
    const space = await buildSpace(job.id, l1.id);
    expect((await crew[who].post(jobPath(job.id, '/spaces'), { levelId: l1.id, name: 'X' })).status).toBe(403);
    expect((await crew[who].patch(jobPath(job.id, `/spaces/${space.id}`), { name: 'X' }, ifMatch(1))).status).toBe(403);
    expect((await crew[who].del(jobPath(job.id, `/spaces/${space.id}`), ifMatch(1))).status).toBe(403);
    expect(await Space.count({ where: { jobId: job.id } })).toBe(1);
  });

  it("answers 404 for another job's spaces", async () => {
    const other = await buildJobWithCrew();
    const level = await buildLevel(other.job.id);
    const space = await buildSpace(other.job.id, level.id);
    expect((await crew.gc.get(jobPath(other.job.id, '/spaces'))).status).toBe(404);
    const { job } = await setUp();
    expect((await crew.gc.get(jobPath(job.id, `/spaces/${space.id}`))).status).toBe(404);
    expect((await crew.gc.del(jobPath(job.id, `/spaces/${space.id}`), ifMatch(1))).status).toBe(404);
  });

  it('replays a create with the same Idempotency-Key', async () => {
    const { job, l1 } = await setUp();
    const key = { 'Idempotency-Key': `space-${job.id}` };
    const body = { levelId: l1.id, name: 'Corridor' };
    const first = await crew.gc.post(jobPath(job.id, '/spaces'), body, key);
    const again = await crew.gc.post(jobPath(job.id, '/spaces'), body, key);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(again.body.id).toBe(first.body.id);
    expect(await Space.count({ where: { jobId: job.id } })).toBe(1);
    expect((await crew.gc.post(jobPath(job.id, '/spaces'), { ...body, name: 'Lobby' }, key)).status).toBe(422);
  });
});
