import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * Findings: one logged defect each, numbered per job (#1, #2 ...) from job_finding_numbers,
 * which hands out numbers under a row lock (INSERT ... ON CONFLICT DO UPDATE ... RETURNING).
 * The level is always set (given, or derived from the unit or space); the responsible company
 * must be a company on the job (composite foreign key to job_companies' unique (job_id, company_id);
 * NO ACTION, so removing a company with findings is refused while deleting a whole job still cascades).
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('job_finding_numbers', {
    job_id: { type: DataTypes.UUID, primaryKey: true, references: { model: 'jobs', key: 'id' }, onDelete: 'CASCADE' },
    last_number: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
  });

  await qi.createTable('findings', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    job_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'jobs', key: 'id' }, onDelete: 'CASCADE' },
    number: { type: DataTypes.INTEGER, allowNull: false },
    unit_id: { type: DataTypes.UUID, allowNull: true, references: { model: 'units', key: 'id' }, onDelete: 'NO ACTION' },
    space_id: { type: DataTypes.UUID, allowNull: true, references: { model: 'spaces', key: 'id' }, onDelete: 'NO ACTION' },
    level_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'levels', key: 'id' }, onDelete: 'NO ACTION' },
    catalogue_item_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'catalogue_items', key: 'id' }, onDelete: 'NO ACTION' },
    walk_id: { type: DataTypes.UUID, allowNull: true, references: { model: 'walks', key: 'id' }, onDelete: 'NO ACTION' },
    unit_check_id: { type: DataTypes.UUID, allowNull: true, references: { model: 'unit_checks', key: 'id' }, onDelete: 'NO ACTION' },
    severity: { type: DataTypes.STRING(10), allowNull: false },
    status: { type: DataTypes.STRING(20), allowNull: false, defaultValue: 'open' },
    company_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'companies', key: 'id' }, onDelete: 'NO ACTION' },
    due_on: { type: DataTypes.DATEONLY, allowNull: false },
    note: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
    measured_text: { type: DataTypes.STRING(60), allowNull: true },
    measured_value: { type: DataTypes.DOUBLE, allowNull: true },
    rule_result: { type: DataTypes.JSONB, allowNull: true },
    return_count: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    logged_by: { type: DataTypes.UUID, allowNull: false, references: { model: 'users', key: 'id' }, onDelete: 'RESTRICT' },
    logged_at: { type: DataTypes.DATE, allowNull: false },
    pin_x: { type: DataTypes.DOUBLE, allowNull: true },
    pin_y: { type: DataTypes.DOUBLE, allowNull: true },
    voided_reason: { type: DataTypes.TEXT, allowNull: true },
    version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`ALTER TABLE findings ADD CONSTRAINT findings_job_number_unique UNIQUE (job_id, number)`);
  await sql(
    `ALTER TABLE findings ADD CONSTRAINT findings_company_on_job_fk FOREIGN KEY (job_id, company_id)
       REFERENCES job_companies (job_id, company_id)`,
  );
  await sql(`ALTER TABLE findings ADD CONSTRAINT findings_severity_check CHECK (severity IN ('critical', 'major', 'minor'))`);
  await sql(
    `ALTER TABLE findings ADD CONSTRAINT findings_status_check CHECK (status IN ('open', 'fix_submitted', 'closed', 'voided'))`,
  );
  await sql(`ALTER TABLE findings ADD CONSTRAINT findings_number_check CHECK (number > 0)`);
  await sql(`ALTER TABLE findings ADD CONSTRAINT findings_return_count_check CHECK (return_count >= 0)`);
  await sql(
    `ALTER TABLE findings ADD CONSTRAINT findings_pin_check CHECK ((pin_x IS NULL) = (pin_y IS NULL)
       AND (pin_x IS NULL OR (pin_x BETWEEN 0 AND 1 AND pin_y BETWEEN 0 AND 1)))`,
  );
  await sql(
    `ALTER TABLE findings ADD CONSTRAINT findings_voided_reason_check CHECK (status <> 'voided' OR voided_reason IS NOT NULL)`,
  );
  // List filters and counts per level / status / company.
  await sql(`CREATE INDEX findings_job_level_status ON findings (job_id, level_id, status, severity)`);
  await sql(`CREATE INDEX findings_job_company_status ON findings (job_id, company_id, status, due_on)`);
  await sql(`CREATE INDEX findings_job_status_due ON findings (job_id, status, due_on)`);
  await sql(`CREATE INDEX findings_job_logged_at ON findings (job_id, logged_at)`);
  await sql(`CREATE INDEX findings_unit_status ON findings (unit_id, status) WHERE unit_id IS NOT NULL`);
  await sql(`CREATE INDEX findings_space_status ON findings (space_id, status) WHERE space_id IS NOT NULL`);
  await sql(`CREATE INDEX findings_job_catalogue_item ON findings (job_id, catalogue_item_id, logged_at)`);
  await sql(`CREATE INDEX findings_walk_id ON findings (walk_id) WHERE walk_id IS NOT NULL`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  // Photo rows of the findings being dropped would point at nothing (photos.finding_id has no
  // key once 20261201040500 is undone): they go with their findings.
  await qi.sequelize.query(`DELETE FROM photos WHERE finding_id IS NOT NULL`);
  await qi.dropTable('findings');
  await qi.dropTable('job_finding_numbers');
}
