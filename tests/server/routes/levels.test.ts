import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { Level } from '../../../server/models';
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

/** The signed-in crew on a fresh job of their own. */
async function crewWithCallers() {
  const job = await newJobFor(crew);
  return { ...crew, job };
}

describe('levels', () => {
  it('answers 401 signed out', async () => {
    const crew = await buildJobWithCrew();
    await request(trimout.app).get(jobPath(crew.job.id, '/levels')).expect(401);
  });

  it('lets every role read the levels in order, with counts', async () => {
    const c = await crewWithCallers();
    const l1 = await buildLevel(c.job.id, { name: 'Level 1' });
    await buildLevel(c.job.id, { name: 'Level 2' });
    const space = await buildSpace(c.job.id, l1.id);
    await buildUnit(c.job.id, l1.id, { spaceId: space.id });
    for (const who of [c.gc, c.insp, c.sub]) {
      const res = await who.get(jobPath(c.job.id, '/levels'));
      expect(res.status).toBe(200);
      expect(res.body.items.map((l: { name: string; position: number }) => [l.name, l.position])).toEqual([
        ['Level 1', 1],
        ['Level 2', 2],
      ]);
      expect(res.body.items[0]).toMatchObject({ spaceCount: 1, unitCount: 1 });
      expect(res.body.nextCursor).toBeNull();
    }
  });

  it('pages with limit and cursor', async () => {
    const c = await crewWithCallers();
    for (let i = 1; i <= 5; i++) await buildLevel(c.job.id, { name: `L${i}` });
    const first = await c.insp.get(jobPath(c.job.id, '/levels?limit=2'));
    expect(first.body.items.map((l: { name: string }) => l.name)).toEqual(['L1', 'L2']);
    const second = await c.insp.get(jobPath(c.job.id, `/levels?limit=2&cursor=${first.body.nextCursor}`));
    expect(second.body.items.map((l: { name: string }) => l.name)).toEqual(['L3', 'L4']);
    expect((await c.insp.get(jobPath(c.job.id, '/levels?limit=201'))).status).toBe(400);
    const bad = await c.insp.get(jobPath(c.job.id, '/levels?cursor=nonsense'));
    expect(bad.status).toBe(400);
    expect(bad.body.error.id).toBe('invalid_cursor');
  });

  it('creates a level at the end (GC manager), with an ETag', async () => {
    const c = await crewWithCallers();
    await buildLevel(c.job.id, { name: 'Level 1' });
    const res = await c.gc.post(jobPath(c.job.id, '/levels'), { name: 'Level 2' });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ name: 'Level 2', position: 2, version: 1 });
    expect(res.headers.etag).toBe('"v1"');
  });

  it('answers 400 with a message for a missing or unknown field', async () => {
    const c = await crewWithCallers();
    const res = await c.gc.post(jobPath(c.job.id, '/levels'), { name: '' });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toBe('name: Enter a level name.');
    const extra = await c.gc.post(jobPath(c.job.id, '/levels'), { name: 'L', colour: 'red' });
    expect(extra.status).toBe(400);
  });

  it.each(['insp', 'sub'] as const)('refuses set-up changes to the %s with 403 and a message', async (who) => {
    const c = await crewWithCallers();
    const level = await buildLevel(c.job.id);
    const post = await c[who].post(jobPath(c.job.id, '/levels'), { name: 'Roof' });
    expect(post.status).toBe(403);
    expect(post.body.error.message).toMatch(/cannot do that/);
    expect((await c[who].patch(jobPath(c.job.id, `/levels/${level.id}`), { name: 'X' }, ifMatch(1))).status).toBe(403);
    expect((await c[who].del(jobPath(c.job.id, `/levels/${level.id}`), ifMatch(1))).status).toBe(403);
    expect((await c[who].post(jobPath(c.job.id, '/levels/order'), { levelIds: [level.id] })).status).toBe(403);
    expect(await Level.count({ where: { jobId: c.job.id } })).toBe(1);
  });

  it("answers 404 for another job's levels", async () => {
    const c = await crewWithCallers();
    const other = await buildJobWithCrew();
    const level = await buildLevel(other.job.id);
    expect((await c.gc.get(jobPath(other.job.id, '/levels'))).status).toBe(404);
    expect((await c.gc.post(jobPath(other.job.id, '/levels'), { name: 'X' })).status).toBe(404);
    // The level of another job, addressed through my own job, is not found either.
    expect((await c.gc.patch(jobPath(c.job.id, `/levels/${level.id}`), { name: 'X' }, ifMatch(1))).status).toBe(404);
  });

  it('refuses a duplicate name (case-insensitive) with 409', async () => {
    const c = await crewWithCallers();
    await buildLevel(c.job.id, { name: 'Level 1' });
    const res = await c.gc.post(jobPath(c.job.id, '/levels'), { name: 'level 1' });
    expect(res.status).toBe(409);
    expect(res.body.error.message).toBe('This job already has a level named "level 1".');
    const l2 = await buildLevel(c.job.id, { name: 'Level 2' });
    const rename = await c.gc.patch(jobPath(c.job.id, `/levels/${l2.id}`), { name: 'LEVEL 1' }, ifMatch(1));
    expect(rename.status).toBe(409);
  });

  it('renames with If-Match: 428 without it, 412 when stale (with the current level), 200 with a new ETag', async () => {
    const c = await crewWithCallers();
    const level = await buildLevel(c.job.id, { name: 'Levl 3' });
    const path = jobPath(c.job.id, `/levels/${level.id}`);
    const missing = await c.gc.patch(path, { name: 'Level 3' });
    expect(missing.status).toBe(428);
    const stale = await c.gc.patch(path, { name: 'Level 3' }, ifMatch(7));
    expect(stale.status).toBe(412);
    expect(stale.body.current).toMatchObject({ id: level.id, name: 'Levl 3', version: 1 });
    const ok = await c.gc.patch(path, { name: 'Level 3' }, ifMatch(1));
    expect(ok.status).toBe(200);
    expect(ok.body).toMatchObject({ name: 'Level 3', version: 2 });
    expect(ok.headers.etag).toBe('"v2"');
    expect((await c.gc.patch(path, { name: 'Level three' }, ifMatch(1))).status).toBe(412);
  });

  it('reorders with the full id list and keeps positions dense', async () => {
    const c = await crewWithCallers();
    const [a, b, d] = [await buildLevel(c.job.id, { name: 'A' }), await buildLevel(c.job.id, { name: 'B' }), await buildLevel(c.job.id, { name: 'D' })];
    const res = await c.gc.post(jobPath(c.job.id, '/levels/order'), { levelIds: [d.id, a.id, b.id] });
    expect(res.status).toBe(200);
    expect(res.body.items.map((l: { name: string; position: number }) => `${l.position}:${l.name}`)).toEqual(['1:D', '2:A', '3:B']);
    const partial = await c.gc.post(jobPath(c.job.id, '/levels/order'), { levelIds: [d.id, a.id] });
    expect(partial.status).toBe(409);
    expect(partial.body.error.message).toMatch(/every level/);
    const twice = await c.gc.post(jobPath(c.job.id, '/levels/order'), { levelIds: [d.id, d.id, a.id] });
    expect(twice.status).toBe(400);
  });

  it('deletes an empty level and closes the gap; refuses one with spaces or units (409 naming them)', async () => {
    const c = await crewWithCallers();
    const l1 = await buildLevel(c.job.id, { name: 'Level 1' });
    const l2 = await buildLevel(c.job.id, { name: 'Level 2' });
    await buildLevel(c.job.id, { name: 'Level 3' });
    const space = await buildSpace(c.job.id, l1.id);
    await buildUnit(c.job.id, l1.id, { spaceId: space.id });
    await buildUnit(c.job.id, l1.id);
    const refused = await c.gc.del(jobPath(c.job.id, `/levels/${l1.id}`), ifMatch(1));
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toBe('Level 1 still has 1 space and 2 units. Move or delete them first.');
    expect((await c.gc.del(jobPath(c.job.id, `/levels/${l2.id}`))).status).toBe(428);
    expect((await c.gc.del(jobPath(c.job.id, `/levels/${l2.id}`), ifMatch(1))).status).toBe(204);
    const list = await c.gc.get(jobPath(c.job.id, '/levels'));
    expect(list.body.items.map((l: { name: string; position: number }) => `${l.position}:${l.name}`)).toEqual(['1:Level 1', '2:Level 3']);
  });

  it('replays a POST with the same Idempotency-Key (one row) and refuses the key with another body (422)', async () => {
    const c = await crewWithCallers();
    const key = { 'Idempotency-Key': 'level-create-0001' };
    const first = await c.gc.post(jobPath(c.job.id, '/levels'), { name: 'Roof' }, key);
    const again = await c.gc.post(jobPath(c.job.id, '/levels'), { name: 'Roof' }, key);
    expect(first.status).toBe(201);
    expect(again.status).toBe(201);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(again.body).toEqual(first.body);
    expect(await Level.count({ where: { jobId: c.job.id } })).toBe(1);
    const other = await c.gc.post(jobPath(c.job.id, '/levels'), { name: 'Basement' }, key);
    expect(other.status).toBe(422);
  });
});
