import type { QueryInterface } from 'sequelize';

/**
 * The findings list in its default order (-number) for the two commonest narrowings: a level
 * (a board cell, a level's screen) and a company (every subcontractor request, the GC's company
 * filter). Without them PostgreSQL walks findings_job_number_unique backwards and throws away the
 * other levels' or companies' rows (about 3,600 rows read for 51 kept on level 4 of the bench
 * job, more on later pages); with them it reads the 51 rows in order. Checked with EXPLAIN
 * ANALYZE on the `npm run bench` job (100,000 findings, 20 levels, 20 companies).
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`CREATE INDEX findings_job_level_number ON findings (job_id, level_id, number)`);
  await qi.sequelize.query(`CREATE INDEX findings_job_company_number ON findings (job_id, company_id, number)`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`DROP INDEX IF EXISTS findings_job_company_number`);
  await qi.sequelize.query(`DROP INDEX IF EXISTS findings_job_level_number`);
}
