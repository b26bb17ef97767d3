import type { QueryInterface } from 'sequelize';

/**
 * "Something else": a finding whose defect is not in the catalogue. It is logged against the job's
 * one "other" defect type (so it counts on the board and exports like any finding) and carries its
 * own free-text title, by which it recurs. The other type is made the first time it is needed.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`ALTER TABLE catalogue_items ADD COLUMN is_other boolean NOT NULL DEFAULT false`);
  await sql(`CREATE UNIQUE INDEX catalogue_items_one_other_per_job ON catalogue_items (job_id) WHERE is_other`);
  await sql(`ALTER TABLE findings ADD COLUMN title varchar(160)`);
  await sql(`ALTER TABLE findings ADD CONSTRAINT findings_title_not_blank CHECK (title IS NULL OR btrim(title) <> '')`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`ALTER TABLE findings DROP COLUMN title`);
  await sql(`DROP INDEX catalogue_items_one_other_per_job`);
  await sql(`ALTER TABLE catalogue_items DROP COLUMN is_other`);
}
