import fc from 'fast-check';
import { parse } from 'csv-parse/sync';
import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { Crew, Unit } from '../../../server/models';
import { neutraliseCell } from '../../../server/services/unitExport';
import { WATTS_PER_TON } from '../../../shared/calc/quantity';
import { ifMatch, jobPath, newJobFor, signInCrew, type SignedCrew } from '../../support/api';
import { buildTestApp } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildCompany, buildJobWithCrew, buildLevel, buildSpace, buildSystem, buildUnit, buildUnitModel, linkCompany } from '../../support/factories';

jest.setTimeout(120_000);

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

/** A fresh job with two levels, spaces, a system and a model. */
async function setUpJob() {
  const job = await newJobFor(crew);
  const l1 = await buildLevel(job.id, { name: 'Level 1' });
  const l2 = await buildLevel(job.id, { name: 'Level 2' });
  const office = await buildSpace(job.id, l1.id, { name: 'Office 101' });
  const corridor = await buildSpace(job.id, l2.id, { name: 'Corridor' });
  const system = await buildSystem(job.id, { name: 'VRF-1' });
  const model = await buildUnitModel(job.id, { name: 'Cassette 24', modelNumber: 'CX-24', unitKind: 'cassette_4way' });
  return { job, l1, l2, office, corridor, system, model };
}

describe('units: read', () => {
  it('answers 401 signed out', async () => {
    const { job } = await setUpJob();
    await request(trimout.app).get(jobPath(job.id, '/units')).expect(401);
    await request(trimout.app).get(jobPath(job.id, '/units.csv')).expect(401);
  });

  it('lets every role list and read units, with filters', async () => {
    const s = await setUpJob();
    const a = await buildUnit(s.job.id, s.l1.id, { tag: 'IU-L1-01', spaceId: s.office.id, systemId: s.system.id });
    await buildUnit(s.job.id, s.l1.id, { tag: 'IU-L1-02', kind: 'wall_mounted' });
    await buildUnit(s.job.id, s.l2.id, { tag: 'IU-L2-01', spaceId: s.corridor.id, systemId: s.system.id });
    for (const who of [crew.gc, crew.insp, crew.sub]) {
      const all = await who.get(jobPath(s.job.id, '/units'));
      expect(all.status).toBe(200);
      expect(all.body.items.map((u: { tag: string }) => u.tag)).toEqual(['IU-L1-01', 'IU-L1-02', 'IU-L2-01']);
      const one = await who.get(jobPath(s.job.id, `/units/${a.id}`));
      expect(one.status).toBe(200);
      expect(one.headers.etag).toBe('"v1"');
      expect(one.body).toMatchObject({ tag: 'IU-L1-01', levelName: 'Level 1', spaceName: 'Office 101', systemName: 'VRF-1' });
      // The list's items (plain rows) are exactly what reading each unit gives.
      for (const item of all.body.items as { id: string }[]) expect(item).toEqual((await who.get(jobPath(s.job.id, `/units/${item.id}`))).body);
    }
    const tags = async (q: string) => (await crew.insp.get(jobPath(s.job.id, `/units?${q}`))).body.items.map((u: { tag: string }) => u.tag);
    expect(await tags(`levelId=${s.l2.id}`)).toEqual(['IU-L2-01']);
    expect(await tags(`spaceId=${s.office.id}`)).toEqual(['IU-L1-01']);
    expect(await tags(`systemId=${s.system.id}`)).toEqual(['IU-L1-01', 'IU-L2-01']);
    expect(await tags('kind=wall_mounted')).toEqual(['IU-L1-02']);
    expect(await tags('q=l1-')).toEqual(['IU-L1-01', 'IU-L1-02']);
    expect(await tags('q=%25')).toEqual([]);
    const bad = await crew.insp.get(jobPath(s.job.id, '/units?kind=window_unit'));
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toBe('query.kind: Choose a unit kind from the list.');
    expect((await crew.insp.get(jobPath(s.job.id, '/units?sort=tag'))).status).toBe(400);
  });

  it('pages with limit (at most 200) and an opaque cursor', async () => {
    const s = await setUpJob();
    for (let i = 1; i <= 5; i++) await buildUnit(s.job.id, s.l1.id, { tag: `T-${i}` });
    const seen: string[] = [];
    let cursor: string | null = null;
    do {
      const res: request.Response = await crew.sub.get(jobPath(s.job.id, `/units?limit=2${cursor ? `&cursor=${cursor}` : ''}`));
      seen.push(...res.body.items.map((u: { tag: string }) => u.tag));
      cursor = res.body.nextCursor;
    } while (cursor);
    expect(seen).toEqual(['T-1', 'T-2', 'T-3', 'T-4', 'T-5']);
    const tooMany = await crew.sub.get(jobPath(s.job.id, '/units?limit=500'));
    expect(tooMany.status).toBe(400);
    expect(tooMany.body.error.message).toBe('query.limit: At most 200.');
  });

  it("answers 404 for another job's units", async () => {
    const other = await buildJobWithCrew();
    const level = await buildLevel(other.job.id);
    const unit = await buildUnit(other.job.id, level.id);
    expect((await crew.gc.get(jobPath(other.job.id, '/units'))).status).toBe(404);
    const mine = await newJobFor(crew);
    expect((await crew.gc.get(jobPath(mine.id, `/units/${unit.id}`))).status).toBe(404);
  });
});

describe('units: write', () => {
  it('creates a unit, capacity typed as the trade writes it (stored in W)', async () => {
    const s = await setUpJob();
    const res = await crew.gc.post(jobPath(s.job.id, '/units'), {
      tag: 'IU-L1-07',
      kind: 'cassette_4way',
      capacity: '3 tons',
      levelId: s.l1.id,
      spaceId: s.office.id,
      systemId: s.system.id,
      modelId: s.model.id,
    });
    expect(res.status).toBe(201);
    expect(res.headers.etag).toBe('"v1"');
    expect(res.body).toMatchObject({ tag: 'IU-L1-07', modelName: 'Cassette 24', levelName: 'Level 1', version: 1 });
    expect(res.body.capacity).toBeCloseTo(3 * WATTS_PER_TON, 6);
    const kw = await crew.gc.post(jobPath(s.job.id, '/units'), { tag: 'IU-L1-08', kind: 'wall_mounted', capacity: '10.5 kW', levelId: s.l1.id });
    expect(kw.body.capacity).toBe(10500);
  });

  it.each([
    [{ capacity: 'three tons' }, /^capacity: "three tons" does not start with a number/],
    [{ capacity: '36000' }, /^capacity: "36000" is a bare number/],
    [{ tag: '' }, /^tag: Enter a tag\./],
    [{ kind: 'window' }, /^kind: Choose a unit kind\./],
    [{ levelId: 'nope' }, /^levelId: Choose a level from the list\./],
    [{ colour: 'red' }, /Leave out colour/],
  ])('answers 400 with a message for %j', async (change, message) => {
    const s = await setUpJob();
    const res = await crew.gc.post(jobPath(s.job.id, '/units'), { tag: 'IU-1', kind: 'cassette_4way', levelId: s.l1.id, ...change });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(message);
  });

  it('refuses references that do not fit: a space on another level, a model of another kind, another job’s system', async () => {
    const s = await setUpJob();
    const base = { tag: 'IU-9', kind: 'cassette_4way', levelId: s.l1.id };
    const wrongSpace = await crew.gc.post(jobPath(s.job.id, '/units'), { ...base, spaceId: s.corridor.id });
    expect(wrongSpace.status).toBe(400);
    expect(wrongSpace.body.error.message).toBe('spaceId: Corridor is not on Level 1.');
    const wrongKind = await crew.gc.post(jobPath(s.job.id, '/units'), { ...base, kind: 'wall_mounted', modelId: s.model.id });
    expect(wrongKind.status).toBe(400);
    expect(wrongKind.body.error.message).toMatch(/^modelId: Cassette 24 is a ceiling cassette, four-way model, not a wall-mounted\./);
    const foreign = await buildSystem((await newJobFor(crew)).id);
    const other = await crew.gc.post(jobPath(s.job.id, '/units'), { ...base, systemId: foreign.id });
    expect(other.status).toBe(400);
    expect(other.body.error.message).toBe('systemId: Not a system of this job.');
  });

  it('refuses a duplicate tag within the job with 409 (create and rename)', async () => {
    const s = await setUpJob();
    await buildUnit(s.job.id, s.l1.id, { tag: 'IU-L1-01' });
    const b = await buildUnit(s.job.id, s.l1.id, { tag: 'IU-L1-02' });
    const dup = await crew.gc.post(jobPath(s.job.id, '/units'), { tag: 'IU-L1-01', kind: 'cassette_4way', levelId: s.l1.id });
    expect(dup.status).toBe(409);
    expect(dup.body.error.message).toBe('Tag "IU-L1-01" is already used by another unit of this job.');
    const rename = await crew.gc.patch(jobPath(s.job.id, `/units/${b.id}`), { tag: 'IU-L1-01' }, ifMatch(1));
    expect(rename.status).toBe(409);
    // The same tag on another job is fine.
    const elsewhere = await newJobFor(crew);
    const l = await buildLevel(elsewhere.id);
    expect((await crew.gc.post(jobPath(elsewhere.id, '/units'), { tag: 'IU-L1-01', kind: 'cassette_4way', levelId: l.id })).status).toBe(201);
  });

  it.each(['insp', 'sub'] as const)('refuses every unit write to the %s with 403', async (who) => {
    const s = await setUpJob();
    const unit = await buildUnit(s.job.id, s.l1.id);
    const c = crew[who];
    expect((await c.post(jobPath(s.job.id, '/units'), { tag: 'X-1', kind: 'cassette_4way', levelId: s.l1.id })).status).toBe(403);
    expect((await c.patch(jobPath(s.job.id, `/units/${unit.id}`), { tag: 'X-2' }, ifMatch(1))).status).toBe(403);
    expect((await c.del(jobPath(s.job.id, `/units/${unit.id}`), ifMatch(1))).status).toBe(403);
    expect((await c.post(jobPath(s.job.id, '/units/import'), { csv: 'Tag,Kind,Level\nX-3,wall_mounted,Level 1\n' })).status).toBe(403);
    expect(await Unit.count({ where: { jobId: s.job.id } })).toBe(1);
  });

  it('changes a unit with If-Match (428 / 412 / 200) and deletes it', async () => {
    const s = await setUpJob();
    const unit = await buildUnit(s.job.id, s.l1.id, { tag: 'IU-1' });
    const path = jobPath(s.job.id, `/units/${unit.id}`);
    expect((await crew.gc.patch(path, { capacity: '24000 Btu/h' })).status).toBe(428);
    const stale = await crew.gc.patch(path, { capacity: '24000 Btu/h' }, ifMatch(3));
    expect(stale.status).toBe(412);
    expect(stale.body.current).toMatchObject({ id: unit.id, tag: 'IU-1', version: 1 });
    const ok = await crew.gc.patch(path, { capacity: '24000 Btu/h', levelId: s.l2.id, spaceId: s.corridor.id }, ifMatch(1));
    expect(ok.status).toBe(200);
    expect(ok.headers.etag).toBe('"v2"');
    expect(ok.body).toMatchObject({ levelName: 'Level 2', spaceName: 'Corridor', version: 2 });
    expect(ok.body.capacity).toBeCloseTo(2 * WATTS_PER_TON, 6);
    expect((await crew.gc.del(path)).status).toBe(428);
    expect((await crew.gc.del(path, ifMatch(1))).status).toBe(412);
    expect((await crew.gc.del(path, ifMatch(2))).status).toBe(204);
    expect((await crew.gc.get(path)).status).toBe(404);
  });

  it('replays a create with the same Idempotency-Key; the key with another body is 422', async () => {
    const s = await setUpJob();
    const key = { 'Idempotency-Key': `unit-${s.job.id}` };
    const body = { tag: 'IU-R-1', kind: 'floor_console', levelId: s.l1.id };
    const first = await crew.gc.post(jobPath(s.job.id, '/units'), body, key);
    const again = await crew.gc.post(jobPath(s.job.id, '/units'), body, key);
    expect(first.status).toBe(201);
    expect(again.status).toBe(201);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(again.body.id).toBe(first.body.id);
    expect(await Unit.count({ where: { jobId: s.job.id } })).toBe(1);
    expect((await crew.gc.post(jobPath(s.job.id, '/units'), { ...body, tag: 'IU-R-2' }, key)).status).toBe(422);
  });
});

describe('units: CSV import', () => {
  const header = 'Tag,Kind,Model,Capacity,Level,Space,System';

  it('previews (dry run) with a column mapping, then commits every row in one go', async () => {
    const s = await setUpJob();
    const csv = ['Equip,Type,Cap,Floor,Room,Circuit', 'IU-1,cassette_4way,3 tons,Level 1,Office 101,VRF-1', 'IU-2,Wall-mounted,9000 Btu/h,level 2,corridor,'].join('\n');
    const mapping = { Equip: 'tag', Type: 'kind', Cap: 'capacity', Floor: 'level', Room: 'space', Circuit: 'system' };
    const preview = await crew.gc.post(jobPath(s.job.id, '/units/import'), { csv, mapping, dryRun: true });
    expect(preview.status).toBe(200);
    expect(preview.body).toMatchObject({ dryRun: true, committed: false, totalRows: 2, goodRows: 2, badRows: 0, errors: [], created: 0 });
    expect(preview.body.preview[1]).toMatchObject({ line: 3, tag: 'IU-2', kind: 'wall_mounted', levelName: 'Level 2', spaceName: 'Corridor', systemName: null });
    expect(await Unit.count({ where: { jobId: s.job.id } })).toBe(0);
    const commit = await crew.gc.post(jobPath(s.job.id, '/units/import'), { csv, mapping });
    expect(commit.status).toBe(201);
    expect(commit.body).toMatchObject({ committed: true, created: 2 });
    expect(await Unit.count({ where: { jobId: s.job.id } })).toBe(2);
  });

  it('reports every bad row with its line and reason, and imports nothing', async () => {
    const s = await setUpJob();
    await buildUnit(s.job.id, s.l1.id, { tag: 'IU-OLD' });
    const csv = [
      header,
      'IU-1,cassette_4way,CX-24,3 tons,Level 1,Office 101,VRF-1',
      'IU-2,cassette_4way,,12 kW,Level 9,,',
      'IU-3,cassette_4way,,,Level 1,Broom closet,',
      'IU-4,cassette_4way,,,Level 1,,VRF-99',
      'IU-1,cassette_4way,,,Level 1,,',
      'IU-OLD,cassette_4way,,,Level 1,,',
      'IU-7,cassette_4way,,lots,Level 1,,',
      'IU-8,window unit,,,Level 1,,',
      'IU-9,wall_mounted,CX-24,,Level 1,,',
      'IU-10,ducted_low,,36000 Btu/h,Level 2,Corridor,VRF-1',
    ].join('\n');
    const res = await crew.gc.post(jobPath(s.job.id, '/units/import'), { csv });
    expect(res.status).toBe(200);
    // IU-OLD is the unit already in the job: a revision of it, not an error.
    expect(res.body).toMatchObject({ dryRun: false, committed: false, totalRows: 10, goodRows: 3, badRows: 7, created: 0 });
    expect(res.body.errors).toEqual([
      { line: 3, field: 'level', reason: 'Unknown level "Level 9".' },
      { line: 4, field: 'space', reason: 'Unknown space "Broom closet" on Level 1.' },
      { line: 5, field: 'system', reason: 'Unknown system "VRF-99".' },
      { line: 6, field: 'tag', reason: 'Duplicate tag "IU-1" in the file (also on line 2).' },
      { line: 8, field: 'capacity', reason: expect.stringMatching(/^Capacity: "lots" does not start with a number/) },
      { line: 9, field: 'kind', reason: 'Unit kind "window unit" is not one Trimout can read: choose its kind where the file\'s kinds are listed.' },
      { line: 10, field: 'model', reason: 'Model "Cassette 24" is a ceiling cassette, four-way, not a wall-mounted.' },
    ]);
    expect(await Unit.count({ where: { jobId: s.job.id } })).toBe(1);
  });

  it('takes the file itself as text/csv (dryRun in the query), with a UTF-8 BOM and bare numbers in a "Capacity (Btu/h)" column', async () => {
    const s = await setUpJob();
    const csv = `\uFEFFTag,Kind,Capacity (Btu/h),Level\r\nIU-1,floor_console,12000,Level 1\r\n`;
    const res = await crewPostCsv(s.job.id, Buffer.from(csv, 'utf8'), '?dryRun=true');
    expect(res.status).toBe(200);
    expect(res.body.preview[0].capacity).toBeCloseTo(WATTS_PER_TON, 6);
    const commit = await crewPostCsv(s.job.id, Buffer.from(csv, 'utf8'));
    expect(commit.status).toBe(201);
  });

  it('reads a mounting position column (floor, wall, ceiling, "Floor-standing" ...) and reports any other value with its line', async () => {
    const s = await setUpJob();
    const bad = `Tag,Kind,Level,Mounting position\nAHU-1,ahu_coil_kit,Level 1,Floor-standing\nAHU-2,ahu_coil_kit,Level 1,roof\n`;
    const refused = await crew.gc.post(jobPath(s.job.id, '/units/import'), { csv: bad });
    expect(refused.status).toBe(200);
    expect(refused.body.committed).toBe(false);
    expect(refused.body.errors).toEqual([{ line: 3, field: 'mount', reason: 'Mounting position "roof" is not floor, wall or ceiling.' }]);
    const good = `Tag,Kind,Level,Mounting position\nAHU-1,ahu_coil_kit,Level 1,Floor-standing\nDU-1,ducted_low,Level 1,ceiling\nDU-2,ducted_low,Level 1,\n`;
    const res = await crew.gc.post(jobPath(s.job.id, '/units/import'), { csv: good });
    expect(res.status).toBe(201);
    expect(res.body.mapping).toMatchObject({ 'Mounting position': 'mount' });
    expect(res.body.preview.map((r: { tag: string; mountPosition: string | null }) => [r.tag, r.mountPosition])).toEqual([
      ['AHU-1', 'floor'],
      ['DU-1', 'ceiling'],
      ['DU-2', null],
    ]);
    const list = await crew.gc.get(jobPath(s.job.id, '/units?q=AHU-1'));
    expect(list.body.items[0]).toMatchObject({ tag: 'AHU-1', mountPosition: 'floor', effectiveMount: { mount: 'floor', from: 'unit' } });
  });

  it('refuses a file that is not UTF-8 with a clear 400', async () => {
    const s = await setUpJob();
    const latin1 = Buffer.from('Tag,Kind,Level\nIU-1,cassette_4way,Caf\xe9\n', 'latin1');
    const res = await crewPostCsv(s.job.id, latin1);
    expect(res.status).toBe(400);
    expect(res.body.error.message).toBe('The file is not UTF-8 text. Save the schedule as "CSV UTF-8" (comma delimited) and import it again.');
    const json = await crew.gc.post(jobPath(s.job.id, '/units/import'), { csv: 'Tag,Kind,Level\nIU-1,cassette_4way,Caf\uFFFD\n' });
    expect(json.status).toBe(400);
    expect(json.body.error.message).toMatch(/not UTF-8/);
  });

  it('refuses missing columns, a mapping to a column that is not there, and malformed CSV', async () => {
    const s = await setUpJob();
    const missing = await crew.gc.post(jobPath(s.job.id, '/units/import'), { csv: 'Tag,Capacity\nIU-1,3 tons\n' });
    expect(missing.status).toBe(400);
    expect(missing.body.error.message).toMatch(/^Missing columns: level, kind \(or model\)\./);
    const mapped = await crew.gc.post(jobPath(s.job.id, '/units/import'), { csv: 'A,B,C\nx,y,z\n', mapping: { Z: 'tag' } });
    expect(mapped.status).toBe(400);
    expect(mapped.body.error.message).toBe('mapping: The file has no column "Z".');
    const broken = await crew.gc.post(jobPath(s.job.id, '/units/import'), { csv: 'Tag,Kind,Level\n"IU-1,cassette_4way,Level 1\n' });
    expect(broken.status).toBe(400);
    expect(broken.body.error.message).toMatch(/^The CSV cannot be read near line \d+: a quoted cell is never closed\.$/);
    const empty = await crew.gc.post(jobPath(s.job.id, '/units/import'), { csv: 'Tag,Kind,Level\n' });
    expect(empty.status).toBe(400);
    expect(empty.body.error.message).toBe('The CSV has a header row but no units.');
  });

  it('accepts 5,000 rows (dry run) and refuses 10,000 rows with 413 and a message', async () => {
    const s = await setUpJob();
    const rows = (n: number) => [header, ...Array.from({ length: n }, (_, i) => `IU-${i + 1},wall_mounted,,9000 Btu/h,Level 1,,`)].join('\n');
    const ok = await crew.gc.post(jobPath(s.job.id, '/units/import'), { csv: rows(5000), dryRun: true });
    expect(ok.status).toBe(200);
    expect(ok.body).toMatchObject({ totalRows: 5000, goodRows: 5000, badRows: 0 });
    const tooMany = await crew.gc.post(jobPath(s.job.id, '/units/import'), { csv: rows(10_000) });
    expect(tooMany.status).toBe(413);
    expect(tooMany.body.error.message).toBe('The file has 10,000 rows; import at most 5,000 units at a time (split the file).');
    const asCsv = await crewPostCsv(s.job.id, Buffer.from(rows(10_000), 'utf8'));
    expect(asCsv.status).toBe(413);
    expect(await Unit.count({ where: { jobId: s.job.id } })).toBe(0);
  });

  it('refuses other content types on the import with 415', async () => {
    const s = await setUpJob();
    const res = await crewPost(s.job.id, '/units/import').set('Content-Type', 'text/plain').send('Tag,Kind,Level\n');
    expect(res.status).toBe(415);
  });

  it('replays an import with the same Idempotency-Key without importing twice', async () => {
    const s = await setUpJob();
    const body = { csv: `${header}\nIU-1,wall_mounted,,,Level 1,,\n` };
    const key = { 'Idempotency-Key': `import-${s.job.id}` };
    const first = await crew.gc.post(jobPath(s.job.id, '/units/import'), body, key);
    const again = await crew.gc.post(jobPath(s.job.id, '/units/import'), body, key);
    expect(first.status).toBe(201);
    expect(again.status).toBe(201);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(await Unit.count({ where: { jobId: s.job.id } })).toBe(1);
  });
});

describe('units: CSV export', () => {
  it('exports the register for every role: BOM, quoted strings, numbers as numbers, formulas neutralised', async () => {
    const s = await setUpJob();
    const evil = await buildLevel(s.job.id, { name: '=HYPERLINK("http://x.example","click")' });
    const spaces = await Promise.all(
      ['+1 Lobby', '-2 Store', '@SUM(A1)', '\tTabbed', '\rCarriage', '\nNewline', 'Plain "quoted" room'].map((name) =>
        buildSpace(s.job.id, evil.id, { name }),
      ),
    );
    for (const [i, sp] of spaces.entries()) await buildUnit(s.job.id, evil.id, { tag: `IU-X-${i}`, spaceId: sp.id, capacity: WATTS_PER_TON * 3 });
    for (const who of [crew.gc, crew.insp, crew.sub]) {
      const res = await who.get(jobPath(s.job.id, '/units.csv'));
      expect(res.status).toBe(200);
      expect(res.headers['content-type']).toBe('text/csv; charset=utf-8');
      expect(res.headers['content-disposition']).toMatch(/^attachment; filename="units-job-\d{4}-\d{2}-\d{2}\.csv"$/);
    }
    const res = await crew.gc.get(jobPath(s.job.id, '/units.csv')).then((r) => r);
    const text = res.text;
    expect(text.startsWith('\uFEFF')).toBe(true);
    const lines = text.slice(1).split('\r\n');
    expect(lines[0]).toBe('"Tag","Kind","Model","Capacity (Btu/h)","Level","Space","System","Crew","Crew company","Mounting"');
    expect(lines[1]).toBe(`"IU-X-0","cassette_4way","",36000,"'=HYPERLINK(""http://x.example"",""click"")","'+1 Lobby","","","",""`);
    const records = parse(text, { bom: true, relax_quotes: false }) as string[][];
    const cells = records.slice(1).flatMap((r) => [r[4]!, r[5]!]);
    for (const cell of cells) expect(cell).not.toMatch(/^[=+\-@\t\r\n\0]/);
    expect(records.slice(1).map((r) => r[5])).toEqual(["'+1 Lobby", "'-2 Store", "'@SUM(A1)", "'\tTabbed", "'\rCarriage", "'\nNewline", 'Plain "quoted" room']);
  });

  it('re-imports unchanged: crew with its company (a crew name two companies use) and the unit\'s own mounting', async () => {
    const s = await setUpJob();
    const [north, south] = [await buildCompany({ name: `North Air ${s.job.id.slice(0, 8)}` }), await buildCompany({ name: `South Air ${s.job.id.slice(0, 8)}` })];
    await linkCompany(s.job.id, north.id, ['mechanical']);
    await linkCompany(s.job.id, south.id, ['mechanical']);
    const northCrew = await Crew.create({ jobId: s.job.id, companyId: north.id, name: 'Crew 1' });
    const southCrew = await Crew.create({ jobId: s.job.id, companyId: south.id, name: 'Crew 1' });
    await buildUnit(s.job.id, s.l1.id, { tag: 'IU-1', kind: 'cassette_4way', modelId: s.model.id, spaceId: s.office.id, systemId: s.system.id, capacity: WATTS_PER_TON * 2 });
    await buildUnit(s.job.id, s.l1.id, { tag: 'IU-2', kind: 'floor_ceiling' });
    await buildUnit(s.job.id, s.l2.id, { tag: 'IU-3', kind: 'ducted_low', spaceId: s.corridor.id });
    await Unit.update({ installedByCrewId: northCrew.id, mountPosition: 'ceiling' }, { where: { jobId: s.job.id, tag: 'IU-1' } });
    await Unit.update({ installedByCrewId: southCrew.id, mountPosition: 'floor' }, { where: { jobId: s.job.id, tag: 'IU-2' } });
    const fields = async () =>
      (await Unit.findAll({ where: { jobId: s.job.id }, order: [['tag', 'ASC']] })).map((u) => [u.tag, u.kind, u.modelId, u.capacity, u.levelId, u.spaceId, u.systemId, u.installedByCrewId, u.mountPosition]);
    const before = await fields();

    const exported = (await crew.gc.get(jobPath(s.job.id, '/units.csv'))).text;
    const records = parse(exported, { bom: true }) as string[][];
    expect(records[0]!.slice(7)).toEqual(['Crew', 'Crew company', 'Mounting']);
    expect(records.slice(1).map((r) => r.slice(7))).toEqual([
      ['Crew 1', north.name, 'ceiling'],
      ['Crew 1', south.name, 'floor'],
      // A ducted unit has no mounting of its own: left empty, not its kind's or model's.
      ['', '', ''],
    ]);

    await Unit.destroy({ where: { jobId: s.job.id } });
    const imported = await crew.gc.post(jobPath(s.job.id, '/units/import'), { csv: exported });
    expect(imported.status).toBe(201);
    expect(imported.body).toMatchObject({ committed: true, goodRows: 3, errors: [] });
    // Every column maps to its field by its header alone.
    expect(Object.values(imported.body.mapping)).toEqual(['tag', 'kind', 'model', 'capacity', 'level', 'space', 'system', 'crew', 'crewCompany', 'mount']);
    expect((await fields()).map((f) => f.slice(1))).toEqual(before.map((f) => f.slice(1)));
    expect((await crew.gc.get(jobPath(s.job.id, '/units.csv'))).text).toBe(exported);
  });

  it('neutralises any string a spreadsheet could read as a formula (property)', () => {
    fc.assert(
      fc.property(fc.string(), (s) => {
        const out = neutraliseCell(s);
        expect(/^[=+\-@\t\r\n\0]/.test(out)).toBe(false);
        expect(out === s || out === `'${s}`).toBe(true);
      }),
    );
  });
});

function crewPost(jobId: string, rest: string) {
  // A raw agent call for bodies that are not JSON; the GC manager's caller carries cookie and CSRF.
  return crewAgent().post(jobPath(jobId, rest)).set('X-CSRF-Token', crewCsrf());
}
function crewPostCsv(jobId: string, bytes: Buffer, query = '') {
  return crewPost(jobId, `/units/import${query}`).set('Content-Type', 'text/csv').send(bytes);
}
function crewAgent() {
  return crew.gcSignedIn.agent;
}
function crewCsrf() {
  return crew.gcSignedIn.csrf;
}
