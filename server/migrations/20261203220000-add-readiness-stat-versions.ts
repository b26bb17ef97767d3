import type { QueryInterface } from 'sequelize';

/**
 * Versions for everything readiness reads that no figure-cache topic followed yet
 * (job_stat_versions, migrations 20261202010100 and 20261202010300), so `GET /readiness` can be
 * kept in the exact in-memory cache (server/services/statCache.ts) like the board's figures:
 *
 *   blockers  a finding added or deleted, or any column a readiness blocker shows or is decided
 *             by changed: number, title, level, unit, company, type, severity, status. (The topic
 *             "unresolved" misses the unit and the title; "shape" misses the status.)
 *   tests     a test record added, changed (witnessed) or deleted.
 *   structure now also when a person's name changes and that person excluded one of the job's
 *             units from the ceiling rule (readiness names who excluded it).
 *
 * Units, unit checks, levels, systems, catalogue items, the job's companies and the job's own
 * settings already raise `structure`.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);

  await sql(`CREATE TRIGGER findings_stat_blockers AFTER INSERT OR DELETE ON findings
    FOR EACH ROW EXECUTE FUNCTION job_stat_bump_row('blockers', 'job_id')`);
  await sql(`CREATE TRIGGER findings_stat_blockers_update AFTER UPDATE ON findings
    FOR EACH ROW
    WHEN ((OLD.job_id, OLD.number, OLD.title, OLD.level_id, OLD.unit_id, OLD.company_id, OLD.catalogue_item_id, OLD.severity, OLD.status)
          IS DISTINCT FROM (NEW.job_id, NEW.number, NEW.title, NEW.level_id, NEW.unit_id, NEW.company_id, NEW.catalogue_item_id, NEW.severity, NEW.status))
    EXECUTE FUNCTION job_stat_bump_row('blockers', 'job_id')`);

  await sql(`CREATE TRIGGER test_records_stat_tests AFTER INSERT OR UPDATE OR DELETE ON test_records
    FOR EACH ROW EXECUTE FUNCTION job_stat_bump_row('tests', 'job_id')`);
  await sql(`CREATE CONSTRAINT TRIGGER test_records_stat_flush AFTER INSERT OR UPDATE OR DELETE ON test_records
    DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION job_stat_flush()`);

  // Few units are ever excluded: a small partial index finds the jobs a renamed person excluded units on.
  await sql(`CREATE INDEX units_ceiling_excluded_by ON units (ceiling_excluded_by) WHERE ceiling_excluded_by IS NOT NULL`);
  await sql(`
    CREATE FUNCTION users_stat_structure() RETURNS trigger LANGUAGE plpgsql AS $fn$
    BEGIN
      PERFORM job_stat_bump(x.job_id, 'structure')
         FROM (SELECT DISTINCT u.job_id FROM units u WHERE u.ceiling_excluded_by = NEW.id) x;
      RETURN NULL;
    END
    $fn$`);
  await sql(`CREATE TRIGGER users_stat_structure AFTER UPDATE OF name ON users
    FOR EACH ROW WHEN (OLD.name IS DISTINCT FROM NEW.name) EXECUTE FUNCTION users_stat_structure()`);
  await sql(`CREATE CONSTRAINT TRIGGER users_stat_flush AFTER UPDATE ON users
    DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION job_stat_flush()`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`DROP TRIGGER IF EXISTS users_stat_flush ON users`);
  await sql(`DROP TRIGGER IF EXISTS users_stat_structure ON users`);
  await sql(`DROP FUNCTION IF EXISTS users_stat_structure()`);
  await sql(`DROP INDEX IF EXISTS units_ceiling_excluded_by`);
  await sql(`DROP TRIGGER IF EXISTS test_records_stat_flush ON test_records`);
  await sql(`DROP TRIGGER IF EXISTS test_records_stat_tests ON test_records`);
  await sql(`DROP TRIGGER IF EXISTS findings_stat_blockers_update ON findings`);
  await sql(`DROP TRIGGER IF EXISTS findings_stat_blockers ON findings`);
  await sql(`DELETE FROM job_stat_versions WHERE topic IN ('blockers', 'tests')`);
}
