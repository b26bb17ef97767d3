import type { QueryInterface } from 'sequelize';

/**
 * Two things that keep the job's counts cheap on a large job (`npm run bench`: 100,000 findings),
 * both maintained by triggers in the same transaction as the change, so they are never behind:
 *
 * 1. `finding_tallies`: how many findings each (job, level, company, status, severity) holds. The
 *    findings list's counts and the levels board read a few hundred tally rows instead of counting
 *    every finding of the job. An UPDATE that moves a finding locks its two tally rows in one fixed
 *    order (by key), so a fix (open -> fix_submitted) and a return (fix_submitted -> open) in the
 *    same group at the same moment cannot deadlock.
 *
 * 2. `job_stat_versions`: a counter per (job, topic), raised once per transaction (at its commit since
 *    migration 20261202010300) by any change
 *    that can alter a cached figure (server/services/statCache.ts). A figure is cached with the
 *    versions read before computing it and served again only while they are unchanged, so the
 *    cache is exact: a committed change always raises the version in its own transaction.
 *    Topics:
 *      structure  units, unit checks, levels, systems, catalogue items, the job's companies and
 *                 settings, company names
 *      shape      a finding added or deleted, or its type, unit, level, company, logged time or
 *                 voided state changed (what the recurring list depends on)
 *      moved      a finding's level or company changed, or a finding deleted (the trend's past days
 *                 count each finding at its current level and company)
 *      unresolved a finding added or deleted, or its being unresolved (open or fix submitted), due
 *                 date, level, company, severity or type changed (overdue and ceiling counts)
 *      history    an accepted, returned, reassigned or reopened event (company scorecards)
 *      past       an event dated more than 5 minutes before its insert (a back-dated event changes
 *                 the trend's past days; events written by the app are dated now)
 *
 * Neither table has a foreign key to jobs: rows are removed when the job is deleted, and the
 * triggers fired by the cascade find no job and write nothing.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);

  await sql(`
    CREATE TABLE finding_tallies (
      job_id uuid NOT NULL,
      level_id uuid NOT NULL,
      company_id uuid NOT NULL,
      status varchar(20) NOT NULL,
      severity varchar(20) NOT NULL,
      n integer NOT NULL,
      PRIMARY KEY (job_id, level_id, company_id, status, severity)
    )`);
  await sql(`
    CREATE TABLE job_stat_versions (
      job_id uuid NOT NULL,
      topic varchar(20) NOT NULL,
      version bigint NOT NULL,
      PRIMARY KEY (job_id, topic)
    )`);

  await sql(`
    CREATE FUNCTION finding_tally_add(j uuid, l uuid, c uuid, s varchar, v varchar, d integer) RETURNS void
    LANGUAGE plpgsql AS $fn$
    BEGIN
      IF d > 0 THEN
        INSERT INTO finding_tallies AS t (job_id, level_id, company_id, status, severity, n)
          SELECT j, l, c, s, v, d WHERE EXISTS (SELECT 1 FROM jobs WHERE id = j)
          ON CONFLICT (job_id, level_id, company_id, status, severity) DO UPDATE SET n = t.n + EXCLUDED.n;
      ELSE
        UPDATE finding_tallies SET n = n + d
         WHERE job_id = j AND level_id = l AND company_id = c AND status = s AND severity = v;
      END IF;
    END
    $fn$`);
  await sql(`
    CREATE FUNCTION finding_tallies_apply() RETURNS trigger LANGUAGE plpgsql AS $fn$
    BEGIN
      IF TG_OP = 'INSERT' THEN
        PERFORM finding_tally_add(NEW.job_id, NEW.level_id, NEW.company_id, NEW.status, NEW.severity, 1);
      ELSIF TG_OP = 'DELETE' THEN
        PERFORM finding_tally_add(OLD.job_id, OLD.level_id, OLD.company_id, OLD.status, OLD.severity, -1);
      ELSIF (OLD.job_id::text, OLD.level_id::text, OLD.company_id::text, OLD.status, OLD.severity)
          < (NEW.job_id::text, NEW.level_id::text, NEW.company_id::text, NEW.status, NEW.severity) THEN
        PERFORM finding_tally_add(OLD.job_id, OLD.level_id, OLD.company_id, OLD.status, OLD.severity, -1);
        PERFORM finding_tally_add(NEW.job_id, NEW.level_id, NEW.company_id, NEW.status, NEW.severity, 1);
      ELSE
        PERFORM finding_tally_add(NEW.job_id, NEW.level_id, NEW.company_id, NEW.status, NEW.severity, 1);
        PERFORM finding_tally_add(OLD.job_id, OLD.level_id, OLD.company_id, OLD.status, OLD.severity, -1);
      END IF;
      RETURN NULL;
    END
    $fn$`);
  await sql(`CREATE TRIGGER finding_tallies_insert_delete AFTER INSERT OR DELETE ON findings FOR EACH ROW EXECUTE FUNCTION finding_tallies_apply()`);
  await sql(`
    CREATE TRIGGER finding_tallies_update AFTER UPDATE OF job_id, level_id, company_id, status, severity ON findings
      FOR EACH ROW
      WHEN ((OLD.job_id, OLD.level_id, OLD.company_id, OLD.status, OLD.severity)
            IS DISTINCT FROM (NEW.job_id, NEW.level_id, NEW.company_id, NEW.status, NEW.severity))
      EXECUTE FUNCTION finding_tallies_apply()`);
  await sql(`
    CREATE FUNCTION finding_tallies_truncate() RETURNS trigger LANGUAGE plpgsql AS $fn$
    BEGIN
      DELETE FROM finding_tallies;
      RETURN NULL;
    END
    $fn$`);
  await sql(`CREATE TRIGGER finding_tallies_truncate AFTER TRUNCATE ON findings FOR EACH STATEMENT EXECUTE FUNCTION finding_tallies_truncate()`);

  // Raise (job, topic) once per transaction; the transaction-local setting remembers it was done.
  await sql(`
    CREATE FUNCTION job_stat_bump(j uuid, t varchar) RETURNS void LANGUAGE plpgsql AS $fn$
    DECLARE
      k text := 'trimout.sv_' || t || '_' || replace(j::text, '-', '');
    BEGIN
      IF j IS NULL OR current_setting(k, true) = '1' THEN
        RETURN;
      END IF;
      INSERT INTO job_stat_versions AS v (job_id, topic, version)
        SELECT j, t, 1 WHERE EXISTS (SELECT 1 FROM jobs WHERE id = j)
        ON CONFLICT (job_id, topic) DO UPDATE SET version = v.version + 1;
      PERFORM set_config(k, '1', true);
    END
    $fn$`);
  // Generic row trigger: TG_ARGV[0] = topic, TG_ARGV[1] = the column holding the job's id.
  await sql(`
    CREATE FUNCTION job_stat_bump_row() RETURNS trigger LANGUAGE plpgsql AS $fn$
    BEGIN
      IF TG_OP IN ('UPDATE', 'DELETE') THEN
        PERFORM job_stat_bump((to_jsonb(OLD) ->> TG_ARGV[1])::uuid, TG_ARGV[0]);
      END IF;
      IF TG_OP IN ('INSERT', 'UPDATE') THEN
        PERFORM job_stat_bump((to_jsonb(NEW) ->> TG_ARGV[1])::uuid, TG_ARGV[0]);
      END IF;
      RETURN NULL;
    END
    $fn$`);
  for (const table of ['units', 'unit_checks', 'levels', 'systems', 'catalogue_items', 'job_companies']) {
    await sql(`CREATE TRIGGER ${table}_stat_structure AFTER INSERT OR UPDATE OR DELETE ON ${table} FOR EACH ROW EXECUTE FUNCTION job_stat_bump_row('structure', 'job_id')`);
  }
  await sql(`CREATE TRIGGER jobs_stat_structure AFTER UPDATE ON jobs FOR EACH ROW EXECUTE FUNCTION job_stat_bump_row('structure', 'id')`);
  await sql(`
    CREATE FUNCTION companies_stat_structure() RETURNS trigger LANGUAGE plpgsql AS $fn$
    BEGIN
      PERFORM job_stat_bump(jc.job_id, 'structure') FROM job_companies jc WHERE jc.company_id = NEW.id;
      RETURN NULL;
    END
    $fn$`);
  await sql(`
    CREATE TRIGGER companies_stat_structure AFTER UPDATE OF name ON companies
      FOR EACH ROW WHEN (OLD.name IS DISTINCT FROM NEW.name) EXECUTE FUNCTION companies_stat_structure()`);

  await sql(`
    CREATE FUNCTION findings_stat_versions() RETURNS trigger LANGUAGE plpgsql AS $fn$
    BEGIN
      IF TG_OP = 'INSERT' THEN
        PERFORM job_stat_bump(NEW.job_id, 'shape');
        PERFORM job_stat_bump(NEW.job_id, 'unresolved');
      ELSIF TG_OP = 'DELETE' THEN
        PERFORM job_stat_bump(OLD.job_id, 'shape');
        PERFORM job_stat_bump(OLD.job_id, 'moved');
        PERFORM job_stat_bump(OLD.job_id, 'unresolved');
      ELSE
        IF (OLD.job_id, OLD.catalogue_item_id, OLD.unit_id, OLD.level_id, OLD.company_id, OLD.logged_at, OLD.status = 'voided')
           IS DISTINCT FROM (NEW.job_id, NEW.catalogue_item_id, NEW.unit_id, NEW.level_id, NEW.company_id, NEW.logged_at, NEW.status = 'voided') THEN
          PERFORM job_stat_bump(OLD.job_id, 'shape');
          PERFORM job_stat_bump(NEW.job_id, 'shape');
        END IF;
        IF (OLD.job_id, OLD.level_id, OLD.company_id) IS DISTINCT FROM (NEW.job_id, NEW.level_id, NEW.company_id) THEN
          PERFORM job_stat_bump(OLD.job_id, 'moved');
          PERFORM job_stat_bump(NEW.job_id, 'moved');
        END IF;
        IF (OLD.job_id, OLD.level_id, OLD.company_id, OLD.severity, OLD.catalogue_item_id, OLD.due_on, OLD.status IN ('open', 'fix_submitted'))
           IS DISTINCT FROM (NEW.job_id, NEW.level_id, NEW.company_id, NEW.severity, NEW.catalogue_item_id, NEW.due_on, NEW.status IN ('open', 'fix_submitted')) THEN
          PERFORM job_stat_bump(OLD.job_id, 'unresolved');
          PERFORM job_stat_bump(NEW.job_id, 'unresolved');
        END IF;
      END IF;
      RETURN NULL;
    END
    $fn$`);
  await sql(`CREATE TRIGGER findings_stat_versions AFTER INSERT OR UPDATE OR DELETE ON findings FOR EACH ROW EXECUTE FUNCTION findings_stat_versions()`);
  await sql(`
    CREATE FUNCTION finding_events_stat_versions() RETURNS trigger LANGUAGE plpgsql AS $fn$
    BEGIN
      IF NEW.kind IN ('accepted', 'returned', 'reassigned', 'reopened') THEN
        PERFORM job_stat_bump(NEW.job_id, 'history');
      END IF;
      IF NEW.at < now() - interval '5 minutes' THEN
        PERFORM job_stat_bump(NEW.job_id, 'past');
      END IF;
      RETURN NULL;
    END
    $fn$`);
  await sql(`CREATE TRIGGER finding_events_stat_versions AFTER INSERT ON finding_events FOR EACH ROW EXECUTE FUNCTION finding_events_stat_versions()`);

  await sql(`
    CREATE FUNCTION jobs_stat_cleanup() RETURNS trigger LANGUAGE plpgsql AS $fn$
    BEGIN
      DELETE FROM finding_tallies WHERE job_id = OLD.id;
      DELETE FROM job_stat_versions WHERE job_id = OLD.id;
      RETURN NULL;
    END
    $fn$`);
  await sql(`CREATE TRIGGER jobs_stat_cleanup AFTER DELETE ON jobs FOR EACH ROW EXECUTE FUNCTION jobs_stat_cleanup()`);

  // Overdue and ceiling counts per level and company read only the unresolved findings.
  await sql(`
    CREATE INDEX findings_job_unresolved_level_company ON findings (job_id, level_id, company_id, severity, due_on, catalogue_item_id)
     WHERE status IN ('open', 'fix_submitted')`);

  // The findings already there.
  await sql(`
    INSERT INTO finding_tallies (job_id, level_id, company_id, status, severity, n)
    SELECT job_id, level_id, company_id, status, severity, count(*) FROM findings
     GROUP BY job_id, level_id, company_id, status, severity`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`DROP TRIGGER IF EXISTS jobs_stat_cleanup ON jobs`);
  await sql(`DROP TRIGGER IF EXISTS finding_events_stat_versions ON finding_events`);
  await sql(`DROP TRIGGER IF EXISTS findings_stat_versions ON findings`);
  await sql(`DROP TRIGGER IF EXISTS companies_stat_structure ON companies`);
  await sql(`DROP TRIGGER IF EXISTS jobs_stat_structure ON jobs`);
  for (const table of ['units', 'unit_checks', 'levels', 'systems', 'catalogue_items', 'job_companies']) {
    await sql(`DROP TRIGGER IF EXISTS ${table}_stat_structure ON ${table}`);
  }
  await sql(`DROP TRIGGER IF EXISTS finding_tallies_truncate ON findings`);
  await sql(`DROP TRIGGER IF EXISTS finding_tallies_update ON findings`);
  await sql(`DROP TRIGGER IF EXISTS finding_tallies_insert_delete ON findings`);
  for (const fn of [
    'jobs_stat_cleanup()',
    'finding_events_stat_versions()',
    'findings_stat_versions()',
    'companies_stat_structure()',
    'job_stat_bump_row()',
    'job_stat_bump(uuid, varchar)',
    'finding_tallies_truncate()',
    'finding_tallies_apply()',
    'finding_tally_add(uuid, uuid, uuid, varchar, varchar, integer)',
  ]) {
    await sql(`DROP FUNCTION IF EXISTS ${fn}`);
  }
  await sql(`DROP INDEX IF EXISTS findings_job_unresolved_level_company`);
  await sql(`DROP TABLE IF EXISTS job_stat_versions`);
  await sql(`DROP TABLE IF EXISTS finding_tallies`);
}
