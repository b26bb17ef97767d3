import type { QueryInterface } from 'sequelize';

/**
 * Crews: named teams within a company on a job, and the crew that installed each unit. A habit
 * belongs to a crew, so recurring defects are broken down by it.
 *
 * A crew belongs to a company on the job (job_companies): taking the company off the job takes its
 * crews with it, unless a unit still names one. A unit's crew cannot be deleted while units name it
 * (NO ACTION, checked at the end of the statement, so deleting the whole job still removes both):
 * who installed a unit is evidence, not something to forget quietly. The routes answer 409
 * `referenced` first. Names are unique per job and company, ignoring case and outer spaces.
 * Changes raise the job's `structure` stat version like units and companies do, so the cached
 * recurring figures follow a rename.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`CREATE TABLE crews (
    id uuid PRIMARY KEY,
    job_id uuid NOT NULL REFERENCES jobs (id) ON DELETE CASCADE,
    company_id uuid NOT NULL REFERENCES companies (id) ON DELETE CASCADE,
    name varchar(80) NOT NULL CHECK (char_length(btrim(name)) BETWEEN 1 AND 80),
    version integer NOT NULL DEFAULT 1,
    created_at timestamptz NOT NULL,
    updated_at timestamptz NOT NULL,
    CONSTRAINT crews_job_company_fkey FOREIGN KEY (job_id, company_id) REFERENCES job_companies (job_id, company_id) ON DELETE CASCADE
  )`);
  await sql(`CREATE UNIQUE INDEX crews_job_company_name_unique ON crews (job_id, company_id, lower(btrim(name)))`);
  await sql(`ALTER TABLE units ADD COLUMN installed_by_crew_id uuid REFERENCES crews (id)`);
  await sql(`CREATE INDEX units_installed_by_crew ON units (installed_by_crew_id) WHERE installed_by_crew_id IS NOT NULL`);
  await sql(`CREATE TRIGGER crews_stat_structure AFTER INSERT OR UPDATE OR DELETE ON crews FOR EACH ROW EXECUTE FUNCTION job_stat_bump_row('structure', 'job_id')`);
  // The noted version is raised at commit, like every other table that notes one (migration 20261202010300).
  await sql(`CREATE CONSTRAINT TRIGGER crews_stat_flush AFTER INSERT OR UPDATE OR DELETE ON crews
    DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION job_stat_flush()`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`ALTER TABLE units DROP COLUMN installed_by_crew_id`);
  await sql(`DROP TABLE crews`);
}
