/**
 * Excluding a unit from the ceiling rule (PUT / DELETE /jobs/:jobId/units/:unitId/ceiling-exclusion):
 * only a GC manager of the job, with a reason of 3 to 500 characters and the unit's ETag; the
 * board and readiness figures follow, and every exclusion and lift is kept in unit_events.
 */
import { QueryTypes } from 'sequelize';
import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import type { BoardResponse, ReadinessResponse } from '../../../shared/schemas/board';
import { ifMatch, jobPath, newJobFor, signInCrew, type SignedCrew } from '../../support/api';
import { buildTestApp, csrfFor, signIn, type SignedIn } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildLevel, buildUnit } from '../../support/factories';

jest.setTimeout(120_000);

let db: Database;
let trimout: TrimoutApp;
let crew: SignedCrew;
let as: Record<'gc' | 'insp' | 'sub', SignedIn>;

beforeAll(async () => {
  db = await connectTestDb();
  trimout = buildTestApp(db);
  crew = await signInCrew(trimout.app);
  as = { gc: crew.gcSignedIn, insp: await signIn(trimout.app, crew.inspector.email), sub: await signIn(trimout.app, crew.subA.email) };
});

/** PUT (exclude) or DELETE (count again) as someone, with the CSRF header and an optional If-Match. */
function send(who: SignedIn, method: 'put' | 'delete', path: string, body?: unknown, headers: Record<string, string> = {}) {
  const req = who.agent[method](path).set('X-CSRF-Token', who.csrf).set(headers);
  return (body === undefined ? req : req.send(body as object)).then((r) => r);
}
afterAll(async () => {
  await trimout.close();
  await db.close();
});

/** A fresh job with one level: two cassettes and a wall-mounted unit, none checked. */
async function setUp() {
  const job = await newJobFor(crew);
  const level = await buildLevel(job.id, { name: 'Level 4' });
  const c1 = await buildUnit(job.id, level.id, { tag: 'C-401', kind: 'cassette_4way' });
  const c2 = await buildUnit(job.id, level.id, { tag: 'C-402', kind: 'ducted_low' });
  const wall = await buildUnit(job.id, level.id, { tag: 'W-401', kind: 'wall_mounted' });
  const path = (unitId: string, jobId = job.id) => jobPath(jobId, `/units/${unitId}/ceiling-exclusion`);
  return { job, level, c1, c2, wall, path };
}

async function levelReadiness(jobId: string) {
  const res = await crew.gc.get(jobPath(jobId, '/readiness'));
  expect(res.status).toBe(200);
  return (res.body as ReadinessResponse).levels[0]!;
}

async function events(unitId: string) {
  return db.sequelize.query<{ kind: string; reason: string | null; actor_id: string }>(`SELECT kind, reason, actor_id FROM unit_events WHERE unit_id = $1 ORDER BY at, kind`, {
    bind: [unitId],
    type: QueryTypes.SELECT,
  });
}

const REASON = 'Owner furnished; its ceiling tile stays removable for service.';

describe('ceiling exclusion: who may', () => {
  it('401 signed out; 403 for an inspector and a subcontractor (both writes), and nothing changes', async () => {
    const s = await setUp();
    const anon = request.agent(trimout.app);
    const anonCsrf = await csrfFor(anon);
    await anon.put(s.path(s.c1.id)).set('X-CSRF-Token', anonCsrf).set(ifMatch(1)).send({ reason: REASON }).expect(401);
    await anon.delete(s.path(s.c1.id)).set('X-CSRF-Token', anonCsrf).set(ifMatch(1)).expect(401);
    for (const who of [as.insp, as.sub]) {
      const put = await send(who, 'put', s.path(s.c1.id), { reason: REASON }, ifMatch(1));
      expect({ status: put.status, id: put.body.error?.id }).toEqual({ status: 403, id: 'forbidden' });
      const del = await send(who, 'delete', s.path(s.c1.id), undefined, ifMatch(1));
      expect(del.status).toBe(403);
    }
    expect(await events(s.c1.id)).toEqual([]);
    expect((await levelReadiness(s.job.id)).ceilingUnitsUnchecked).toBe(2);
  });

  it('404 for a unit of another job (the GC manager of both), and for an unknown unit', async () => {
    const s = await setUp();
    const other = await setUp();
    const res = await send(as.gc, 'put', s.path(other.c1.id), { reason: REASON }, ifMatch(1));
    expect({ status: res.status, id: res.body.error?.id }).toEqual({ status: 404, id: 'not_found' });
    expect((await send(as.gc, 'put', s.path('00000000-0000-4000-8000-000000000000'), { reason: REASON }, ifMatch(1))).status).toBe(404);
    expect(await events(other.c1.id)).toEqual([]);
  });
});

describe('ceiling exclusion: what is refused', () => {
  it('400 with the field for a missing, blank, too short or too long reason, and for unknown keys', async () => {
    const s = await setUp();
    for (const body of [{}, { reason: '   ' }, { reason: ' ok ' }, { reason: 'x'.repeat(501) }, { reason: 42 }]) {
      const res = await send(as.gc, 'put', s.path(s.c1.id), body, ifMatch(1));
      expect({ body, status: res.status }).toEqual({ body, status: 400 });
      expect(res.body.error.fields.reason).toEqual(expect.any(String));
      expect(JSON.stringify(res.body)).not.toMatch(/at .*\.ts/);
    }
    const extra = await send(as.gc, 'put', s.path(s.c1.id), { reason: REASON, excludedBy: crew.inspector.id }, ifMatch(1));
    expect(extra.status).toBe(400);
    expect((await send(as.gc, 'put', s.path(s.c1.id), { reason: 'x'.repeat(500) }, ifMatch(1))).status).toBe(200);
  });

  it('428 without If-Match, 412 with a stale one (and the current state), 409 for a unit below the ceiling', async () => {
    const s = await setUp();
    const missing = await send(as.gc, 'put', s.path(s.c1.id), { reason: REASON });
    expect(missing.status).toBe(428);
    const stale = await send(as.gc, 'put', s.path(s.c1.id), { reason: REASON }, ifMatch(7));
    expect(stale.status).toBe(412);
    const wall = await send(as.gc, 'put', s.path(s.wall.id), { reason: REASON }, ifMatch(1));
    expect({ status: wall.status, id: wall.body.error?.id }).toEqual({ status: 409, id: 'not_a_ceiling_unit' });
    expect(wall.body.error.message).toContain('W-401');
    expect(await events(s.c1.id)).toEqual([]);
    expect(await events(s.wall.id)).toEqual([]);
  });
});

describe('ceiling exclusion: the figures', () => {
  it('an excluded unit is not unchecked; both excluded, the ceilings can close; counted again, they cannot', async () => {
    const s = await setUp();
    const before = await levelReadiness(s.job.id);
    expect(before).toMatchObject({ ceilingState: 'blocked', ceilingUnits: 2, ceilingUnitsUnchecked: 2, ceilingUnitsExcluded: 0, excludedCeilingUnits: [] });
    expect(before.uncheckedCeilingUnits).toEqual([
      { unitId: s.c1.id, tag: 'C-401', version: 1 },
      { unitId: s.c2.id, tag: 'C-402', version: 1 },
    ]);

    const res = await send(as.gc, 'put', s.path(s.c1.id), { reason: `  ${REASON}  ` }, ifMatch(1));
    expect(res.status).toBe(200);
    expect(res.headers.etag).toBe('"v2"');
    expect(res.body).toEqual({
      unitId: s.c1.id,
      tag: 'C-401',
      version: 2,
      ceilingExclusion: { reason: REASON, by: { id: crew.gcManager.id, name: crew.gcManager.name }, at: expect.any(String) },
    });
    const one = await levelReadiness(s.job.id);
    expect(one).toMatchObject({ ceilingState: 'blocked', ceilingUnitsUnchecked: 1, ceilingUnitsExcluded: 1, uncheckedCeilingUnits: [{ unitId: s.c2.id, tag: 'C-402', version: 1 }] });
    expect(one.excludedCeilingUnits).toEqual([
      { unitId: s.c1.id, tag: 'C-401', version: 2, reason: REASON, by: { id: crew.gcManager.id, name: crew.gcManager.name }, at: res.body.ceilingExclusion.at },
    ]);
    // Every role reads the same figures.
    for (const who of [crew.insp, crew.sub]) {
      const board = (await who.get(jobPath(s.job.id, '/board'))).body as BoardResponse;
      expect(board.levels[0]).toMatchObject({ ceilingUnitsUnchecked: 1, ceilingUnitsExcluded: 1, ceilingState: 'blocked' });
    }

    await send(as.gc, 'put', s.path(s.c2.id), { reason: 'Abandoned in place; capped and labelled.' }, ifMatch(1)).then((r) => expect(r.status).toBe(200));
    const board = (await crew.gc.get(jobPath(s.job.id, '/board'))).body as BoardResponse;
    expect(board.levels[0]).toMatchObject({ ceilingUnits: 2, ceilingUnitsUnchecked: 0, ceilingUnitsExcluded: 2, ceilingState: 'ready', ceilingReady: true });
    expect((await levelReadiness(s.job.id)).ceilingState).toBe('ready');

    // Count it again: the stale version is refused, the current one lifts the exclusion.
    expect((await send(as.gc, 'delete', s.path(s.c1.id), undefined, ifMatch(1))).status).toBe(412);
    const lifted = await send(as.gc, 'delete', s.path(s.c1.id), undefined, ifMatch(2));
    expect(lifted.status).toBe(200);
    expect(lifted.body).toEqual({ unitId: s.c1.id, tag: 'C-401', version: 3, ceilingExclusion: null });
    const after = (await crew.gc.get(jobPath(s.job.id, '/board'))).body as BoardResponse;
    expect(after.levels[0]).toMatchObject({ ceilingUnitsUnchecked: 1, ceilingUnitsExcluded: 1, ceilingState: 'blocked' });
    const again = await send(as.gc, 'delete', s.path(s.c1.id), undefined, ifMatch(3));
    expect({ status: again.status, id: again.body.error?.id }).toEqual({ status: 409, id: 'not_excluded' });

    // The history: who excluded it and why, then who counted it again.
    expect(await events(s.c1.id)).toEqual([
      { kind: 'ceiling_excluded', reason: REASON, actor_id: crew.gcManager.id },
      { kind: 'ceiling_exclusion_lifted', reason: null, actor_id: crew.gcManager.id },
    ]);
  });

  it('the history cannot be changed, and a unit with history cannot be deleted on its own', async () => {
    const s = await setUp();
    await send(as.gc, 'put', s.path(s.c1.id), { reason: REASON }, ifMatch(1)).then((r) => expect(r.status).toBe(200));
    await expect(db.sequelize.query(`UPDATE unit_events SET reason = 'changed' WHERE unit_id = $1`, { bind: [s.c1.id] })).rejects.toThrow(/append-only/);
    await expect(db.sequelize.query(`DELETE FROM unit_events WHERE unit_id = $1`, { bind: [s.c1.id] })).rejects.toThrow(/append-only/);
    const del = await crew.gc.del(jobPath(s.job.id, `/units/${s.c1.id}`), ifMatch(2));
    expect({ status: del.status, id: del.body.error?.id }).toEqual({ status: 409, id: 'referenced' });
  });

  it('a unit changed to a kind below the ceiling, or moved to another level, is no longer excluded; another ceiling kind on the same level stays excluded', async () => {
    const s = await setUp();
    const other = await buildLevel(s.job.id, { name: 'Level 5' });
    const unitPath = (unitId: string) => jobPath(s.job.id, `/units/${unitId}`);
    for (const u of [s.c1, s.c2]) await send(as.gc, 'put', s.path(u.id), { reason: REASON }, ifMatch(1)).then((r) => expect(r.status).toBe(200));

    // Another ceiling kind, same level: the exclusion holds and nothing is added to the history.
    const ducted = await crew.gc.patch(unitPath(s.c1.id), { kind: 'ducted_high' }, ifMatch(2));
    expect(ducted.status).toBe(200);
    expect((await levelReadiness(s.job.id)).excludedCeilingUnits.map((u) => u.tag)).toEqual(['C-401', 'C-402']);

    // Wall-mounted: not counted by the rule, and the exclusion ended.
    const wall = await crew.gc.patch(unitPath(s.c1.id), { kind: 'wall_mounted' }, ifMatch(3));
    expect(wall.status).toBe(200);
    // Moved to Level 5: the exclusion was decided for Level 4, so C-402 counts as unchecked on Level 5.
    const moved = await crew.gc.patch(unitPath(s.c2.id), { levelId: other.id }, ifMatch(2));
    expect(moved.status).toBe(200);
    const rows = await db.sequelize.query<{ tag: string; ceiling_excluded_reason: string | null; ceiling_excluded_by: string | null; ceiling_excluded_at: Date | null }>(
      `SELECT tag, ceiling_excluded_reason, ceiling_excluded_by, ceiling_excluded_at FROM units WHERE id IN ($1, $2) ORDER BY tag`,
      { bind: [s.c1.id, s.c2.id], type: QueryTypes.SELECT },
    );
    expect(rows).toEqual([
      { tag: 'C-401', ceiling_excluded_reason: null, ceiling_excluded_by: null, ceiling_excluded_at: null },
      { tag: 'C-402', ceiling_excluded_reason: null, ceiling_excluded_by: null, ceiling_excluded_at: null },
    ]);
    const board = (await crew.gc.get(jobPath(s.job.id, '/board'))).body as BoardResponse;
    const byName = Object.fromEntries(board.levels.map((l) => [l.name, l]));
    expect(byName['Level 4']).toMatchObject({ ceilingUnits: 0, ceilingUnitsExcluded: 0 });
    expect(byName['Level 5']).toMatchObject({ ceilingUnits: 1, ceilingUnitsUnchecked: 1, ceilingUnitsExcluded: 0, ceilingState: 'blocked' });

    // The history says who ended each exclusion and why.
    expect(await events(s.c1.id)).toEqual([
      { kind: 'ceiling_excluded', reason: REASON, actor_id: crew.gcManager.id },
      {
        kind: 'ceiling_exclusion_lifted',
        reason: 'Kind changed from ducted, high static to wall-mounted: the ceiling rule does not count it, so its exclusion ended.',
        actor_id: crew.gcManager.id,
      },
    ]);
    expect(await events(s.c2.id)).toEqual([
      { kind: 'ceiling_excluded', reason: REASON, actor_id: crew.gcManager.id },
      { kind: 'ceiling_exclusion_lifted', reason: 'Moved from Level 4 to Level 5: the exclusion was decided for Level 4, so it ended.', actor_id: crew.gcManager.id },
    ]);
  });
});
