import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { CatalogueItem } from '../../../server/models';
import { BUILTIN_CATALOGUE, CAUTION_REQUIRED } from '../../../shared/catalogue';
import { ifMatch, jobPath, newJobFor, signInCrew, type SignedCrew } from '../../support/api';
import { buildTestApp } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildJobWithCrew, copyCatalogue } from '../../support/factories';

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

async function jobWithCatalogue() {
  const job = await newJobFor(crew);
  await copyCatalogue(job.id);
  return job;
}

const ownItem = {
  code: 'dr-41',
  group: 'drainage',
  title: 'Condensate pump alarm not wired to the unit',
  description: 'The pump kit has an overflow switch, but it is not landed on the unit terminals.',
  unitKinds: ['ducted_low', 'ducted_high'],
  defaultSeverity: 'major',
  trade: 'mechanical',
  measuredRule: { measure: 'Overflow switch wired', quantity: 'boolean', comparison: 'yes_no', expected: true },
  fixGuidance: 'Land the overflow switch on the terminals the manual names and test it by lifting the float.',
  caution:
    "Electrical work: isolate the supply before opening the unit's electrical box. The manufacturer's installation manual, local codes and licensed practice govern.",
  needsCeilingAccess: true,
};

describe('catalogue', () => {
  it('answers 401 signed out', async () => {
    const job = await jobWithCatalogue();
    await request(trimout.app).get(jobPath(job.id, '/catalogue')).expect(401);
  });

  it('starts from the built-in catalogue, readable by every role, filtered by unit kind and group', async () => {
    const job = await jobWithCatalogue();
    for (const who of [crew.gc, crew.insp, crew.sub]) {
      const res = await who.get(jobPath(job.id, '/catalogue?limit=200'));
      expect(res.status).toBe(200);
      expect(res.body.items.map((i: { code: string }) => i.code)).toEqual(BUILTIN_CATALOGUE.map((i) => i.code));
      expect(res.body.items[0]).toMatchObject({ builtin: true, retiredAt: null, version: 1 });
    }
    const kind = await crew.insp.get(jobPath(job.id, '/catalogue?unitKind=wall_mounted&limit=200'));
    expect(kind.body.items.map((i: { code: string }) => i.code)).toEqual(
      BUILTIN_CATALOGUE.filter((i) => i.unitKinds.includes('wall_mounted')).map((i) => i.code),
    );
    const group = await crew.insp.get(jobPath(job.id, '/catalogue?group=drainage&limit=200'));
    expect(group.body.items.every((i: { group: string }) => i.group === 'drainage')).toBe(true);
    const bad = await crew.insp.get(jobPath(job.id, '/catalogue?group=plumbing'));
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toBe('query.group: Choose a group from the list.');
  });

  it('adds a job-specific type with a validated measured rule; a duplicate code is 409', async () => {
    const job = await jobWithCatalogue();
    const res = await crew.gc.post(jobPath(job.id, '/catalogue'), ownItem);
    expect(res.status).toBe(201);
    expect(res.headers.etag).toBe('"v1"');
    expect(res.body).toMatchObject({ code: 'DR-41', builtin: false, measuredRule: ownItem.measuredRule });
    const dup = await crew.gc.post(jobPath(job.id, '/catalogue'), { ...ownItem, code: 'DR-41' });
    expect(dup.status).toBe(409);
    const builtinCode = await crew.gc.post(jobPath(job.id, '/catalogue'), { ...ownItem, code: BUILTIN_CATALOGUE[0]!.code });
    expect(builtinCode.status).toBe(409);
  });

  it.each([
    [{ measuredRule: { measure: 'Pump lift', quantity: 'length', comparison: 'at_most' } }, /^measuredRule\.limit: Say where the limit comes from\./],
    [{ measuredRule: { measure: 'Lift', quantity: 'length', comparison: 'at_most', limit: { from: 'model', key: 'max_flux' } } }, /^measuredRule\.limit\.key: /],
    [{ measuredRule: { measure: 'Lift', quantity: 'length', comparison: 'at_most', limit: { from: 'code', key: 'imc.nothing' } } }, /Not a code limit Trimout holds/],
    [{ code: 'DRAIN-1' }, /^code: A code is two letters/],
    [{ unitKinds: [] }, /^unitKinds: Choose at least one unit kind\./],
  ])('answers 400 with a message for %j', async (change, message) => {
    const job = await newJobFor(crew);
    const res = await crew.gc.post(jobPath(job.id, '/catalogue'), { ...ownItem, ...change });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(message);
  });

  it.each([
    ['a hazardous group with no caution', { caution: null, needsCeilingAccess: false }],
    ['a blank caution', { caution: '   ', needsCeilingAccess: false }],
    ['a labelling type whose fix needs the ceiling open', { group: 'labelling', code: 'LB-41', caution: null, needsCeilingAccess: true }],
  ])('refuses a new type with %s: 400 naming the caution field', async (_what, change) => {
    const job = await newJobFor(crew);
    const res = await crew.gc.post(jobPath(job.id, '/catalogue'), { ...ownItem, ...change });
    expect(res.status).toBe(400);
    expect(res.body.error).toMatchObject({ id: 'bad_request', fields: { caution: CAUTION_REQUIRED } });
    expect(await CatalogueItem.count({ where: { jobId: job.id } })).toBe(0);
  });

  it('takes a labelling type without a caution: labelling work outside the ceiling is not hazardous', async () => {
    const job = await newJobFor(crew);
    const res = await crew.gc.post(jobPath(job.id, '/catalogue'), { ...ownItem, code: 'LB-42', group: 'labelling', measuredRule: null, caution: null, needsCeilingAccess: false });
    expect(res.status).toBe(201);
    expect(res.body.caution).toBeNull();
  });

  it('refuses an edit that leaves hazardous work without a caution; retiring alone is no edit', async () => {
    const job = await jobWithCatalogue();
    const label = (await CatalogueItem.findOne({ where: { jobId: job.id, code: 'LB-01' } }))!;
    const labelPath = jobPath(job.id, `/catalogue/${label.id}`);
    // Moving a caution-less labelling type into a hazardous group needs a caution too.
    const moved = await crew.gc.patch(labelPath, { group: 'wiring' }, ifMatch(1));
    expect(moved.status).toBe(400);
    expect(moved.body.error.fields).toEqual({ caution: CAUTION_REQUIRED });
    const wiring = (await CatalogueItem.findOne({ where: { jobId: job.id, code: 'EL-01' } }))!;
    const path = jobPath(job.id, `/catalogue/${wiring.id}`);
    const cleared = await crew.gc.patch(path, { caution: null }, ifMatch(1));
    expect(cleared.status).toBe(400);
    expect(cleared.body.error.fields).toEqual({ caution: CAUTION_REQUIRED });
    expect((await CatalogueItem.findByPk(wiring.id))!).toMatchObject({ version: 1, caution: wiring.caution });
    // An item saved without a caution before the rule (written here straight to the table) can still be retired.
    await wiring.update({ caution: null });
    expect((await crew.gc.patch(path, { retired: true }, ifMatch(1))).status).toBe(200);
    expect((await crew.gc.patch(path, { title: 'Disconnect out of sight' }, ifMatch(2))).status).toBe(400);
  });

  it('edits with If-Match (428 / 412 / 200); the code cannot change', async () => {
    const job = await jobWithCatalogue();
    const item = (await CatalogueItem.findOne({ where: { jobId: job.id, code: BUILTIN_CATALOGUE[0]!.code } }))!;
    const path = jobPath(job.id, `/catalogue/${item.id}`);
    expect((await crew.gc.patch(path, { defaultSeverity: 'critical' })).status).toBe(428);
    const stale = await crew.gc.patch(path, { defaultSeverity: 'critical' }, ifMatch(4));
    expect(stale.status).toBe(412);
    expect(stale.body.current).toMatchObject({ code: item.code, version: 1 });
    const ok = await crew.gc.patch(path, { defaultSeverity: 'critical', caution: 'Work at height: use a platform.' }, ifMatch(1));
    expect(ok.status).toBe(200);
    expect(ok.body).toMatchObject({ defaultSeverity: 'critical', caution: 'Work at height: use a platform.', version: 2 });
    expect((await crew.gc.patch(path, { code: 'ZZ-01' }, ifMatch(2))).status).toBe(400);
  });

  it('retires instead of deleting (DELETE = retire), hides retired items unless asked, and brings one back', async () => {
    const job = await jobWithCatalogue();
    const item = (await CatalogueItem.findOne({ where: { jobId: job.id, code: BUILTIN_CATALOGUE[1]!.code } }))!;
    const path = jobPath(job.id, `/catalogue/${item.id}`);
    expect((await crew.gc.del(path)).status).toBe(428);
    const retired = await crew.gc.del(path, ifMatch(1));
    expect(retired.status).toBe(200);
    expect(retired.body.retiredAt).toEqual(expect.any(String));
    expect(retired.headers.etag).toBe('"v2"');
    const active = await crew.insp.get(jobPath(job.id, '/catalogue?limit=200'));
    expect(active.body.items.map((i: { code: string }) => i.code)).not.toContain(item.code);
    const all = await crew.insp.get(jobPath(job.id, '/catalogue?limit=200&includeRetired=true'));
    expect(all.body.items.map((i: { code: string }) => i.code)).toContain(item.code);
    expect(await CatalogueItem.count({ where: { id: item.id } })).toBe(1);
    const back = await crew.gc.patch(path, { retired: false }, ifMatch(2));
    expect(back.body.retiredAt).toBeNull();
  });

  it.each(['insp', 'sub'] as const)('refuses catalogue writes to the %s (403)', async (who) => {
    const job = await jobWithCatalogue();
    const item = (await CatalogueItem.findOne({ where: { jobId: job.id } }))!;
    expect((await crew[who].post(jobPath(job.id, '/catalogue'), ownItem)).status).toBe(403);
    expect((await crew[who].patch(jobPath(job.id, `/catalogue/${item.id}`), { title: 'X' }, ifMatch(1))).status).toBe(403);
    expect((await crew[who].del(jobPath(job.id, `/catalogue/${item.id}`), ifMatch(1))).status).toBe(403);
    expect((await CatalogueItem.findByPk(item.id))!.retiredAt).toBeNull();
  });

  it("answers 404 for another job's catalogue", async () => {
    const other = await buildJobWithCrew();
    await copyCatalogue(other.job.id);
    const item = (await CatalogueItem.findOne({ where: { jobId: other.job.id } }))!;
    expect((await crew.gc.get(jobPath(other.job.id, '/catalogue'))).status).toBe(404);
    const mine = await newJobFor(crew);
    expect((await crew.gc.get(jobPath(mine.id, `/catalogue/${item.id}`))).status).toBe(404);
  });

  it('replays a create with the same Idempotency-Key', async () => {
    const job = await newJobFor(crew);
    const key = { 'Idempotency-Key': `catalogue-${job.id}` };
    await crew.gc.post(jobPath(job.id, '/catalogue'), ownItem, key);
    const again = await crew.gc.post(jobPath(job.id, '/catalogue'), ownItem, key);
    expect(again.status).toBe(201);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(await CatalogueItem.count({ where: { jobId: job.id } })).toBe(1);
    expect((await crew.gc.post(jobPath(job.id, '/catalogue'), { ...ownItem, code: 'DR-42' }, key)).status).toBe(422);
  });
});
