import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { UnitModel } from '../../../server/models';
import { ifMatch, jobPath, newJobFor, signInCrew, type SignedCrew } from '../../support/api';
import { buildTestApp } from '../../support/app';
import { connectTestDb } from '../../support/db';
import { buildJobWithCrew, buildLevel, buildUnit, buildUnitModel } from '../../support/factories';

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

describe('unit models', () => {
  it('answers 401 signed out', async () => {
    const job = await newJobFor(crew);
    await request(trimout.app).get(jobPath(job.id, '/models')).expect(401);
  });

  it('creates a model with per-model limits typed with their units, stored in base units with the source', async () => {
    const job = await newJobFor(crew);
    const res = await crew.gc.post(jobPath(job.id, '/models'), {
      name: 'Ducted 36 low static',
      modelNumber: 'DL-36',
      unitKind: 'ducted_low',
      nominalCapacity: '36000 Btu/h',
      limits: {
        // Invented round figures for an invented model; the source says so (no real product's rating).
        max_pump_lift: { value: '27-1/2 in', source: 'Invented demo model DL-36, manual p. 9' },
        max_drain_horizontal_run: { value: '10 in', source: 'Invented demo model DL-36, manual p. 9' },
        min_clearance_top: { value: `1' 2"`, unit: 'in', source: 'Installation manual p. 5' },
        max_sensor_angle: { value: '45°', source: 'Installation manual p. 12' },
      },
    });
    expect(res.status).toBe(201);
    expect(res.headers.etag).toBe('"v1"');
    expect(res.body.limits.max_pump_lift).toEqual({
      value: 698.5, // 27.5 × 25.4 mm exactly
      stated: 27.5,
      unit: 'in',
      text: '27-1/2 in',
      source: 'Invented demo model DL-36, manual p. 9',
    });
    expect(res.body.limits.max_drain_horizontal_run.value).toBeCloseTo(254, 9); // 10 × 25.4 mm
    expect(res.body.limits.min_clearance_top).toMatchObject({ value: 355.6, stated: 14, unit: 'in' });
    expect(res.body.limits.max_sensor_angle).toMatchObject({ value: 45, unit: '°' });
    expect(res.body.nominalCapacity).toBeCloseTo(10550.5585262, 6);
  });

  it('takes a level tolerance stated as a tilt across a width, converted to the height difference it allows', async () => {
    const job = await newJobFor(crew);
    const res = await crew.gc.post(jobPath(job.id, '/models'), {
      name: 'Wall 12',
      unitKind: 'wall_mounted',
      limits: { max_level_deviation: { value: '1° across 840 mm', source: 'Invented demo manual, 1st edition, p. 4' } },
    });
    expect(res.status).toBe(201);
    // 840 mm × tan(1°); tan(1°) = 0.017455064928217585 (mathjs 64-digit BigNumber, rounded to double).
    expect(res.body.limits.max_level_deviation).toMatchObject({ unit: 'mm', text: '1° across 840 mm' });
    expect(res.body.limits.max_level_deviation.value).toBeCloseTo(840 * 0.017455064928217585, 9);
    const refused = await crew.gc.post(jobPath(job.id, '/models'), {
      name: 'Wall 18',
      unitKind: 'wall_mounted',
      limits: { max_level_deviation: { value: '1°', source: 'p. 4' } },
    });
    expect(refused.status).toBe(400);
    expect(refused.body.error.fields['limits.max_level_deviation.value']).toMatch(/needs the width it applies across, e\.g\. "1° across 840 mm"/);
  });

  it.each([
    [{ limits: { max_pump_lift: { value: '30 lb', source: 'p. 3' } } }, /^limits\.max_pump_lift\.value: Unknown unit "lb"|^limits\.max_pump_lift\.value: /],
    [{ limits: { max_pump_lift: { value: '30 in' } } }, /^limits\.max_pump_lift\.source: /],
    [{ limits: { max_fan_speed: { value: '3 in', source: 'x' } } }, /Leave out max_fan_speed/],
    [{ unitKind: 'window' }, /^unitKind: Choose a unit kind\./],
  ])('answers 400 with a message for %j', async (change, message) => {
    const job = await newJobFor(crew);
    const res = await crew.gc.post(jobPath(job.id, '/models'), { name: 'M', unitKind: 'wall_mounted', ...change });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(message);
  });

  it('merges limits on PATCH (null removes one), with If-Match', async () => {
    const job = await newJobFor(crew);
    const created = await crew.gc.post(jobPath(job.id, '/models'), {
      name: 'Cassette 24',
      unitKind: 'cassette_4way',
      limits: {
        max_pump_lift: { value: '30 in', source: 'p. 7' },
        min_clearance_side: { value: '12 in', source: 'p. 4' },
      },
    });
    const path = jobPath(job.id, `/models/${created.body.id}`);
    expect((await crew.gc.patch(path, { name: 'Cassette 24b' })).status).toBe(428);
    expect((await crew.gc.patch(path, { name: 'Cassette 24b' }, ifMatch(5))).status).toBe(412);
    const res = await crew.gc.patch(
      path,
      { limits: { min_clearance_side: null, min_clearance_below: { value: '2500 mm', source: 'p. 4' } } },
      ifMatch(1),
    );
    expect(res.status).toBe(200);
    expect(Object.keys(res.body.limits).sort()).toEqual(['max_pump_lift', 'min_clearance_below']);
    expect(res.body.limits.min_clearance_below).toMatchObject({ value: 2500, stated: 2500, unit: 'mm' });
    expect(res.headers.etag).toBe('"v2"');
  });

  it('lists by unit kind for every role, and reads one', async () => {
    const job = await newJobFor(crew);
    const m = await buildUnitModel(job.id, { name: 'Wall 09', unitKind: 'wall_mounted' });
    await buildUnitModel(job.id, { name: 'Cassette 18', unitKind: 'cassette_4way' });
    for (const who of [crew.gc, crew.insp, crew.sub]) {
      const res = await who.get(jobPath(job.id, '/models?unitKind=wall_mounted'));
      expect(res.status).toBe(200);
      expect(res.body.items.map((x: { name: string }) => x.name)).toEqual(['Wall 09']);
      expect((await who.get(jobPath(job.id, `/models/${m.id}`))).status).toBe(200);
    }
  });

  it('refuses to delete a model units use (409), and a kind change that units of another kind would break', async () => {
    const job = await newJobFor(crew);
    const level = await buildLevel(job.id);
    const model = await buildUnitModel(job.id, { name: 'Console 12', unitKind: 'floor_console' });
    await buildUnit(job.id, level.id, { kind: 'floor_console', modelId: model.id });
    const refused = await crew.gc.del(jobPath(job.id, `/models/${model.id}`), ifMatch(1));
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toBe('Model Console 12 still has 1 unit. Change those units to another model (or none) first.');
    const kind = await crew.gc.patch(jobPath(job.id, `/models/${model.id}`), { unitKind: 'wall_mounted' }, ifMatch(1));
    expect(kind.status).toBe(400);
    const free = await buildUnitModel(job.id);
    expect((await crew.gc.del(jobPath(job.id, `/models/${free.id}`), ifMatch(1))).status).toBe(204);
  });

  it('refuses a duplicate name with 409', async () => {
    const job = await newJobFor(crew);
    await buildUnitModel(job.id, { name: 'Wall 12' });
    const res = await crew.gc.post(jobPath(job.id, '/models'), { name: 'WALL 12', unitKind: 'wall_mounted' });
    expect(res.status).toBe(409);
  });

  it.each(['insp', 'sub'] as const)('refuses model writes to the %s (403)', async (who) => {
    const job = await newJobFor(crew);
    const model = await buildUnitModel(job.id);
    expect((await crew[who].post(jobPath(job.id, '/models'), { name: 'X', unitKind: 'wall_mounted' })).status).toBe(403);
    expect((await crew[who].patch(jobPath(job.id, `/models/${model.id}`), { name: 'X' }, ifMatch(1))).status).toBe(403);
    expect((await crew[who].del(jobPath(job.id, `/models/${model.id}`), ifMatch(1))).status).toBe(403);
    expect(await UnitModel.count({ where: { jobId: job.id } })).toBe(1);
  });

  it("answers 404 for another job's models", async () => {
    const other = await buildJobWithCrew();
    const model = await buildUnitModel(other.job.id);
    expect((await crew.gc.get(jobPath(other.job.id, '/models'))).status).toBe(404);
    const mine = await newJobFor(crew);
    expect((await crew.gc.get(jobPath(mine.id, `/models/${model.id}`))).status).toBe(404);
  });

  it('replays a create with the same Idempotency-Key', async () => {
    const job = await newJobFor(crew);
    const key = { 'Idempotency-Key': `model-${job.id}` };
    const body = { name: 'Wall 18', unitKind: 'wall_mounted' };
    await crew.gc.post(jobPath(job.id, '/models'), body, key);
    const again = await crew.gc.post(jobPath(job.id, '/models'), body, key);
    expect(again.status).toBe(201);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(await UnitModel.count({ where: { jobId: job.id } })).toBe(1);
    expect((await crew.gc.post(jobPath(job.id, '/models'), { ...body, name: 'Wall 24' }, key)).status).toBe(422);
  });
});
