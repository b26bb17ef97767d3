/**
 * The job setting for the longest span between condensate drain supports was stored as
 * `max_hanger_rod_spacing`; the migration renames the key inside each job's settings and in the
 * measured rules of each job's catalogue that read it, and its down puts the old key back.
 */
import { CatalogueItem, Job } from '../../../server/models';
import { down, up } from '../../../server/migrations/20261203100100-rename-drain-support-spacing-setting';
import type { Database } from '../../../server/db';
import { connectTestDb } from '../../support/db';
import { buildJob, copyCatalogue } from '../../support/factories';

let db: Database;
beforeAll(async () => {
  db = await connectTestDb();
});
afterAll(async () => {
  await db.close();
});

const SPAN = { value: 1219.2, stated: 4, unit: 'ft', text: "4'", source: 'Job specification 22 05 29 (invented)' };

it('renames the key in job settings and catalogue rules, keeping the value and the other settings; down restores it', async () => {
  const job = await buildJob();
  await copyCatalogue(job.id);
  const slope = { value: 1 / 96, stated: 0.125, unit: 'in/ft', text: '1/8 in/ft', source: 'IMC 2018 307.2.2' };
  await db.sequelize.query(`UPDATE jobs SET settings = $1::jsonb WHERE id = $2`, {
    bind: [JSON.stringify({ max_hanger_rod_spacing: SPAN, min_drain_slope: slope }), job.id],
  });
  await db.sequelize.query(
    `UPDATE catalogue_items SET measured_rule = jsonb_set(measured_rule, '{limit,key}', '"max_hanger_rod_spacing"') WHERE job_id = $1 AND code = 'DR-02'`,
    { bind: [job.id] },
  );
  const qi = db.sequelize.getQueryInterface();

  await up({ context: qi });
  const after = (await Job.findByPk(job.id))!;
  expect(after.settings).toEqual({ max_drain_support_spacing: SPAN, min_drain_slope: slope });
  const rule = (await CatalogueItem.findOne({ where: { jobId: job.id, code: 'DR-02' } }))!.measuredRule;
  expect(rule?.limit).toEqual({ from: 'job', key: 'max_drain_support_spacing' });

  await down({ context: qi });
  expect(((await Job.findByPk(job.id))!.settings as Record<string, unknown>).max_hanger_rod_spacing).toEqual(SPAN);
  const old = (await CatalogueItem.findOne({ where: { jobId: job.id, code: 'DR-02' } }))!.measuredRule;
  expect(old?.limit).toEqual({ from: 'job', key: 'max_hanger_rod_spacing' });
  await up({ context: qi });
});
