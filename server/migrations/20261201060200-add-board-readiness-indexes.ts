import type { QueryInterface } from 'sequelize';

/**
 * Board speed (server/services/board.ts, docs/api-board.md "Speed").
 *
 * findings_unit_blocking — readiness: the unresolved critical / major findings on units, the
 * startup blockers, as a small partial index in (job, unit, number) order with the columns the
 * readiness query reads, so "which units are blocked" and "the first blockers of each unit" are
 * index-only scans with no sort instead of a bitmap heap scan over every unresolved finding.
 *
 * finding_events_job_assignment — scorecards: the events that make assignment segments, in
 * (finding, at, id) order with the columns the window functions read, so the windows need no sort
 * and no heap access.
 *
 * Checked with EXPLAIN (ANALYZE, BUFFERS) on 100,000 findings over 2,000 units.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(
    `CREATE INDEX findings_unit_blocking ON findings (job_id, unit_id, number)
       INCLUDE (company_id, id, catalogue_item_id, severity, status)
      WHERE unit_id IS NOT NULL AND status IN ('open', 'fix_submitted') AND severity IN ('critical', 'major')`,
  );
  await qi.sequelize.query(
    `CREATE INDEX finding_events_job_assignment ON finding_events (job_id, finding_id, at, id)
       INCLUDE (kind, "to", "from")
      WHERE kind IN ('accepted', 'returned', 'reassigned', 'reopened')`,
  );
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`DROP INDEX IF EXISTS finding_events_job_assignment`);
  await qi.sequelize.query(`DROP INDEX IF EXISTS findings_unit_blocking`);
}
