/**
 * Crews: who may name them (a GC manager for any company on the job, a subcontractor for their own
 * company only), the 400/401/403/404/409/412/428 answers, a unit recording which crew installed it
 * (by form and by CSV import, matched by name within the company), deletion refused while a unit
 * names the crew, and recurring defects broken down by crew, checked against counts made by hand
 * and in SQL.
 */
import { QueryTypes } from 'sequelize';
import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { Unit } from '../../../server/models';
import type { RecurringResponse } from '../../../shared/schemas/board';
import type { CrewDto } from '../../../shared/schemas/setup';
import { buildTestApp, csrfFor, signIn, type SignedIn } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildCompany, buildUnit, buildUser } from '../../support/factories';
import { buildWalkJob, insertFinding, type People, type WalkJob } from '../../support/findings';

jest.setTimeout(120_000);

let db: Database;
let trimout: TrimoutApp;
let people: People;
let gc: SignedIn;
let inspector: SignedIn;
let subA: SignedIn;
let subB: SignedIn;
let outsider: SignedIn;

beforeAll(async () => {
  db = await connectTestDb();
  trimout = buildTestApp(db);
  const first = await buildWalkJob();
  people = first;
  gc = await signIn(trimout.app, first.gcManager.email);
  inspector = await signIn(trimout.app, first.inspector.email);
  subA = await signIn(trimout.app, first.subA.email);
  subB = await signIn(trimout.app, first.subB.email);
  outsider = await signIn(trimout.app, (await buildUser()).email);
});
afterAll(async () => {
  await trimout.close();
  await db.close();
});

const MISSING = '00000000-0000-4000-8000-000000000000';
const path = (w: WalkJob, rest = '') => `/api/jobs/${w.job.id}/crews${rest}`;
const post = (who: SignedIn, url: string, body: object) => who.agent.post(url).set('X-CSRF-Token', who.csrf).send(body);
const patch = (who: SignedIn, url: string, body: object, etag?: string) => {
  const req = who.agent.patch(url).set('X-CSRF-Token', who.csrf);
  if (etag) req.set('If-Match', etag);
  return req.send(body);
};
const del = (who: SignedIn, url: string, etag?: string) => {
  const req = who.agent.delete(url).set('X-CSRF-Token', who.csrf);
  if (etag) req.set('If-Match', etag);
  return req.send();
};

async function makeCrew(who: SignedIn, w: WalkJob, companyId: string, name: string): Promise<CrewDto> {
  return (await post(who, path(w), { companyId, name }).expect(201)).body as CrewDto;
}

describe('crews of a company on a job', () => {
  it('answers 401 signed out and 404 to a non-member', async () => {
    const w = await buildWalkJob(people);
    const agent = request.agent(trimout.app);
    const csrf = await csrfFor(agent);
    await agent.get(path(w)).expect(401);
    await agent.post(path(w)).set('X-CSRF-Token', csrf).send({ companyId: w.subA.companyId, name: 'Blue' }).expect(401);
    await outsider.agent.get(path(w)).expect(404);
    await post(outsider, path(w), { companyId: w.subA.companyId, name: 'Blue' }).expect(404);
  });

  it('lets a GC manager name crews of any company and a subcontractor those of their own company only; an inspector reads them', async () => {
    const w = await buildWalkJob(people);
    const blue = await makeCrew(gc, w, w.subA.companyId, 'Blue crew');
    expect(blue).toMatchObject({ companyId: w.subA.companyId, name: 'Blue crew', unitCount: 0, version: 1 });
    const green = await makeCrew(gc, w, w.subB.companyId, 'Green crew');
    const red = await post(subA, path(w), { companyId: w.subA.companyId, name: 'Red crew' }).expect(201);
    expect(red.headers.etag).toBe('"v1"');
    const refused = await post(subA, path(w), { companyId: w.subB.companyId, name: 'Sneaky crew' }).expect(403);
    expect(refused.body.error.id).toBe('own_company_only');
    await post(inspector, path(w), { companyId: w.subA.companyId, name: 'Inspectors' }).expect(403);

    const all = await inspector.agent.get(path(w)).expect(200);
    expect(all.body.items.map((c: CrewDto) => c.id).sort()).toEqual([blue.id, green.id, red.body.id].sort());
    expect(all.body.companyScope).toBeNull();
    const mine = await subA.agent.get(path(w)).expect(200);
    expect(mine.body.items.map((c: CrewDto) => c.name)).toEqual(['Blue crew', 'Red crew']);
    expect(mine.body.companyScope).toBe(w.subA.companyId);
    // Asking for another company's crews gives a subcontractor nothing, not that company's list.
    const theirs = await subA.agent.get(path(w, `?companyId=${w.subB.companyId}`)).expect(200);
    expect(theirs.body.items).toEqual([]);
    const byCompany = await gc.agent.get(path(w, `?companyId=${w.subB.companyId}`)).expect(200);
    expect(byCompany.body.items.map((c: CrewDto) => c.id)).toEqual([green.id]);
  });

  it('answers 400 for a bad body or a company not on the job, 409 for a name the company already uses (any case)', async () => {
    const w = await buildWalkJob(people);
    const other = await buildWalkJob(people);
    const send = async (body: object) => (await post(gc, path(w), body).expect(400)).body.error;
    expect((await send({ companyId: w.subA.companyId, name: '  ' })).message).toBe('name: Enter a crew name.');
    expect((await send({ companyId: w.subA.companyId, name: 'x'.repeat(81) })).message).toBe('name: A crew name is at most 80 characters.');
    expect((await send({ companyId: w.subA.companyId, name: 'Blue', boss: 'me' })).message).toMatch(/boss|Unrecognized|not expected/i);
    expect((await send({ name: 'Blue' })).fields).toHaveProperty('companyId');
    const stranger = await buildCompany();
    const notOnJob = await send({ companyId: stranger.id, name: 'Blue' });
    expect(notOnJob).toMatchObject({ message: 'companyId: That company is not on this job.', fields: { companyId: 'That company is not on this job.' } });

    await makeCrew(gc, w, w.subA.companyId, 'Blue');
    const dup = await post(subA, path(w), { companyId: w.subA.companyId, name: ' BLUE ' }).expect(409);
    expect(dup.body.error.id).toBe('duplicate');
    // Another company may use the same name; so may the same company on another job.
    await makeCrew(gc, w, w.subB.companyId, 'Blue');
    await makeCrew(gc, other, other.subA.companyId, 'Blue');
  });

  it('renames with If-Match (428 without, 412 stale, 409 duplicate); out of scope is 404', async () => {
    const w = await buildWalkJob(people);
    const other = await buildWalkJob(people);
    const blue = await makeCrew(gc, w, w.subA.companyId, 'Blue');
    await makeCrew(gc, w, w.subA.companyId, 'Red');
    const green = await makeCrew(gc, w, w.subB.companyId, 'Green');
    const foreign = await makeCrew(gc, other, other.subA.companyId, 'Foreign');

    const missing = await patch(subA, path(w, `/${blue.id}`), { name: 'Navy' }).expect(428);
    expect(missing.body.error.id).toBe('precondition_required');
    const renamed = await patch(subA, path(w, `/${blue.id}`), { name: 'Navy' }, '"v1"').expect(200);
    expect(renamed.body).toMatchObject({ id: blue.id, name: 'Navy', version: 2 });
    expect(renamed.headers.etag).toBe('"v2"');
    const stale = await patch(gc, path(w, `/${blue.id}`), { name: 'Teal' }, '"v1"').expect(412);
    expect(stale.body.error.id).toBe('stale');
    const dup = await patch(gc, path(w, `/${blue.id}`), { name: 'red' }, '"v2"').expect(409);
    expect(dup.body.error.id).toBe('duplicate');

    // Another company's crew, another job's crew and an unknown id: 404, nothing changed.
    await patch(subA, path(w, `/${green.id}`), { name: 'Mine now' }, '"v1"').expect(404);
    await del(subA, path(w, `/${green.id}`), '"v1"').expect(404);
    await patch(gc, path(w, `/${foreign.id}`), { name: 'Mine now' }, '"v1"').expect(404);
    await patch(gc, path(w, `/${MISSING}`), { name: 'Mine now' }, '"v1"').expect(404);
    await patch(inspector, path(w, `/${green.id}`), { name: 'Mine now' }, '"v1"').expect(403);
    const bad = await patch(gc, path(w, '/not-a-uuid'), { name: 'X' }, '"v1"').expect(400);
    expect(bad.body.error.fields).toEqual({ 'params.crewId': expect.any(String) });
    const still = await gc.agent.get(path(w, `?companyId=${w.subB.companyId}`)).expect(200);
    expect(still.body.items).toEqual([expect.objectContaining({ id: green.id, name: 'Green', version: 1 })]);
  });
});

describe('the crew that installed a unit', () => {
  it('is recorded on the unit by a GC manager; a crew of another job is a 400; a crew in use cannot be deleted (409), an unused one can', async () => {
    const w = await buildWalkJob(people);
    const other = await buildWalkJob(people);
    const blue = await makeCrew(gc, w, w.subA.companyId, 'Blue');
    const foreign = await makeCrew(gc, other, other.subA.companyId, 'Foreign');
    const unitPath = `/api/jobs/${w.job.id}/units/${w.cassette.id}`;
    const before = (await gc.agent.get(unitPath).expect(200)).body;
    expect(before.installedByCrew).toBeNull();
    const wrong = await patch(gc, unitPath, { installedByCrewId: foreign.id }, `"v${before.version}"`).expect(400);
    expect(wrong.body.error).toMatchObject({ message: 'installedByCrewId: Not a crew of this job.' });
    const set = await patch(gc, unitPath, { installedByCrewId: blue.id }, `"v${before.version}"`).expect(200);
    expect(set.body.installedByCrew).toEqual({ id: blue.id, name: 'Blue', companyId: w.subA.companyId, companyName: expect.any(String) });
    const listed = await inspector.agent.get(`/api/jobs/${w.job.id}/units?q=IU-3-01`).expect(200);
    expect(listed.body.items[0].installedByCrew).toMatchObject({ id: blue.id, name: 'Blue' });
    const made = await post(gc, `/api/jobs/${w.job.id}/units`, { tag: 'IU-3-09', kind: 'wall_mounted', levelId: w.level.id, installedByCrewId: blue.id }).expect(201);
    expect(made.body.installedByCrew).toMatchObject({ id: blue.id });
    expect((await gc.agent.get(path(w)).expect(200)).body.items[0]).toMatchObject({ id: blue.id, unitCount: 2 });

    const inUse = await del(gc, path(w, `/${blue.id}`), '"v1"').expect(409);
    expect(inUse.body.error).toMatchObject({ id: 'referenced', message: 'The crew Blue still has 2 units it installed. Give those units another crew (or none) first.' });
    await patch(gc, unitPath, { installedByCrewId: null }, `"v${set.body.version}"`).expect(200);
    await patch(gc, `/api/jobs/${w.job.id}/units/${made.body.id}`, { installedByCrewId: null }, `"v${made.body.version}"`).expect(200);
    await del(subA, path(w, `/${blue.id}`)).expect(428);
    await del(subA, path(w, `/${blue.id}`), '"v1"').expect(204);
    expect((await gc.agent.get(path(w)).expect(200)).body.items).toEqual([]);
    expect((await Unit.findByPk(w.cassette.id))!.installedByCrewId).toBeNull();
  });

  it('comes from the CSV import: an optional crew column matched by name within the crew company column, or across the job when the name is unique', async () => {
    const w = await buildWalkJob(people);
    const blueA = await makeCrew(gc, w, w.subA.companyId, 'Blue');
    await makeCrew(gc, w, w.subB.companyId, 'Blue');
    const redA = await makeCrew(gc, w, w.subA.companyId, 'Red');
    const companies = await db.sequelize.query<{ id: string; name: string }>(`SELECT id, name FROM companies WHERE id = ANY ($1::uuid[])`, {
      bind: [[w.subA.companyId, w.subB.companyId]],
      type: QueryTypes.SELECT,
    });
    const nameA = companies.find((c) => c.id === w.subA.companyId)!.name;
    const importCsv = (csv: string, dryRun: boolean) => post(gc, `/api/jobs/${w.job.id}/units/import`, { csv, dryRun });

    const bad = await importCsv(
      [
        'Tag,Kind,Level,Crew,Crew company',
        'IU-7-01,cassette_4way,Level 3,red,', // unique on the job, any case
        'IU-7-02,cassette_4way,Level 3,Blue,', // two companies have a Blue crew
        'IU-7-03,cassette_4way,Level 3,Purple,', // no such crew
        `IU-7-04,cassette_4way,Level 3,Blue,${nameA.toUpperCase()}`,
        'IU-7-05,cassette_4way,Level 3,Blue,Nobody Ltd',
        'IU-7-06,cassette_4way,Level 3,,',
      ].join('\n'),
      true,
    ).expect(200);
    expect(bad.body).toMatchObject({ dryRun: true, committed: false, totalRows: 6, goodRows: 3, badRows: 3 });
    expect(bad.body.errors).toEqual([
      { line: 3, field: 'crew', reason: expect.stringMatching(/^Crew "Blue" is a crew of .+ and .+: add a crew company column to say which\.$/) },
      { line: 4, field: 'crew', reason: 'Unknown crew "Purple". Name the company\'s crews on the Crews page first.' },
      { line: 6, field: 'crewCompany', reason: 'Unknown company "Nobody Ltd" on this job.' },
    ]);
    expect(bad.body.preview.map((r: { tag: string; crewName: string | null }) => [r.tag, r.crewName])).toEqual([
      ['IU-7-01', `${nameA} · Red`],
      ['IU-7-04', `${nameA} · Blue`],
      ['IU-7-06', null],
    ]);

    const good = await importCsv(['Tag,Kind,Level,Crew,Crew company', 'IU-7-01,cassette_4way,Level 3,red,', `IU-7-04,cassette_4way,Level 3,Blue,${nameA}`].join('\n'), false).expect(201);
    expect(good.body).toMatchObject({ committed: true, created: 2 });
    const rows = await db.sequelize.query<{ tag: string; installed_by_crew_id: string | null }>(
      `SELECT tag, installed_by_crew_id FROM units WHERE job_id = $1 AND tag LIKE 'IU-7-%' ORDER BY tag`,
      { bind: [w.job.id], type: QueryTypes.SELECT },
    );
    expect(rows).toEqual([
      { tag: 'IU-7-01', installed_by_crew_id: redA.id },
      { tag: 'IU-7-04', installed_by_crew_id: blueA.id },
    ]);
  });
});

describe('recurring defects per crew', () => {
  it('splits each company’s units by the crew of that company that installed them; the counts match a hand count and SQL', async () => {
    const w = await buildWalkJob(people);
    await db.sequelize.query(`UPDATE jobs SET recurring_thresholds = '{"minUnits": 2, "minShare": 0}'::jsonb WHERE id = $1`, { bind: [w.job.id] });
    const blue = await makeCrew(gc, w, w.subA.companyId, 'Blue');
    const red = await makeCrew(subA, w, w.subA.companyId, 'Red');
    const green = await makeCrew(gc, w, w.subB.companyId, 'Green');
    const unit = async (tag: string, crewId: string | null) => {
      const u = await buildUnit(w.job.id, w.level.id, { tag, kind: 'cassette_4way' });
      await Unit.update({ installedByCrewId: crewId }, { where: { id: u.id } });
      return u;
    };
    const u1 = await unit('IU-8-01', blue.id);
    const u2 = await unit('IU-8-02', blue.id);
    const u3 = await unit('IU-8-03', blue.id);
    const u4 = await unit('IU-8-04', red.id);
    const u5 = await unit('IU-8-05', null);
    const u6 = await unit('IU-8-06', green.id); // installed by company B's crew
    const A = w.subA.companyId;
    const B = w.subB.companyId;
    for (const u of [u1, u2, u3, u4, u5, u6]) await insertFinding(w, { unitId: u.id, code: 'DR-03', companyId: A });
    await insertFinding(w, { unitId: u1.id, code: 'DR-03', companyId: A }); // the same unit twice counts once
    await insertFinding(w, { unitId: u4.id, code: 'DR-03', companyId: B }); // B answers for a unit A's crew installed
    await insertFinding(w, { unitId: u2.id, code: 'DR-03', companyId: B, status: 'voided' }); // never counted

    const res = await gc.agent.get(`/api/jobs/${w.job.id}/recurring`).expect(200);
    const item = (res.body as RecurringResponse).items.find((i) => i.code === 'DR-03')!;
    // By hand: A's findings are on u1..u6: Blue installed u1, u2, u3; Red u4; u5 has no crew and
    // u6 was installed by B's Green crew, which is not A's: both "not recorded" for A. B's one
    // counted finding is on u4, installed by A's Red crew: "not recorded" for B.
    const byKey = <T extends { companyId: string; crewId: string | null }>(list: T[]) =>
      [...list].sort((x, y) => `${x.companyId}|${x.crewId ?? '-'}`.localeCompare(`${y.companyId}|${y.crewId ?? '-'}`));
    expect(byKey(item.byCrew)).toEqual(
      byKey([
        { companyId: A, companyName: expect.any(String), crewId: blue.id, name: 'Blue', count: 3 },
        { companyId: A, companyName: expect.any(String), crewId: red.id, name: 'Red', count: 1 },
        { companyId: A, companyName: expect.any(String), crewId: null, name: null, count: 2 },
        { companyId: B, companyName: expect.any(String), crewId: null, name: null, count: 1 },
      ]),
    );
    // Within a company, named crews by name come first and "not recorded" last.
    expect(item.byCrew.filter((c) => c.companyId === A).map((c) => c.name)).toEqual(['Blue', 'Red', null]);
    // Per company the crews add up to the company's count.
    for (const c of item.byCompany) {
      expect(item.byCrew.filter((x) => x.companyId === c.companyId).reduce((n, x) => n + x.count, 0)).toBe(c.count);
    }
    // The same figures counted in SQL straight from the tables.
    const sql = await db.sequelize.query<{ company_id: string; crew_id: string | null; n: number }>(
      `SELECT f.company_id, cr.id AS crew_id, count(DISTINCT f.unit_id)::int AS n
         FROM findings f JOIN catalogue_items ci ON ci.id = f.catalogue_item_id AND ci.code = 'DR-03'
         JOIN units u ON u.id = f.unit_id
         LEFT JOIN crews cr ON cr.id = u.installed_by_crew_id AND cr.company_id = f.company_id
        WHERE f.job_id = $1 AND f.status <> 'voided'
        GROUP BY f.company_id, cr.id`,
      { bind: [w.job.id], type: QueryTypes.SELECT },
    );
    const key = (companyId: string, crewId: string | null) => `${companyId}|${crewId ?? '-'}`;
    expect(new Map(item.byCrew.map((c) => [key(c.companyId, c.crewId), c.count]))).toEqual(new Map(sql.map((r) => [key(r.company_id, r.crew_id), r.n])));

    // A subcontractor sees their own company's crews only; a rename shows at once (cached figures follow).
    const mine = await subA.agent.get(`/api/jobs/${w.job.id}/recurring`).expect(200);
    const own = (mine.body as RecurringResponse).items.find((i) => i.code === 'DR-03')!;
    expect(own.byCrew.every((c) => c.companyId === A)).toBe(true);
    await patch(gc, path(w, `/${blue.id}`), { name: 'Navy' }, '"v1"').expect(200);
    const again = await subA.agent.get(`/api/jobs/${w.job.id}/recurring`).expect(200);
    expect((again.body as RecurringResponse).items.find((i) => i.code === 'DR-03')!.byCrew.map((c) => c.name)).toContain('Navy');
    const theirs = await subB.agent.get(`/api/jobs/${w.job.id}/recurring`).expect(200);
    expect(JSON.stringify(theirs.body)).not.toContain('Navy');
  });
});
