/**
 * Demo seed: the mechanical subcontractor's two crews, every unit of the demo job with the crew
 * that installed it (by level), once.
 */
import { QueryTypes } from 'sequelize';
import type { Database } from '../../../server/db';
import { Crew, Job } from '../../../server/models';
import { seedDemo } from '../../../server/seed/demo';
import { DEMO_CREWS } from '../../../server/seed/demoCrews';
import { demoLevels } from '../../../server/seed/demoSetup';
import { connectTestDb } from '../../support/db';
import { buildLevel, buildUnit } from '../../support/factories';

jest.setTimeout(120_000);

let db: Database;
beforeAll(async () => {
  db = await connectTestDb();
});
afterAll(async () => {
  await db.close();
});

it('names two crews and gives every unit its installing crew, once', async () => {
  await seedDemo(db);
  await seedDemo(db);
  const job = (await Job.findOne({ where: { name: 'Cinder Lane Commons' } }))!;
  // A level another test added to the demo job, with a unit no crew installed: not the seed's to fill.
  const other = await buildLevel(job.id, { name: `Another test's level ${Date.now()}` });
  const foreign = await buildUnit(job.id, other.id, { tag: `IU-X-${Date.now()}` });
  const crews = await Crew.findAll({ where: { jobId: job.id }, order: [['name', 'ASC']] });
  expect(crews.map((c) => c.name)).toEqual([...DEMO_CREWS]);
  // The seed's own levels only: other tests share this database and add levels of their own to the demo job.
  const units = await db.sequelize.query<{ position: number; crew: string | null }>(
    `SELECT l.position, c.name AS crew FROM units u JOIN levels l ON l.id = u.level_id LEFT JOIN crews c ON c.id = u.installed_by_crew_id
      WHERE u.job_id = $1 AND l.name = ANY($2::text[])`,
    { bind: [job.id, demoLevels().map((l) => l.name)], type: QueryTypes.SELECT },
  );
  expect(units.length).toBeGreaterThan(0);
  expect(units.filter((u) => u.crew !== (u.position <= 2 ? 'North crew' : 'South crew'))).toEqual([]);
  await foreign.destroy();
  await other.destroy();
});
