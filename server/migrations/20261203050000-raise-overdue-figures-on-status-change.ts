import type { QueryInterface } from 'sequelize';

/**
 * Overdue now counts open findings only (a fix waiting for re-inspection is not overdue), so the
 * cached overdue figures (topic "unresolved", migration 20261202010100) must be recomputed when a
 * finding moves between open and fix submitted, not only when it starts or stops being
 * unresolved: the findings trigger now raises the topic on any change of status.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`
    CREATE OR REPLACE FUNCTION findings_stat_versions() RETURNS trigger LANGUAGE plpgsql AS $fn$
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
        IF (OLD.job_id, OLD.level_id, OLD.company_id, OLD.severity, OLD.catalogue_item_id, OLD.due_on, OLD.status)
           IS DISTINCT FROM (NEW.job_id, NEW.level_id, NEW.company_id, NEW.severity, NEW.catalogue_item_id, NEW.due_on, NEW.status) THEN
          PERFORM job_stat_bump(OLD.job_id, 'unresolved');
          PERFORM job_stat_bump(NEW.job_id, 'unresolved');
        END IF;
      END IF;
      RETURN NULL;
    END
    $fn$`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`
    CREATE OR REPLACE FUNCTION findings_stat_versions() RETURNS trigger LANGUAGE plpgsql AS $fn$
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
}
