import type { QueryInterface } from 'sequelize';

/**
 * Sampling audits (shared/calc/sampling.ts). An audit's lot is frozen when it is planned: the
 * filters that chose it are kept as typed, and every unit of the lot is a row of audit_units with
 * its place in the seeded draw order; the sample is the rows with a tier (1, or 2 for the second
 * tier of the tiered scheme). The plan's parameters (code letter, sample sizes, Ac/Re per class,
 * tier sizes) are kept as computed, with their source, so a later change of the tables in code
 * cannot change an audit already planned.
 *
 * audit_units never changes once written (a trigger refuses UPDATE); deleting the job takes the
 * audit with it. A unit in a lot cannot be deleted (NO ACTION, like unit checks and findings):
 * which units were drawn is evidence.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`CREATE TABLE audits (
    id uuid PRIMARY KEY,
    job_id uuid NOT NULL REFERENCES jobs (id) ON DELETE CASCADE,
    number integer NOT NULL CHECK (number > 0),
    name varchar(120) NOT NULL CHECK (char_length(btrim(name)) BETWEEN 1 AND 120),
    scheme varchar(10) NOT NULL CHECK (scheme IN ('z14', 'tiered')),
    inspection_level varchar(3) NULL CHECK (inspection_level IN ('I', 'II', 'III')),
    lot_filters jsonb NOT NULL,
    class_rules jsonb NOT NULL,
    plan jsonb NOT NULL,
    lot_size integer NOT NULL CHECK (lot_size > 0),
    sample_size integer NOT NULL CHECK (sample_size > 0 AND sample_size <= lot_size),
    seed varchar(64) NOT NULL,
    planned_by uuid NOT NULL REFERENCES users (id),
    started_at timestamptz NOT NULL,
    created_at timestamptz NOT NULL,
    updated_at timestamptz NOT NULL,
    CHECK ((scheme = 'z14') = (inspection_level IS NOT NULL))
  )`);
  await sql(`CREATE UNIQUE INDEX audits_job_number_unique ON audits (job_id, number)`);
  await sql(`CREATE TABLE audit_units (
    audit_id uuid NOT NULL REFERENCES audits (id) ON DELETE CASCADE,
    unit_id uuid NOT NULL REFERENCES units (id),
    draw_position integer NOT NULL CHECK (draw_position > 0),
    tier smallint NULL CHECK (tier IN (1, 2)),
    PRIMARY KEY (audit_id, unit_id),
    UNIQUE (audit_id, draw_position)
  )`);
  await sql(`CREATE INDEX audit_units_unit ON audit_units (unit_id)`);
  await sql(`CREATE FUNCTION audit_units_frozen() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN RAISE EXCEPTION 'audit_units are frozen when the audit is planned'; END $$`);
  await sql(`CREATE TRIGGER audit_units_no_update BEFORE UPDATE ON audit_units FOR EACH ROW EXECUTE FUNCTION audit_units_frozen()`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`DROP TABLE audit_units`);
  await sql(`DROP FUNCTION audit_units_frozen()`);
  await sql(`DROP TABLE audits`);
}
