import type { QueryInterface } from 'sequelize';

/**
 * Raise the figure-cache versions (job_stat_versions, migration 20261202010100) at commit, all at
 * once and in one fixed order, instead of at each change. Raising them mid-transaction held their
 * rows from the first change to the commit and took them in whatever order the statements ran:
 * a reassignment (event first, then the finding) and a re-inspection (finding first, then the
 * event) at the same moment could each hold a version row the other wanted, a deadlock.
 *
 * Now job_stat_bump only notes (job, topic) in a transaction-local setting; a deferred constraint
 * trigger on every table that notes anything runs at commit, after every statement (and so after
 * every tally row lock), and raises the noted versions in one INSERT ... ON CONFLICT ordered by
 * (job, topic). Transactions at commit then wait for each other only on version rows, taken in
 * the same order, so they cannot deadlock; readers still see the data and its versions change in
 * the same commit. The first firing empties the note; the others find it empty.
 */
const TABLES = ['findings', 'finding_events', 'units', 'unit_checks', 'levels', 'systems', 'catalogue_items', 'job_companies', 'jobs', 'companies'];

export async function up({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`
    CREATE OR REPLACE FUNCTION job_stat_bump(j uuid, t varchar) RETURNS void LANGUAGE plpgsql AS $fn$
    DECLARE
      noted text := coalesce(current_setting('trimout.stat_pending', true), '');
      k text := j::text || ':' || t || ',';
    BEGIN
      IF j IS NULL OR position(k IN noted) > 0 THEN
        RETURN;
      END IF;
      PERFORM set_config('trimout.stat_pending', noted || k, true);
    END
    $fn$`);
  await sql(`
    CREATE FUNCTION job_stat_flush() RETURNS trigger LANGUAGE plpgsql AS $fn$
    DECLARE
      noted text := coalesce(current_setting('trimout.stat_pending', true), '');
    BEGIN
      IF noted = '' THEN
        RETURN NULL;
      END IF;
      PERFORM set_config('trimout.stat_pending', '', true);
      INSERT INTO job_stat_versions AS v (job_id, topic, version)
        SELECT p.job_id, p.topic, 1
          FROM (SELECT split_part(x, ':', 1)::uuid AS job_id, split_part(x, ':', 2) AS topic
                  FROM unnest(string_to_array(rtrim(noted, ','), ',')) AS x) p
         WHERE EXISTS (SELECT 1 FROM jobs WHERE id = p.job_id)
         ORDER BY p.job_id, p.topic
        ON CONFLICT (job_id, topic) DO UPDATE SET version = v.version + 1;
      RETURN NULL;
    END
    $fn$`);
  for (const table of TABLES) {
    await sql(`
      CREATE CONSTRAINT TRIGGER ${table}_stat_flush AFTER INSERT OR UPDATE OR DELETE ON ${table}
        DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION job_stat_flush()`);
  }
}

export async function down({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  for (const table of TABLES) await sql(`DROP TRIGGER IF EXISTS ${table}_stat_flush ON ${table}`);
  await sql(`DROP FUNCTION IF EXISTS job_stat_flush()`);
  await sql(`
    CREATE OR REPLACE FUNCTION job_stat_bump(j uuid, t varchar) RETURNS void LANGUAGE plpgsql AS $fn$
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
}
