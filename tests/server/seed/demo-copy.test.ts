/**
 * Demo seed: the second building, a copy of the main job in set-up with its checklist partly done
 * (its levels and spaces are there; four units entered on its lowest level, on no system yet), once.
 */
import type { Database } from '../../../server/db';
import { Job, JobMember, Level, Space, System, Unit } from '../../../server/models';
import { seedDemo } from '../../../server/seed/demo';
import { DEMO_COPY } from '../../../server/seed/demoCopy';
import { demoLevels } from '../../../server/seed/demoSetup';
import { loadSetupChecklist } from '../../../server/services/setupChecklist';
import { connectTestDb } from '../../support/db';

jest.setTimeout(120_000);

let db: Database;
beforeAll(async () => {
  db = await connectTestDb();
});
afterAll(async () => {
  await db.close();
});

it('copies the main job once, as a job in set-up whose checklist names what is left', async () => {
  await seedDemo(db);
  await seedDemo(db);
  const copies = await Job.findAll({ where: { name: DEMO_COPY.name } });
  expect(copies).toHaveLength(1);
  const copy = copies[0]!;
  const main = (await Job.findOne({ where: { name: 'Cinder Lane Commons' } }))!;
  // The seed's own levels are all there (other tests may add levels of their own to the main job).
  const levels = (await Level.findAll({ where: { jobId: copy.id } })).map((l) => l.name);
  expect(levels).toEqual(expect.arrayContaining(demoLevels().map((l) => l.name)));
  expect(await Space.count({ where: { jobId: copy.id } })).toBeGreaterThan(0);
  // Work and people are not copied: the GC manager alone, no systems, the four units entered since.
  expect((await JobMember.findAll({ where: { jobId: copy.id } })).map((m) => m.role)).toEqual(['gc_manager']);
  expect(await System.count({ where: { jobId: copy.id } })).toBe(0);
  const units = await Unit.findAll({ where: { jobId: copy.id }, order: [['tag', 'ASC']] });
  expect(units.map((u) => u.tag)).toEqual(['N-1-01', 'N-1-02', 'N-1-03', 'N-1-04']);
  expect(units.every((u) => u.systemId === null && u.spaceId !== null)).toBe(true);
  // Its checklist is partly done: units on no system are left; levels and units are there.
  const checklist = await loadSetupChecklist(db.sequelize, copy.id);
  const keys = checklist.lines.map((l) => l.key);
  expect(checklist.complete).toBe(false);
  expect(keys).toContain('units_without_system');
  expect(keys).not.toContain('no_levels');
  expect(keys).not.toContain('no_units');
  expect(copy.timeZone).toBe(main.timeZone);
});
