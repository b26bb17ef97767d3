/**
 * POST /spaces/import: a room schedule's preview writes nothing; apply creates the levels and
 * spaces and changes the areas and heights exactly as previewed, all or none.
 */
import { QueryTypes } from 'sequelize';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import type { SpaceImportReport } from '../../../shared/schemas/setup';
import { jobPath, newJobFor, signInCrew, type SignedCrew } from '../../support/api';
import { buildTestApp } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { KG_PER_POUND } from '../../../shared/calc/quantity';
import { buildJob, buildLevel, buildSpace, buildSystem, buildUnit } from '../../support/factories';
import { Space } from '../../../server/models';

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

interface Row {
  level: string;
  position: number;
  space: string | null;
  floor_area: number | null;
  ceiling_height: number | null;
  version: number | null;
}

/** Every level of the job with its spaces, straight from the tables. */
async function tables(jobId: string): Promise<Row[]> {
  return db.sequelize.query<Row>(
    `SELECT l.name AS level, l.position, s.name AS space, s.floor_area, s.ceiling_height, s.version
       FROM levels l LEFT JOIN spaces s ON s.level_id = l.id
      WHERE l.job_id = $1 ORDER BY l.position, s.name`,
    { bind: [jobId], type: QueryTypes.SELECT },
  );
}

/** A job with Level 1 (Lobby 50 m², 2700 mm; Exam 101 with no sizes) and an empty Level 2. */
async function jobWithRooms() {
  const job = await newJobFor(crew);
  const l1 = await buildLevel(job.id, { name: 'Level 1' });
  await buildLevel(job.id, { name: 'Level 2' });
  await buildSpace(job.id, l1.id, { name: 'Lobby', floorArea: 50, ceilingHeight: 2700 });
  await buildSpace(job.id, l1.id, { name: 'Exam 101', floorArea: null, ceilingHeight: null });
  return job;
}

const schedule = [
  { level: 'level 1', space: ' lobby ', area: '50 m²', height: '3000 mm', line: 2 },
  { level: 'Level 1', space: 'Exam 101', area: '120 sq ft', line: 3 },
  { level: 'Level 1', space: 'Exam 102', area: '11.2 m2', height: "9' 0\"", line: 4 },
  { level: 'Level 3', space: 'Mech 301', line: 5 },
  { level: 'LEVEL 3', space: 'Office 302', height: '2.7 m', line: 6 },
  { level: 'Roof', space: 'Plant', area: '40 m2', line: 7 },
];

const url = (jobId: string) => jobPath(jobId, '/spaces/import');

/** The SQL statements `work` sends through the app's Sequelize (BEGIN and COMMIT included). */
async function statementsOf(work: () => Promise<unknown>): Promise<string[]> {
  const sent: string[] = [];
  db.sequelize.addHook('afterQuery', 'count-statements', (_options, query) => {
    // The query object holds the statement sent; Sequelize's types leave `sql` out.
    sent.push((query as unknown as { sql: string }).sql);
  });
  try {
    await work();
  } finally {
    db.sequelize.removeHook('afterQuery', 'count-statements');
  }
  return sent;
}

/** The job's figure-cache version of the 'structure' topic (0 when never raised). */
async function structureVersion(jobId: string): Promise<number> {
  const rows = await db.sequelize.query<{ version: string }>(`SELECT version FROM job_stat_versions WHERE job_id = $1 AND topic = 'structure'`, {
    bind: [jobId],
    type: QueryTypes.SELECT,
  });
  return Number(rows[0]?.version ?? 0);
}

/**
 * A job whose Level 1 holds `rooms` spaces of 10 m² and 2700 mm, and the file that changes every
 * one of their areas and adds `newLevels` levels of one room each.
 */
async function bigImport(rooms: number, newLevels: number) {
  const job = await newJobFor(crew);
  const level = await buildLevel(job.id, { name: 'Level 1' });
  await Space.bulkCreate(Array.from({ length: rooms }, (_, i) => ({ jobId: job.id, levelId: level.id, name: `Room ${i + 1}`, floorArea: 10, ceilingHeight: 2700 })));
  const rows = [
    ...Array.from({ length: rooms }, (_, i) => ({ level: 'Level 1', space: `room ${i + 1}`, area: `${12 + i / 100} m2`, line: i + 2 })),
    ...Array.from({ length: newLevels }, (_, i) => ({ level: `Level ${i + 2}`, space: `Core ${i + 2}`, height: '3000 mm', line: rooms + i + 2 })),
  ];
  return { job, rows };
}

describe('POST /spaces/import', () => {
  it('previews new levels, new spaces, changes and unchanged, and writes nothing', async () => {
    const job = await jobWithRooms();
    const before = await tables(job.id);
    const res = await crew.gc.post(url(job.id), { rows: schedule, apply: false });
    expect(res.status).toBe(200);
    const report = res.body as SpaceImportReport;
    expect(report.applied).toBe(false);
    expect(report.newLevels).toEqual(['Level 3', 'Roof']);
    expect(report.created.map((c) => [c.line, c.level, c.space, c.newLevel])).toEqual([
      [4, 'Level 1', 'Exam 102', false],
      [5, 'Level 3', 'Mech 301', true],
      [6, 'Level 3', 'Office 302', true],
      [7, 'Roof', 'Plant', true],
    ]);
    expect(report.created[0]!.floorArea).toBeCloseTo(11.2, 9);
    expect(report.created[0]!.ceilingHeight).toBeCloseTo(2743.2, 6);
    expect(report.created[1]).toMatchObject({ floorArea: null, ceilingHeight: null });
    // Lobby: the area is the same (not a change), the height is.
    expect(report.changed.map((c) => [c.space, c.floorArea ?? null, c.ceilingHeight ?? null])).toEqual([
      ['Lobby', null, { from: 2700, to: 3000 }],
      ['Exam 101', { from: null, to: expect.closeTo(11.1483648, 9) }, null],
    ]);
    expect(report.unchanged).toEqual([]);
    expect(report.problems).toEqual([]);
    expect(await tables(job.id)).toEqual(before);
  });

  it('applies exactly what it previewed: levels appended in file order, spaces created, only the given values changed', async () => {
    const job = await jobWithRooms();
    const checklist = await crew.gc.get(jobPath(job.id, '/setup/checklist'));
    expect(checklist.body.lines.find((l: { key: string }) => l.key === 'levels_without_spaces')?.count).toBe(1);

    const res = await crew.gc.post(url(job.id), { rows: schedule, apply: true });
    expect(res.status).toBe(200);
    expect(res.body.applied).toBe(true);
    const rows = await tables(job.id);
    expect(rows.map((r) => [r.level, r.position, r.space, r.floor_area === null ? null : Number(r.floor_area.toFixed(4)), r.ceiling_height, r.version])).toEqual([
      ['Level 1', 1, 'Exam 101', 11.1484, null, 2],
      ['Level 1', 1, 'Exam 102', 11.2, 2743.2, 1],
      ['Level 1', 1, 'Lobby', 50, 3000, 2],
      ['Level 2', 2, null, null, null, null],
      ['Level 3', 3, 'Mech 301', null, null, 1],
      ['Level 3', 3, 'Office 302', null, 2700, 1],
      ['Roof', 4, 'Plant', 40, null, 1],
    ]);
    // The setup checklist reads the spaces table: Level 2 is still without spaces, the new levels are not.
    const after = await crew.gc.get(jobPath(job.id, '/setup/checklist'));
    expect(after.body.lines.find((l: { key: string }) => l.key === 'levels_without_spaces')?.count).toBe(1);

    // The same file again: nothing left to do.
    const again = await crew.gc.post(url(job.id), { rows: schedule, apply: false });
    expect(again.body.newLevels).toEqual([]);
    expect(again.body.created).toEqual([]);
    expect(again.body.changed).toEqual([]);
    expect(again.body.unchanged).toHaveLength(schedule.length);
  });

  it("the refrigerant check reads the imported sizes at once: a 10×10×8 ft office that failed passes at 400 sq ft × 9 ft", async () => {
    const job = await newJobFor(crew);
    const level = await buildLevel(job.id, { name: 'Level 3' });
    const office = await buildSpace(job.id, level.id, { name: 'Office 3-12', floorArea: 100 * 0.09290304, ceilingHeight: 8 * 304.8 });
    const system = await buildSystem(job.id, { name: 'VRF-3', factoryCharge: 30 * KG_PER_POUND, fieldCharge: 8 * KG_PER_POUND });
    await buildUnit(job.id, level.id, { spaceId: office.id, systemId: system.id, kind: 'wall_mounted' });
    const before = await crew.gc.get(jobPath(job.id, `/systems/${system.id}`));
    expect(before.body.concentration).toMatchObject({ status: 'fail' });
    const res = await crew.gc.post(url(job.id), { rows: [{ level: 'level 3', space: 'OFFICE 3-12', area: '400 sq ft', height: "9'" }], apply: true });
    expect(res.status).toBe(200);
    const after = await crew.gc.get(jobPath(job.id, `/systems/${system.id}`));
    // 3,600 ft³ × 26 lb/1000 ft³ = 93.6 lb allowed; 38 lb charged.
    expect(after.body.concentration).toMatchObject({ status: 'pass', pass: true });
    expect(after.body.concentration.governing.allowedCharge).toBeCloseTo(93.6 * KG_PER_POUND, 6);
  });

  it('lists every line problem in the preview; apply with one bad line writes nothing and names the lines', async () => {
    const job = await jobWithRooms();
    const before = await tables(job.id);
    const rows = [
      { level: 'Level 9', space: 'Office 901', area: '20 m2', line: 2 },
      { level: 'Level 1', space: 'Exam 103', area: '12.5', line: 3 },
      { level: '', space: 'Nowhere', line: 4 },
      { level: 'Level 1', space: 'exam 103 ', height: 'tall', line: 5 },
      { level: 'Level 1', space: 'Exam 104', area: '0 m2' },
    ];
    const preview = await crew.gc.post(url(job.id), { rows, apply: false });
    expect(preview.status).toBe(200);
    expect(preview.body.problems.map((p: { field: string; line: number | null }) => [p.field, p.line])).toEqual([
      ['rows.1.area', 3],
      ['rows.2.level', 4],
      ['rows.3.height', 5],
      ['rows.3.space', 5],
      ['rows.4.area', null],
    ]);
    expect(preview.body.problems[3].message).toBe('"exam 103" on Level 1 is also on line 3.');
    expect(preview.body.problems[0].message).toContain('bare number');
    expect(preview.body.created.map((c: { space: string }) => c.space)).toEqual(['Office 901']);

    const applied = await crew.gc.post(url(job.id), { rows, apply: true });
    expect(applied.status).toBe(400);
    expect(applied.body.error.message).toMatch(/^4 lines have problems: nothing was imported\. Line 3: /);
    expect(Object.keys(applied.body.error.fields)).toEqual(['rows.1.area', 'rows.2.level', 'rows.3.height', 'rows.3.space', 'rows.4.area']);
    expect(await tables(job.id)).toEqual(before);
  });

  it('refuses a malformed body with field errors: no rows, too many, unknown keys', async () => {
    const job = await jobWithRooms();
    const empty = await crew.gc.post(url(job.id), { rows: [], apply: true });
    expect(empty.status).toBe(400);
    expect(empty.body.error.fields).toEqual({ rows: 'The file has no rooms.' });
    const many = Array.from({ length: 2001 }, (_, i) => ({ level: 'Level 1', space: `Room ${i}`, area: '10 m2' }));
    const tooMany = await crew.gc.post(url(job.id), { rows: many, apply: false });
    expect(tooMany.status).toBe(400);
    expect(tooMany.body.error.fields.rows).toMatch(/At most 2,000 rooms/);
    const extra = await crew.gc.post(url(job.id), { rows: [{ level: 'Level 1', space: 'A', occupancy: 'general' }], apply: false });
    expect(extra.status).toBe(400);
    const noApply = await crew.gc.post(url(job.id), { rows: [{ level: 'Level 1', space: 'A' }] });
    expect(noApply.status).toBe(400);
    expect(Object.keys(noApply.body.error.fields)).toEqual(['apply']);
  });

  it('takes 2,000 rooms in one request (larger than the API-wide 100 kB)', async () => {
    const job = await newJobFor(crew);
    const rows = Array.from({ length: 2000 }, (_, i) => ({ level: `Level ${1 + (i % 10)}`, space: `Room ${i} with a rather long descriptive name`, area: '10.5 m2', height: '2700 mm', line: i + 2 }));
    expect(JSON.stringify({ rows }).length).toBeGreaterThan(100 * 1024);
    const res = await crew.gc.post(url(job.id), { rows, apply: true });
    expect(res.status).toBe(200);
    const [{ n }] = await db.sequelize.query<{ n: string }>(`SELECT count(*) AS n FROM spaces WHERE job_id = $1`, { bind: [job.id], type: QueryTypes.SELECT });
    expect(Number(n)).toBe(2000);
  });

  it('is for the GC manager of the job: 403 inspector and subcontractor, 404 another job, nothing written', async () => {
    const job = await jobWithRooms();
    const before = await tables(job.id);
    const body = { rows: schedule, apply: true };
    expect((await crew.insp.post(url(job.id), body)).status).toBe(403);
    expect((await crew.sub.post(url(job.id), body)).status).toBe(403);
    // A job the GC manager is not on, with a level the file names.
    const other = await buildJob({ ownerCompanyId: crew.gcCompany.id });
    await buildLevel(other.id, { name: 'Level 1' });
    const otherBefore = await tables(other.id);
    const foreign = await crew.gc.post(url(other.id), body);
    expect(foreign.status).toBe(404);
    expect(await tables(job.id)).toEqual(before);
    expect(await tables(other.id)).toEqual(otherBefore);
  });

  it('replays the same Idempotency-Key: one write, the stored answer; another body with it is refused', async () => {
    const job = await jobWithRooms();
    const key = { 'Idempotency-Key': `space-import-${job.id}` };
    const first = await crew.gc.post(url(job.id), { rows: schedule, apply: true }, key);
    expect(first.status).toBe(200);
    const after = await tables(job.id);
    const again = await crew.gc.post(url(job.id), { rows: schedule, apply: true }, key);
    expect(again.status).toBe(200);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(again.body).toEqual(first.body);
    expect(await tables(job.id)).toEqual(after);
    expect((await crew.gc.post(url(job.id), { rows: schedule.slice(1), apply: true }, key)).status).toBe(422);
  });

  it('applies 500 changed rooms and 20 new levels in as many statements as 5 rooms and 2 levels, all of them written', async () => {
    const small = await bigImport(5, 2);
    const smallSent = await statementsOf(async () => expect((await crew.gc.post(url(small.job.id), { rows: small.rows, apply: true })).status).toBe(200));
    const big = await bigImport(500, 20);
    const structureBefore = await structureVersion(big.job.id);
    const startedAt = new Date();
    let report: SpaceImportReport | undefined;
    const bigSent = await statementsOf(async () => {
      const res = await crew.gc.post(url(big.job.id), { rows: big.rows, apply: true });
      expect(res.status).toBe(200);
      report = res.body as SpaceImportReport;
    });
    expect(bigSent.length).toBe(smallSent.length);
    expect(bigSent.length).toBeLessThanOrEqual(12); // 9 when measured: sign-in check, BEGIN, job lock, 2 reads, 3 writes, COMMIT
    expect(report!.changed).toHaveLength(500);
    expect(report!.newLevels).toHaveLength(20);
    expect(report!.created).toHaveLength(20);

    const spaces = await db.sequelize.query<{ level: string; position: number; name: string; floor_area: number; ceiling_height: number; version: number; updated_at: Date }>(
      `SELECT l.name AS level, l.position, s.name, s.floor_area, s.ceiling_height, s.version, s.updated_at
         FROM spaces s JOIN levels l ON l.id = s.level_id WHERE s.job_id = $1 ORDER BY l.position, s.created_at, s.name`,
      { bind: [big.job.id], type: QueryTypes.SELECT },
    );
    const changed = spaces.filter((s) => s.level === 'Level 1');
    expect(changed).toHaveLength(500);
    for (const s of changed) {
      const i = Number(s.name.slice('Room '.length)) - 1;
      expect(s.floor_area).toBeCloseTo(12 + i / 100, 9);
      expect(s.ceiling_height).toBe(2700); // not in the file: kept
      expect(s.version).toBe(2);
      expect(s.updated_at.getTime()).toBeGreaterThanOrEqual(startedAt.getTime() - 1000);
    }
    // New levels after Level 1 in file order, one room each.
    expect(spaces.filter((s) => s.level !== 'Level 1').map((s) => [s.level, s.position, s.name, s.floor_area, s.ceiling_height, s.version])).toEqual(
      Array.from({ length: 20 }, (_, i) => [`Level ${i + 2}`, i + 2, `Core ${i + 2}`, null, 3000, 1]),
    );
    // The figure cache learns of the new levels: the structure topic is raised once, at commit.
    expect(await structureVersion(big.job.id)).toBe(structureBefore + 1);

    // The same file again: nothing left to change, and no statement writes.
    const again = await statementsOf(async () => {
      const res = await crew.gc.post(url(big.job.id), { rows: big.rows, apply: true });
      expect(res.status).toBe(200);
      expect(res.body.unchanged).toHaveLength(520);
    });
    expect(again.filter((q) => /^\s*(INSERT|UPDATE|DELETE)/i.test(q))).toEqual([]);
  });
});
