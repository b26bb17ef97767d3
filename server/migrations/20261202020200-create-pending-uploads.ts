import type { QueryInterface } from 'sequelize';

/**
 * Object keys written to the store whose database write has not committed yet
 * (server/services/pendingUploads.ts). A row is inserted, in its own committed statement,
 * BEFORE the object is stored, and deleted in the transaction of the write that references the
 * object (a photo row, a level's plan). A crash in between leaves the row behind, so the reaper
 * can find the object and delete it: without the row nothing would name it.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`
    CREATE TABLE pending_uploads (
      key varchar(200) PRIMARY KEY,
      created_at timestamptz NOT NULL DEFAULT now()
    )`);
  await sql(`CREATE INDEX pending_uploads_created_at ON pending_uploads (created_at)`);
  // The reaper asks whether a level's plan references a key.
  await sql(`CREATE INDEX levels_plan_key ON levels (plan_key) WHERE plan_key IS NOT NULL`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`DROP INDEX IF EXISTS levels_plan_key`);
  await sql(`DROP TABLE IF EXISTS pending_uploads`);
}
