import type { QueryInterface } from 'sequelize';

/**
 * A GC manager may exclude a unit from the ceiling rule (shared/rules/ceilings.ts) with a reason:
 * the unit then no longer holds its level's ceilings open while it has no complete unit check.
 * The current exclusion sits on the unit (reason, who, when: all set or all null, so the screens
 * can say who decided it); every exclusion and lift is also kept in unit_events, which is
 * append-only like finding_events, so the history holds up later. A change of units raises the
 * `structure` stat version already (trigger units_stat_structure), so cached board figures follow.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`ALTER TABLE units
    ADD COLUMN ceiling_excluded_reason text,
    ADD COLUMN ceiling_excluded_by uuid REFERENCES users (id) ON DELETE RESTRICT,
    ADD COLUMN ceiling_excluded_at timestamptz`);
  await sql(`ALTER TABLE units ADD CONSTRAINT units_ceiling_exclusion_check CHECK (
    (ceiling_excluded_reason IS NULL) = (ceiling_excluded_by IS NULL)
    AND (ceiling_excluded_reason IS NULL) = (ceiling_excluded_at IS NULL)
    AND (ceiling_excluded_reason IS NULL OR char_length(btrim(ceiling_excluded_reason)) BETWEEN 3 AND 500))`);

  await sql(`CREATE TABLE unit_events (
    id uuid PRIMARY KEY,
    job_id uuid NOT NULL REFERENCES jobs (id) ON DELETE CASCADE,
    -- NO ACTION (checked at the end of the statement): a unit with history cannot be deleted on
    -- its own (409 referenced), while deleting the whole job removes both in one statement.
    unit_id uuid NOT NULL REFERENCES units (id),
    actor_id uuid NOT NULL REFERENCES users (id) ON DELETE RESTRICT,
    at timestamptz NOT NULL,
    kind varchar(40) NOT NULL CHECK (kind IN ('ceiling_excluded', 'ceiling_exclusion_lifted')),
    reason text
  )`);
  await sql(`CREATE INDEX unit_events_unit_at ON unit_events (unit_id, at, id)`);
  await sql(`
    CREATE FUNCTION unit_events_append_only() RETURNS trigger LANGUAGE plpgsql AS $fn$
    BEGIN
      IF TG_OP = 'DELETE' AND NOT EXISTS (SELECT 1 FROM jobs WHERE id = OLD.job_id) THEN
        -- the job is being deleted (ON DELETE CASCADE)
        RETURN OLD;
      END IF;
      RAISE EXCEPTION 'unit_events is append-only: % is not allowed', TG_OP
        USING ERRCODE = 'P0001', HINT = 'Record a new event instead of changing an old one.';
    END
    $fn$`);
  await sql(`CREATE TRIGGER unit_events_no_update_delete BEFORE UPDATE OR DELETE ON unit_events
    FOR EACH ROW EXECUTE FUNCTION unit_events_append_only()`);
  await sql(`
    CREATE FUNCTION unit_events_no_truncate() RETURNS trigger LANGUAGE plpgsql AS $fn$
    BEGIN
      RAISE EXCEPTION 'unit_events is append-only: TRUNCATE is not allowed' USING ERRCODE = 'P0001';
    END
    $fn$`);
  await sql(`CREATE TRIGGER unit_events_no_truncate BEFORE TRUNCATE ON unit_events
    FOR EACH STATEMENT EXECUTE FUNCTION unit_events_no_truncate()`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`DROP TABLE unit_events`);
  await sql(`DROP FUNCTION IF EXISTS unit_events_append_only()`);
  await sql(`DROP FUNCTION IF EXISTS unit_events_no_truncate()`);
  await sql(`ALTER TABLE units DROP CONSTRAINT units_ceiling_exclusion_check`);
  await sql(`ALTER TABLE units DROP COLUMN ceiling_excluded_at, DROP COLUMN ceiling_excluded_by, DROP COLUMN ceiling_excluded_reason`);
}
