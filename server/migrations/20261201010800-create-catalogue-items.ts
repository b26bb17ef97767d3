import { DataTypes, type QueryInterface } from 'sequelize';

/** A job's defect catalogue: a copy of the built-in items plus the job's own. Retired, never deleted. */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('catalogue_items', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    job_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'jobs', key: 'id' }, onDelete: 'CASCADE' },
    code: { type: DataTypes.STRING(10), allowNull: false },
    group: { type: DataTypes.STRING(20), allowNull: false },
    title: { type: DataTypes.STRING(160), allowNull: false },
    description: { type: DataTypes.TEXT, allowNull: false },
    unit_kinds: { type: DataTypes.ARRAY(DataTypes.STRING(40)), allowNull: false },
    default_severity: { type: DataTypes.STRING(10), allowNull: false },
    trade: { type: DataTypes.STRING(20), allowNull: false },
    measured_rule: { type: DataTypes.JSONB, allowNull: true },
    fix_guidance: { type: DataTypes.TEXT, allowNull: false },
    caution: { type: DataTypes.TEXT, allowNull: true },
    needs_ceiling_access: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    builtin: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    position: { type: DataTypes.INTEGER, allowNull: false },
    retired_at: { type: DataTypes.DATE, allowNull: true },
    version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('catalogue_items', ['job_id', 'code'], { unique: true, name: 'catalogue_items_job_code_unique' });
  await qi.addIndex('catalogue_items', ['job_id', 'group', 'position'], { name: 'catalogue_items_job_group' });
  await qi.sequelize.query(`CREATE INDEX catalogue_items_unit_kinds ON catalogue_items USING GIN (unit_kinds)`);
  await qi.sequelize.query(
    `ALTER TABLE catalogue_items ADD CONSTRAINT catalogue_items_severity_check CHECK (default_severity IN ('critical', 'major', 'minor'))`,
  );
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('catalogue_items');
}
