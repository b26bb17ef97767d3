/**
 * Importing a schedule as it comes: kinds in the schedule's words (and the user's mapping kept per
 * job), kinds from models, every capacity header, missing levels and spaces created in the same
 * import, revised schedules (added / changed / untouched / not in the file), the import record
 * and its undo, and bulk delete, all with the rule that a unit with a check or finding stays.
 */
import { QueryTypes } from 'sequelize';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { Level, Space, Unit } from '../../../server/models';
import { WATTS_PER_TON } from '../../../shared/calc/quantity';
import { ifMatch, jobPath, newJobFor, signInCrew, type SignedCrew } from '../../support/api';
import { buildTestApp } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildLevel, buildSpace, buildSystem, buildUnit, buildUnitModel } from '../../support/factories';
import { buildWalkJob, insertFinding } from '../../support/findings';

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

async function setUpJob() {
  const job = await newJobFor(crew);
  const l1 = await buildLevel(job.id, { name: 'Level 1' });
  const office = await buildSpace(job.id, l1.id, { name: 'Office 101' });
  const system = await buildSystem(job.id, { name: 'VRF-1' });
  const model = await buildUnitModel(job.id, { name: 'Cassette 24', modelNumber: 'CX-24', unitKind: 'cassette_4way' });
  return { job, l1, office, system, model };
}

const post = (jobId: string, body: object) => crew.gc.post(jobPath(jobId, '/units/import'), body);
const tags = async (jobId: string) => (await Unit.findAll({ where: { jobId }, order: [['tag', 'ASC']] })).map((u) => u.tag);

describe('unit import: files separated by semicolons or tabs (the one CSV reader, shared/rules/csvRead.ts)', () => {
  it('imports a semicolon-separated schedule saved with a byte-order mark and CRLF, a quoted cell holding a semicolon', async () => {
    const s = await setUpJob();
    const csv = [
      '\uFEFFTag;Unit type;Capacity (Btu/h);Level;Room;Notes',
      'IU-1;4-WAY CASSETTE;24000;Level 1;Office 101;"east; by the window"',
      'IU-2;"Wall mount";9000;Level 1;;',
      '',
    ].join('\r\n');
    const dry = await post(s.job.id, { csv, dryRun: true });
    expect(dry.status).toBe(200);
    expect(dry.body.mapping).toEqual({ Tag: 'tag', 'Unit type': 'kind', 'Capacity (Btu/h)': 'capacity', Level: 'level', Room: 'space' });
    expect(dry.body.errors).toEqual([]);
    // The file itself, as the screen sends it.
    const res = await crew.gcSignedIn.agent
      .post(jobPath(s.job.id, '/units/import'))
      .set('X-CSRF-Token', crew.gcSignedIn.csrf)
      .set('Content-Type', 'text/csv')
      .send(Buffer.from(csv, 'utf8'));
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ committed: true, created: 2 });
    const units = await Unit.findAll({ where: { jobId: s.job.id }, order: [['tag', 'ASC']] });
    expect(units.map((u) => [u.tag, u.kind, u.levelId, u.spaceId])).toEqual([
      ['IU-1', 'cassette_4way', s.l1.id, s.office.id],
      ['IU-2', 'wall_mounted', s.l1.id, null],
    ]);
    expect(units[0]!.capacity).toBeCloseTo(2 * WATTS_PER_TON, 6);
  });

  it('reads a tab-separated schedule (cells copied from a spreadsheet)', async () => {
    const s = await setUpJob();
    const res = await post(s.job.id, { csv: 'Tag\tKind\tLevel\nIU-1\twall_mounted\tLevel 1\nIU-2\t"floor, console"\tLevel 1\n', dryRun: true });
    expect(res.status).toBe(200);
    expect(res.body.preview.map((r: { tag: string; kind: string }) => [r.tag, r.kind])).toEqual([
      ['IU-1', 'wall_mounted'],
      ['IU-2', 'floor_console'],
    ]);
  });

  it('says the line each record starts on, a quoted cell over two lines counting both', async () => {
    const s = await setUpJob();
    const res = await post(s.job.id, { csv: 'Tag;Kind;Level\nIU-1;"Wall\r\nmount";Level 1\nIU-2;wall_mounted;Level 9\n', dryRun: true });
    expect(res.body.errors).toEqual([{ line: 4, field: 'level', reason: 'Unknown level "Level 9".' }]);
    const broken = await post(s.job.id, { csv: 'Tag;Kind;Level\nIU-1;wall_mounted;Level 1\nIU-2;"wall_mounted;Level 1\nIU-3;wall_mounted;Level 1\n' });
    expect(broken.status).toBe(400);
    expect(broken.body.error.message).toBe('The CSV cannot be read near line 3: a quoted cell is never closed.');
    const stray = await post(s.job.id, { csv: 'Tag;Kind;Level\nIU-1;wall_mounted;Level 1\n\nIU-2;"wall" mounted;Level 1\n' });
    expect(stray.status).toBe(400);
    expect(stray.body.error.message).toBe('The CSV cannot be read near line 4: a quoted cell has text after its closing quote.');
  });
});

describe('unit import: kinds and capacity as schedules write them', () => {
  it('reads kinds in the trade’s words, asks once for the ones it cannot tell, and keeps that mapping for the job’s next import', async () => {
    const s = await setUpJob();
    const csv = [
      'Tag,Unit type,Capacity (Btu/h),Level',
      'IU-1,4-WAY CASSETTE,24000,Level 1',
      'IU-2,WALL MOUNT,9000,Level 1',
      'IU-3,DUCTED HSP,36000,Level 1',
      'IU-4,Ceiling cassette four-way,12000,Level 1',
      'IU-5,Cassette,12000,Level 1',
      'IU-6,cassette,12000,Level 1',
    ].join('\r\n');
    const first = await post(s.job.id, { csv, dryRun: true });
    expect(first.status).toBe(200);
    expect(first.body.mapping).toEqual({ Tag: 'tag', 'Unit type': 'kind', 'Capacity (Btu/h)': 'capacity', Level: 'level' });
    expect(first.body.kindValues).toEqual([
      { value: '4-WAY CASSETTE', rows: 1, kind: 'cassette_4way', from: 'read' },
      { value: 'WALL MOUNT', rows: 1, kind: 'wall_mounted', from: 'read' },
      { value: 'DUCTED HSP', rows: 1, kind: 'ducted_high', from: 'read' },
      { value: 'Ceiling cassette four-way', rows: 1, kind: 'cassette_4way', from: 'read' },
      // "Cassette" alone does not say its way count: the user chooses, once for both spellings.
      { value: 'Cassette', rows: 2, kind: null, from: null },
    ]);
    expect(first.body.errors.map((e: { line: number; field: string }) => [e.line, e.field])).toEqual([
      [6, 'kind'],
      [7, 'kind'],
    ]);
    expect(first.body.preview[0].capacity).toBeCloseTo(2 * WATTS_PER_TON, 6);

    const mapped = await post(s.job.id, { csv, kindValues: { Cassette: 'cassette_2way' } });
    expect(mapped.status).toBe(201);
    expect(mapped.body.kindValues[4]).toEqual({ value: 'Cassette', rows: 2, kind: 'cassette_2way', from: 'mapped' });
    expect((await Unit.findOne({ where: { jobId: s.job.id, tag: 'IU-6' } }))!.kind).toBe('cassette_2way');

    // The next schedule of this job: the mapping is remembered (any case, any spacing).
    const next = await post(s.job.id, { csv: 'Tag,Type,Level\nIU-7,CASSETTE ,Level 1\n', dryRun: true });
    expect(next.body.kindValues).toEqual([{ value: 'CASSETTE', rows: 1, kind: 'cassette_2way', from: 'saved' }]);
    expect(next.body.errors).toEqual([]);
    // ...and only for this job.
    const other = await setUpJob();
    const elsewhere = await post(other.job.id, { csv: 'Tag,Type,Level\nIU-7,CASSETTE,Level 1\n', dryRun: true });
    expect(elsewhere.body.kindValues[0]).toMatchObject({ kind: null });
  });

  it('takes a unit’s kind from its model when the kind cell is empty (or there is no kind column)', async () => {
    const s = await setUpJob();
    const res = await post(s.job.id, { csv: 'Tag,Kind,Model,Level\nIU-1,,CX-24,Level 1\nIU-2,,,Level 1\n', dryRun: true });
    expect(res.body.preview).toEqual([expect.objectContaining({ tag: 'IU-1', kind: 'cassette_4way', modelName: 'Cassette 24' })]);
    expect(res.body.errors).toEqual([{ line: 3, field: 'kind', reason: 'Unit kind is empty and there is no model to take it from.' }]);
    const noKind = await post(s.job.id, { csv: 'Tag,Model,Level\nIU-1,Cassette 24,Level 1\n' });
    expect(noKind.status).toBe(201);
    expect((await Unit.findOne({ where: { jobId: s.job.id, tag: 'IU-1' } }))!.kind).toBe('cassette_4way');
  });

  it.each([
    ['Cooling capacity (kW)', '7.1', 7100],
    ['Nominal cooling [MBH]', '36', 3 * WATTS_PER_TON],
    ['CAPACITY', '2 tons', 2 * WATTS_PER_TON],
  ])('maps the header "%s" to capacity with its unit', async (header, cell, watts) => {
    const s = await setUpJob();
    const res = await post(s.job.id, { csv: `Tag,Kind,${header},Level\nIU-1,wall_mounted,${cell},Level 1\n`, dryRun: true });
    expect(res.body.mapping[header]).toBe('capacity');
    expect(res.body.preview[0].capacity).toBeCloseTo(watts, 6);
  });

  it('refuses a kind mapping to a kind Trimout does not have with 400', async () => {
    const s = await setUpJob();
    const res = await post(s.job.id, { csv: 'Tag,Kind,Level\nIU-1,Cassette,Level 1\n', kindValues: { Cassette: 'window_unit' } });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toBe('kindValues.Cassette: Choose a unit kind for each value.');
  });
});

describe('unit import: levels and spaces missing from the job', () => {
  const csv = [
    'Tag,Kind,Level,Room',
    'IU-1,wall_mounted,Level 1,Office 101',
    'IU-2,wall_mounted,Level 1,Exam 102',
    'IU-3,wall_mounted,Level 2,Exam 201',
    'IU-4,wall_mounted,level 2,exam 201',
    'IU-5,wall_mounted,Level 2,',
  ].join('\n');

  it('lists them in the preview and, when asked, creates them in the same import', async () => {
    const s = await setUpJob();
    const preview = await post(s.job.id, { csv, dryRun: true });
    expect(preview.body.missingPlaces).toEqual({
      levels: ['Level 2'],
      spaces: [
        { level: 'Level 1', space: 'Exam 102' },
        { level: 'Level 2', space: 'Exam 201' },
      ],
    });
    expect(preview.body.errors.map((e: { line: number; reason: string }) => [e.line, e.reason])).toEqual([
      [3, 'Unknown space "Exam 102" on Level 1.'],
      [4, 'Unknown level "Level 2".'],
      [5, 'Unknown level "level 2".'],
      [6, 'Unknown level "Level 2".'],
    ]);
    const withPlaces = await post(s.job.id, { csv, dryRun: true, createPlaces: true });
    expect(withPlaces.body).toMatchObject({ errors: [], goodRows: 5, placesCreated: false });
    expect(await Level.count({ where: { jobId: s.job.id } })).toBe(1);

    const commit = await post(s.job.id, { csv, createPlaces: true });
    expect(commit.status).toBe(201);
    expect(commit.body).toMatchObject({ committed: true, created: 5, placesCreated: true });
    const levels = await Level.findAll({ where: { jobId: s.job.id }, order: [['position', 'ASC']] });
    expect(levels.map((l) => [l.name, l.position])).toEqual([
      ['Level 1', 1],
      ['Level 2', 2],
    ]);
    const spaces = await Space.findAll({ where: { jobId: s.job.id }, order: [['name', 'ASC']] });
    expect(spaces.map((sp) => sp.name)).toEqual(['Exam 102', 'Exam 201', 'Office 101']);
    const iu4 = await Unit.findOne({ where: { jobId: s.job.id, tag: 'IU-4' } });
    expect(iu4!.spaceId).toBe(spaces[1]!.id);
    expect(iu4!.levelId).toBe(levels[1]!.id);
  });

  it('creates nothing when any row is bad: all or none', async () => {
    const s = await setUpJob();
    const res = await post(s.job.id, { csv: `${csv}\nIU-6,window unit,Level 3,Hall`, createPlaces: true });
    expect(res.status).toBe(200);
    expect(res.body.committed).toBe(false);
    expect(await Level.count({ where: { jobId: s.job.id } })).toBe(1);
    expect(await Space.count({ where: { jobId: s.job.id } })).toBe(1);
    expect(await Unit.count({ where: { jobId: s.job.id } })).toBe(0);
  });
});

describe('unit import: revised schedules, the record and undo', () => {
  const v1 = ['Tag,Kind,Capacity,Level,Room,System', 'IU-1,wall_mounted,9000 Btu/h,Level 1,Office 101,VRF-1', 'IU-2,wall_mounted,9000 Btu/h,Level 1,,', 'IU-3,cassette_4way,2 tons,Level 1,,VRF-1'].join('\n');
  const v2 = ['Tag,Kind,Capacity,Level,Room,System', 'IU-1,wall_mounted,12000 Btu/h,Level 1,Office 101,VRF-1', 'IU-3,cassette_4way,2 tons,Level 1,Office 101,', 'IU-4,floor_console,9000 Btu/h,Level 1,,'].join('\n');

  it('changes units matched by tag, adds new ones, lists untouched and missing ones, and deletes nothing unless asked', async () => {
    const s = await setUpJob();
    expect((await post(s.job.id, { csv: v1 })).status).toBe(201);
    const again = await post(s.job.id, { csv: v1, dryRun: true });
    expect(again.body.revision).toMatchObject({ added: 0, changed: [], untouched: 3, notInFile: [] });
    const preview = await post(s.job.id, { csv: v2, dryRun: true });
    expect(preview.status).toBe(200);
    expect(preview.body.errors).toEqual([]);
    expect(preview.body.preview.map((r: { tag: string; action: string }) => [r.tag, r.action])).toEqual([
      ['IU-1', 'change'],
      ['IU-3', 'change'],
      ['IU-4', 'add'],
    ]);
    const iu2 = await Unit.findOne({ where: { jobId: s.job.id, tag: 'IU-2' } });
    expect(preview.body.revision).toEqual({
      added: 1,
      changed: [
        { line: 2, tag: 'IU-1', fields: [{ field: 'capacity', from: expect.closeTo(0.75 * WATTS_PER_TON, 6), to: WATTS_PER_TON }] },
        {
          line: 3,
          tag: 'IU-3',
          fields: [
            { field: 'space', from: null, to: 'Office 101' },
            { field: 'system', from: 'VRF-1', to: null },
          ],
        },
      ],
      untouched: 0,
      notInFile: [{ id: iu2!.id, tag: 'IU-2', removable: true }],
      removed: 0,
    });
    const commit = await post(s.job.id, { csv: v2 });
    expect(commit.status).toBe(201);
    expect(commit.body).toMatchObject({ created: 1, revision: { added: 1, removed: 0 }, importId: expect.any(String) });
    expect(await tags(s.job.id)).toEqual(['IU-1', 'IU-2', 'IU-3', 'IU-4']);
    const iu3 = await Unit.findOne({ where: { jobId: s.job.id, tag: 'IU-3' } });
    expect([iu3!.spaceId, iu3!.systemId, iu3!.version]).toEqual([s.office.id, null, 2]);
  });

  it('removes units not in the file only when asked, never one with a finding', async () => {
    const w = await buildWalkJob(crew);
    // IU-3-01 has a finding; the file names none of the walk job's four units.
    await insertFinding(w, { unitId: w.cassette.id });
    const res = await post(w.job.id, { csv: 'Tag,Kind,Level\nIU-9,wall_mounted,Level 3\n', removeMissing: true, dryRun: true });
    expect(res.body.revision.notInFile).toEqual([
      { id: w.cassette.id, tag: 'IU-3-01', removable: false },
      { id: w.cassette2.id, tag: 'IU-3-02', removable: true },
      { id: w.wall.id, tag: 'IU-3-03', removable: true },
      { id: w.upstairs.id, tag: 'IU-4-01', removable: true },
    ]);
    expect(await tags(w.job.id)).toHaveLength(4);
    const commit = await post(w.job.id, { csv: 'Tag,Kind,Level\nIU-9,wall_mounted,Level 3\n', removeMissing: true });
    expect(commit.body.revision.removed).toBe(3);
    expect(await tags(w.job.id)).toEqual(['IU-3-01', 'IU-9']);
    // Undo puts the removed units back, with their own ids.
    const undo = await crew.gc.post(jobPath(w.job.id, `/units/imports/${commit.body.importId}/undo`), {});
    expect(undo.status).toBe(200);
    expect(await tags(w.job.id)).toEqual(['IU-3-01', 'IU-3-02', 'IU-3-03', 'IU-4-01']);
    expect((await Unit.findByPk(w.wall.id))!.tag).toBe('IU-3-03');
  });

  it('undoes the latest import: added units deleted, changed fields restored, created places removed', async () => {
    const s = await setUpJob();
    const first = await post(s.job.id, { csv: v1 });
    const before = (await Unit.findAll({ where: { jobId: s.job.id }, order: [['tag', 'ASC']] })).map((u) => [u.tag, u.capacity, u.spaceId, u.systemId]);
    const second = await post(s.job.id, { csv: `${v2}\nIU-5,wall_mounted,,Level 2,Hall,`, createPlaces: true, fileName: 'schedule rev B.csv' });
    expect(second.status).toBe(201);
    expect(await Level.count({ where: { jobId: s.job.id } })).toBe(2);

    const list = await crew.gc.get(jobPath(s.job.id, '/units/imports'));
    expect(list.status).toBe(200);
    expect(list.body.items).toEqual([
      expect.objectContaining({ id: second.body.importId, fileName: 'schedule rev B.csv', added: 2, changed: 2, levelsCreated: 1, spacesCreated: 1, undo: { possible: true } }),
      expect.objectContaining({ id: first.body.importId, added: 3, undo: { possible: false, reason: 'A later import changed IU-1 and IU-3 since: undo the later import first.' } }),
    ]);
    const older = await crew.gc.post(jobPath(s.job.id, `/units/imports/${first.body.importId}/undo`), {});
    expect(older.status).toBe(409);
    expect(older.body.error.id).toBe('import_not_latest');

    const undo = await crew.gc.post(jobPath(s.job.id, `/units/imports/${second.body.importId}/undo`), {});
    expect(undo.status).toBe(200);
    expect(undo.body).toEqual({ restored: 2, deleted: 2 });
    const after = (await Unit.findAll({ where: { jobId: s.job.id }, order: [['tag', 'ASC']] })).map((u) => [u.tag, u.capacity, u.spaceId, u.systemId]);
    expect(after).toEqual(before);
    expect(await Level.count({ where: { jobId: s.job.id } })).toBe(1);
    expect(await Space.count({ where: { jobId: s.job.id } })).toBe(1);
    // A restored unit has a new version, so a screen holding the import's version gets 412.
    const iu1 = await Unit.findOne({ where: { jobId: s.job.id, tag: 'IU-1' } });
    expect(iu1!.version).toBe(3);

    const twice = await crew.gc.post(jobPath(s.job.id, `/units/imports/${second.body.importId}/undo`), {});
    expect(twice.status).toBe(409);
    expect(twice.body.error).toMatchObject({ id: 'import_undone', message: 'This import was already undone.' });
    // The first import is the latest again.
    expect((await crew.gc.post(jobPath(s.job.id, `/units/imports/${first.body.importId}/undo`), {})).status).toBe(200);
    expect(await tags(s.job.id)).toEqual([]);
  });

  it('refuses the undo with 409 and the reason while a unit of the import has a finding, or was changed since', async () => {
    const w = await buildWalkJob(crew);
    const imported = await post(w.job.id, { csv: 'Tag,Kind,Level\nIU-3-01,wall_mounted,Level 3\nIU-9,wall_mounted,Level 3\n', kindValues: {} });
    // IU-3-01 changes from cassette to wall-mounted; the model no longer fits.
    expect(imported.status).toBe(200);
    expect(imported.body.errors[0]).toMatchObject({ line: 2, field: 'model' });
    const ok = await post(w.job.id, { csv: 'Tag,Kind,Level\nIU-3-02,cassette_4way,Level 4\nIU-9,wall_mounted,Level 3\n' });
    expect(ok.status).toBe(201);
    const iu9 = await Unit.findOne({ where: { jobId: w.job.id, tag: 'IU-9' } });
    await insertFinding(w, { unitId: iu9!.id });
    const refused = await crew.gc.post(jobPath(w.job.id, `/units/imports/${ok.body.importId}/undo`), {});
    expect(refused.status).toBe(409);
    expect(refused.body.error).toEqual({
      id: 'import_units_in_use',
      message: 'IU-9 has a unit check or a finding now: an import is undone only while none of its units has one.',
    });
    expect(await tags(w.job.id)).toContain('IU-9');

    const s = await setUpJob();
    const mine = await post(s.job.id, { csv: 'Tag,Kind,Level\nIU-1,wall_mounted,Level 1\n' });
    const unit = await Unit.findOne({ where: { jobId: s.job.id, tag: 'IU-1' } });
    expect((await crew.gc.patch(jobPath(s.job.id, `/units/${unit!.id}`), { capacity: '3 kW' }, ifMatch(1))).status).toBe(200);
    const edited = await crew.gc.post(jobPath(s.job.id, `/units/imports/${mine.body.importId}/undo`), {});
    expect(edited.status).toBe(409);
    expect(edited.body.error).toMatchObject({ id: 'import_units_changed', message: 'IU-1 was changed after the import: undoing it would lose that change.' });
  });

  it('answers 403 to an inspector and 404 for another job’s import', async () => {
    const s = await setUpJob();
    const mine = await post(s.job.id, { csv: 'Tag,Kind,Level\nIU-1,wall_mounted,Level 1\n' });
    expect((await crew.insp.post(jobPath(s.job.id, `/units/imports/${mine.body.importId}/undo`), {})).status).toBe(403);
    expect((await crew.insp.get(jobPath(s.job.id, '/units/imports'))).status).toBe(403);
    const other = await setUpJob();
    expect((await crew.gc.post(jobPath(other.job.id, `/units/imports/${mine.body.importId}/undo`), {})).status).toBe(404);
    expect((await crew.gc.post(jobPath(s.job.id, '/units/imports/nope/undo'), {})).status).toBe(400);
  });
});

describe('units: bulk delete', () => {
  it('deletes the chosen units all at once; any with a check or finding refuses the whole delete', async () => {
    const w = await buildWalkJob(crew);
    await insertFinding(w, { unitId: w.cassette.id });
    const refused = await crew.gc.post(jobPath(w.job.id, '/units/delete'), { unitIds: [w.cassette.id, w.wall.id] });
    expect(refused.status).toBe(409);
    expect(refused.body.error).toEqual({
      id: 'units_in_use',
      message: 'IU-3-01 has a unit check or a finding: those are kept as evidence, so nothing was deleted. Leave it out and delete the rest.',
    });
    expect(await tags(w.job.id)).toHaveLength(4);
    const done = await crew.gc.post(jobPath(w.job.id, '/units/delete'), { unitIds: [w.cassette2.id, w.wall.id] });
    expect(done.status).toBe(200);
    expect(done.body).toEqual({ deleted: 2 });
    expect(await tags(w.job.id)).toEqual(['IU-3-01', 'IU-4-01']);
  });

  it('answers 400, 403 and 404 as it should', async () => {
    const s = await setUpJob();
    const unit = await buildUnit(s.job.id, s.l1.id, { tag: 'IU-1' });
    const empty = await crew.gc.post(jobPath(s.job.id, '/units/delete'), { unitIds: [] });
    expect(empty.status).toBe(400);
    expect(empty.body.error.message).toBe('unitIds: Choose at least one unit.');
    expect((await crew.insp.post(jobPath(s.job.id, '/units/delete'), { unitIds: [unit.id] })).status).toBe(403);
    const other = await setUpJob();
    const foreign = await crew.gc.post(jobPath(other.job.id, '/units/delete'), { unitIds: [unit.id] });
    expect(foreign.status).toBe(404);
    expect(await Unit.count({ where: { id: unit.id } })).toBe(1);
    const counts = await db.sequelize.query<{ n: number }>(`SELECT count(*)::int AS n FROM units WHERE job_id = $1`, { bind: [s.job.id], type: QueryTypes.SELECT });
    expect(counts[0]!.n).toBe(1);
  });
});
