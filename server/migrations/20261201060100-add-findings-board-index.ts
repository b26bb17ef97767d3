import type { QueryInterface } from 'sequelize';

/**
 * The levels board (server/services/board.ts) counts per level in two index-only scans: status and
 * severity from findings_job_level_status, and overdue / ceiling blockers from this partial index
 * of unresolved findings (status open or fix_submitted), which stays small (btree deduplication:
 * many findings share level, due date and defect type). Checked with EXPLAIN ANALYZE on 100,000
 * findings over 2,000 units: index-only scans instead of a sequential scan of the table.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(
    `CREATE INDEX findings_job_level_unresolved ON findings (job_id, level_id, due_on, catalogue_item_id)
      WHERE status IN ('open', 'fix_submitted')`,
  );
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`DROP INDEX IF EXISTS findings_job_level_unresolved`);
}
