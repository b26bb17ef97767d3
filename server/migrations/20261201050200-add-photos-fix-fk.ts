import type { QueryInterface } from 'sequelize';

/** photos.fix_id → fixes.id (the photos migration left it without a key until fixes existed). ON DELETE CASCADE. */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`ALTER TABLE photos ADD CONSTRAINT photos_fix_id_fkey FOREIGN KEY (fix_id) REFERENCES fixes (id) ON DELETE CASCADE`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`ALTER TABLE photos DROP CONSTRAINT IF EXISTS photos_fix_id_fkey`);
}
