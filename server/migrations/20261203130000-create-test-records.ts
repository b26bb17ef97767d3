import type { QueryInterface } from 'sequelize';

/**
 * Test records: pressure tests, evacuations, charge records, drain tests and start-up records
 * (shared/schemas/testRecords.ts). One table for every kind: the kind-specific fields as typed in
 * `data`, the figures Trimout computed from them in `figures`, the verdict in `result`.
 *
 * - A drain test is per unit (unit_id set; system_id is the unit's system when recorded); every
 *   other kind is per system (system_id set, unit_id null).
 * - company_id: the company responsible for the system when the record was made (scoping).
 * - level_ids: the levels a pressure test of part of the pipework covers; null: the whole system.
 * - A witnessed record is locked: a trigger refuses any change to it, so a correction can only be
 *   a new record naming it in supersedes_id (unique: a record is corrected once; the history is a
 *   chain). Records and their systems and units are evidence: deleting a system or unit that has
 *   records is refused (NO ACTION), but deleting the whole job still takes everything.
 * - Photos: the photos table gains test_record_id and the stages gauge_start, gauge_end and test.
 * - jobs.test_settings: the job's settings for tests (atmospheric pressure, allowed drop, holds,
 *   target vacuum, rise limit), each with its source; systems.company_id: the company responsible
 *   for the system's pipework; systems.charge_basis: the outdoor unit's factory-charge source and
 *   per-size additional-charge factors from its manual.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`ALTER TABLE jobs ADD COLUMN test_settings jsonb NOT NULL DEFAULT '{}'::jsonb`);
  await sql(`ALTER TABLE systems ADD COLUMN company_id uuid REFERENCES companies (id), ADD COLUMN charge_basis jsonb`);
  await sql(`CREATE TABLE test_records (
    id uuid PRIMARY KEY,
    job_id uuid NOT NULL REFERENCES jobs (id) ON DELETE CASCADE,
    kind varchar(20) NOT NULL CHECK (kind IN ('pressure', 'evacuation', 'charge', 'drain', 'startup')),
    system_id uuid REFERENCES systems (id),
    unit_id uuid REFERENCES units (id),
    company_id uuid REFERENCES companies (id),
    level_ids uuid[],
    recorded_by uuid NOT NULL REFERENCES users (id),
    recorded_at timestamptz NOT NULL,
    witnessed_by uuid REFERENCES users (id),
    witnessed_at timestamptz,
    witness_note text,
    supersedes_id uuid UNIQUE REFERENCES test_records (id),
    result varchar(10) NOT NULL CHECK (result IN ('passed', 'failed', 'recorded')),
    reasons jsonb NOT NULL DEFAULT '[]'::jsonb,
    data jsonb NOT NULL,
    figures jsonb NOT NULL,
    note text,
    version integer NOT NULL DEFAULT 1,
    created_at timestamptz NOT NULL,
    updated_at timestamptz NOT NULL,
    CONSTRAINT test_records_target_check CHECK (CASE WHEN kind = 'drain' THEN unit_id IS NOT NULL ELSE unit_id IS NULL AND system_id IS NOT NULL END),
    CONSTRAINT test_records_witness_check CHECK ((witnessed_by IS NULL) = (witnessed_at IS NULL)),
    CONSTRAINT test_records_not_self_check CHECK (supersedes_id IS DISTINCT FROM id)
  )`);
  await sql(`CREATE INDEX test_records_job_recorded ON test_records (job_id, recorded_at DESC, id DESC)`);
  await sql(`CREATE INDEX test_records_job_system_kind ON test_records (job_id, system_id, kind)`);
  await sql(`CREATE INDEX test_records_job_unit ON test_records (job_id, unit_id) WHERE unit_id IS NOT NULL`);
  await sql(`CREATE FUNCTION test_records_locked() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF OLD.witnessed_at IS NOT NULL THEN
        RAISE EXCEPTION 'test record % is witnessed and locked', OLD.id USING ERRCODE = 'check_violation';
      END IF;
      RETURN NEW;
    END $$`);
  await sql(`CREATE TRIGGER test_records_locked BEFORE UPDATE ON test_records FOR EACH ROW EXECUTE FUNCTION test_records_locked()`);

  await sql(`ALTER TABLE photos ADD COLUMN test_record_id uuid REFERENCES test_records (id) ON DELETE CASCADE`);
  await sql(`CREATE INDEX photos_test_record ON photos (test_record_id) WHERE test_record_id IS NOT NULL`);
  await sql(`ALTER TABLE photos DROP CONSTRAINT photos_stage_check`);
  await sql(`ALTER TABLE photos
    ADD CONSTRAINT photos_stage_check CHECK (stage IN ('finding', 'fix', 'reinspection', 'gauge_start', 'gauge_end', 'test')),
    ADD CONSTRAINT photos_test_record_stage_check CHECK ((stage IN ('gauge_start', 'gauge_end', 'test')) = (test_record_id IS NOT NULL))`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`DELETE FROM photos WHERE test_record_id IS NOT NULL`);
  await sql(`ALTER TABLE photos DROP CONSTRAINT photos_test_record_stage_check, DROP CONSTRAINT photos_stage_check`);
  await sql(`ALTER TABLE photos ADD CONSTRAINT photos_stage_check CHECK (stage IN ('finding', 'fix', 'reinspection'))`);
  await sql(`ALTER TABLE photos DROP COLUMN test_record_id`);
  await sql(`DROP TABLE test_records`);
  await sql(`DROP FUNCTION test_records_locked()`);
  await sql(`ALTER TABLE systems DROP COLUMN charge_basis, DROP COLUMN company_id`);
  await sql(`ALTER TABLE jobs DROP COLUMN test_settings`);
}
