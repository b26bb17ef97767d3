import type { QueryInterface } from 'sequelize';

/**
 * Schedules as they come, and imports that can be taken back.
 *
 * unit_kind_mappings: a value of a schedule's kind column the user mapped to a unit kind, kept per
 * job so the next import of the same (revised) schedule reads it without asking again. `value` is
 * the normalised text (shared/rules/schedule.ts normaliseKindText).
 *
 * unit_imports: one row per committed import (who, when, the counts, the levels and spaces it
 * created); unit_import_changes: per unit, what the import did (added, changed with the fields as
 * they were before, removed with the whole unit as it was) and the unit's version after it, so an
 * undo can tell a unit changed since. An import is undone at most once (undone_at).
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`CREATE TABLE unit_kind_mappings (
    job_id uuid NOT NULL REFERENCES jobs (id) ON DELETE CASCADE,
    value varchar(200) NOT NULL CHECK (char_length(value) BETWEEN 1 AND 200),
    kind varchar(40) NOT NULL,
    updated_at timestamptz NOT NULL,
    PRIMARY KEY (job_id, value)
  )`);
  await sql(`CREATE TABLE unit_imports (
    id uuid PRIMARY KEY,
    job_id uuid NOT NULL REFERENCES jobs (id) ON DELETE CASCADE,
    created_by uuid REFERENCES users (id) ON DELETE SET NULL,
    file_name varchar(200),
    added integer NOT NULL DEFAULT 0,
    changed integer NOT NULL DEFAULT 0,
    removed integer NOT NULL DEFAULT 0,
    created_level_ids uuid[] NOT NULL DEFAULT '{}',
    created_space_ids uuid[] NOT NULL DEFAULT '{}',
    created_at timestamptz NOT NULL,
    undone_at timestamptz,
    undone_by uuid REFERENCES users (id) ON DELETE SET NULL
  )`);
  await sql(`CREATE INDEX unit_imports_job ON unit_imports (job_id, created_at DESC)`);
  await sql(`CREATE TABLE unit_import_changes (
    import_id uuid NOT NULL REFERENCES unit_imports (id) ON DELETE CASCADE,
    unit_id uuid NOT NULL,
    action varchar(10) NOT NULL CHECK (action IN ('added', 'changed', 'removed')),
    before jsonb,
    version_after integer,
    PRIMARY KEY (import_id, unit_id)
  )`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`DROP TABLE unit_import_changes`);
  await sql(`DROP TABLE unit_imports`);
  await sql(`DROP TABLE unit_kind_mappings`);
}
