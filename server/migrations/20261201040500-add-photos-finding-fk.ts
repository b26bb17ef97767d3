import type { QueryInterface } from 'sequelize';

/**
 * photos.finding_id → findings.id (the photos migration left it without a key until findings
 * existed). ON DELETE CASCADE as that migration's contract says; findings are never deleted on
 * their own (voided instead), only with their job.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(
    `ALTER TABLE photos ADD CONSTRAINT photos_finding_id_fkey FOREIGN KEY (finding_id) REFERENCES findings (id) ON DELETE CASCADE`,
  );
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`ALTER TABLE photos DROP CONSTRAINT IF EXISTS photos_finding_id_fkey`);
}
