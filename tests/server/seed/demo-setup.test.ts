/**
 * The demo seed's job set-up: idempotent, the numbers the product brief names, and exactly one
 * system (VRF-3, via the 10 × 10 × 8 ft Office 3-12) failing the concentration check.
 */
import type { Database } from '../../../server/db';
import { CatalogueItem, Job, JobCompany, Level, Space, System, Unit, UnitModel } from '../../../server/models';
import { DEMO_PASSWORD, seedDemo } from '../../../server/seed/demo';
import { DEMO_MODELS } from '../../../server/seed/demoSetup';
import { systemDetail } from '../../../server/services/refrigerantChecks';
import { BUILTIN_CATALOGUE } from '../../../shared/catalogue';
import { UNIT_KIND_KEYS } from '../../../shared/words';
import { connectTestDb } from '../../support/db';

jest.setTimeout(120_000);

let db: Database;
beforeAll(async () => {
  db = await connectTestDb();
});
afterAll(async () => {
  await db.close();
});

describe('demo seed: job set-up', () => {
  it('builds Cinder Lane Commons once, and changes nothing when run again', async () => {
    expect(DEMO_PASSWORD).toBeTruthy();
    await seedDemo(db);
    const job = (await Job.findOne({ where: { name: 'Cinder Lane Commons' } }))!;
    const counts = async () => ({
      levels: await Level.count({ where: { jobId: job.id } }),
      spaces: await Space.count({ where: { jobId: job.id } }),
      systems: await System.count({ where: { jobId: job.id } }),
      models: await UnitModel.count({ where: { jobId: job.id } }),
      units: await Unit.count({ where: { jobId: job.id } }),
      companies: await JobCompany.count({ where: { jobId: job.id } }),
      catalogue: await CatalogueItem.count({ where: { jobId: job.id } }),
    });
    const before = await counts();
    const again = await seedDemo(db);
    expect(again.created).toBe(false);
    expect(await counts()).toEqual(before);
    // Tests of other files may add levels and units of their own to the demo job; the seed's own are at least these.
    expect(before.systems).toBeGreaterThanOrEqual(8);
    expect(before.catalogue).toBeGreaterThanOrEqual(BUILTIN_CATALOGUE.length);
    expect(before.companies).toBe(5);
    const levels = await Level.findAll({ where: { jobId: job.id }, order: [['position', 'ASC']] });
    expect(levels.slice(0, 7).map((l) => l.name)).toEqual(['Level 1', 'Level 2', 'Level 3', 'Level 4', 'Level 5', 'Level 6', 'Roof']);
    const seeded = await Unit.findAll({ where: { jobId: job.id } });
    const demoUnits = seeded.filter((u) => /^IU-L\d-\d\d$/.test(u.tag));
    expect(demoUnits.length).toBeGreaterThanOrEqual(110);
    expect(demoUnits.length).toBeLessThanOrEqual(130);
    expect(new Set(demoUnits.map((u) => u.kind))).toEqual(new Set(UNIT_KIND_KEYS));
  });

  it('has one R-410A system failing the concentration check (VRF-3, Office 3-12); the others pass; R-32 meets its A2L floor areas', async () => {
    await seedDemo(db);
    const job = (await Job.findOne({ where: { name: 'Cinder Lane Commons' } }))!;
    const systems = await System.findAll({ where: { jobId: job.id, name: ['VRF-1', 'VRF-2', 'VRF-3', 'VRF-4', 'VRF-5', 'VRF-6', 'VRF-7', 'VRF-8'] } });
    const results = new Map<string, Awaited<ReturnType<typeof systemDetail>>>();
    for (const s of systems) results.set(s.name, await systemDetail(job, s));
    const statuses = [...results.entries()].map(([name, r]) => [name, r.concentration.status]).sort();
    expect(statuses).toEqual([
      ['VRF-1', 'pass'],
      ['VRF-2', 'pass'],
      ['VRF-3', 'fail'],
      ['VRF-4', 'pass'],
      ['VRF-5', 'pass'],
      ['VRF-6', 'pass'],
      ['VRF-7', 'pass'],
      ['VRF-8', 'pass'],
    ]);
    expect(results.get('VRF-3')!.concentration.governing!.names).toEqual(['Office 3-12']);
    const r32 = results.get('VRF-8')!;
    expect(r32.refrigerant).toBe('R-32');
    expect(r32.a2lFloorArea.length).toBeGreaterThan(0);
    expect(r32.a2lFloorArea.every((row) => row.result.status === 'pass')).toBe(true);
  });

  it('gives every demo model a value for each model limit its kind\'s checks read, so a demo walk shows limits', async () => {
    await seedDemo(db);
    const job = (await Job.findOne({ where: { name: 'Cinder Lane Commons' } }))!;
    // The seed's own models only: other tests share this database and add models of their own (no limits) to the demo job.
    const models = await UnitModel.findAll({ where: { jobId: job.id, modelNumber: DEMO_MODELS.map((m) => m.modelNumber) } });
    expect(models).toHaveLength(DEMO_MODELS.length);
    const missing: string[] = [];
    for (const model of models) {
      for (const item of BUILTIN_CATALOGUE.filter((i) => i.unitKinds.includes(model.unitKind))) {
        for (const ref of [item.measuredRule?.limit, item.measuredRule?.upper]) {
          if (ref?.from !== 'model') continue;
          const limit = model.limits[ref.key];
          if (!limit) missing.push(`${model.modelNumber} ${ref.key} (${item.code})`);
          else expect(limit.source).toMatch(/^Invented demo model /);
        }
      }
    }
    expect(missing).toEqual([]);
    // The ducted kinds differ in their rated external static pressure range (invented round figures, in. w.c.;
    // 1 in. w.c. = 249.08891 Pa, the conventional inch of water).
    const range = async (modelNumber: string) => {
      const m = (await UnitModel.findOne({ where: { jobId: job.id, modelNumber } }))!;
      return [m.limits.min_external_static!.stated, m.limits.max_external_static!.stated, m.limits.max_external_static!.unit];
    };
    expect(await range('DL-24')).toEqual([0.1, 0.4, 'in. w.c.']);
    expect(await range('DH-36')).toEqual([0.2, 0.8, 'in. w.c.']);
    expect(await range('DV-48')).toEqual([0.4, 1.2, 'in. w.c.']);
  });

  it('gives the unit models invented round limits with a source that says they are invented', async () => {
    await seedDemo(db);
    const job = (await Job.findOne({ where: { name: 'Cinder Lane Commons' } }))!;
    const ducted = (await UnitModel.findOne({ where: { jobId: job.id, modelNumber: 'DL-24' } }))!;
    // Invented demo figures (no real product's rating): 24 in lift, 10 in horizontal run, 6 ft kit pipe.
    expect(ducted.limits.max_pump_lift).toMatchObject({ value: 609.6, stated: 24, unit: 'in' });
    expect(ducted.limits.max_drain_horizontal_run).toMatchObject({ value: 254, stated: 10, unit: 'in' });
    expect(ducted.limits.max_pump_lift!.source).toMatch(/^Invented demo model DL-24, invented installation manual p\. 4: not a real product's rating/);
    const kit = (await UnitModel.findOne({ where: { jobId: job.id, modelNumber: 'AK-60' } }))!;
    expect(kit.limits.max_valve_kit_pipe_length).toMatchObject({ value: 1828.8, stated: 6, unit: 'ft' });
    expect(kit.limits.max_valve_kit_pipe_length!.source).toMatch(/^Invented demo model AK-60/);
    // The coil kit's air handler stands on the floor (release height 0.6 m, IEC 60335-2-40 Annex GG);
    // the ducted models hang above the ceiling. Cassettes and wall units follow from their kind.
    expect(kit.mountPosition).toBe('floor');
    expect(ducted.mountPosition).toBe('ceiling');
  });
});
