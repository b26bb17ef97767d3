import type { QueryInterface } from 'sequelize';

/**
 * A membership carries the company the person acts for on that job. A person's home company
 * (users.company_id) is not enough: someone of company A may be invited to a job for company B,
 * and must then see B's findings there, never A's. Existing memberships were made for the
 * person's home company, so that is what they get.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`ALTER TABLE job_members ADD COLUMN company_id uuid REFERENCES companies (id) ON DELETE RESTRICT`);
  await sql(`UPDATE job_members m SET company_id = u.company_id FROM users u WHERE u.id = m.user_id`);
  await sql(`ALTER TABLE job_members ALTER COLUMN company_id SET NOT NULL`);
  // Members of a company on a job (critical-finding mails, member counts) and the foreign key's checks.
  await sql(`CREATE INDEX job_members_company_job ON job_members (company_id, job_id)`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`ALTER TABLE job_members DROP COLUMN company_id`);
}
