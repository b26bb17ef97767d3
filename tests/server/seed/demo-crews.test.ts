/**
 * Demo seed: the mechanical subcontractor's two crews, every unit of the demo job with the crew
 * that installed it (by level), once.
 */
import { QueryTypes } from 'sequelize';
import type { Database } from '../../../server/db';
import { Crew, Job } from '../../../server/models';
import { seedDemo } from '../../../server/seed/demo';
import { DEMO_CREWS } from '../../../server/seed/demoCrews';
import { connectTestDb } from '../../support/db';

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
  const crews = await Crew.findAll({ where: { jobId: job.id }, order: [['name', 'ASC']] });
  expect(crews.map((c) => c.name)).toEqual([...DEMO_CREWS]);
  const units = await db.sequelize.query<{ position: number; crew: string | null }>(
    `SELECT l.position, c.name AS crew FROM units u JOIN levels l ON l.id = u.level_id LEFT JOIN crews c ON c.id = u.installed_by_crew_id WHERE u.job_id = $1`,
    { bind: [job.id], type: QueryTypes.SELECT },
  );
  expect(units.length).toBeGreaterThan(0);
  expect(units.filter((u) => u.crew !== (u.position <= 2 ? 'North crew' : 'South crew'))).toEqual([]);
});
