import { DataTypes, type QueryInterface } from 'sequelize';

/** Indoor unit models of a job, with per-model limits from the installation manual (JSONB). */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('unit_models', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    job_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'jobs', key: 'id' }, onDelete: 'CASCADE' },
    name: { type: DataTypes.STRING(120), allowNull: false },
    model_number: { type: DataTypes.STRING(80), allowNull: true },
    unit_kind: { type: DataTypes.STRING(40), allowNull: false },
    nominal_capacity: { type: DataTypes.DOUBLE, allowNull: true },
    limits: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
    version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.sequelize.query(`CREATE UNIQUE INDEX unit_models_job_name_unique ON unit_models (job_id, lower(name))`);
  await qi.addIndex('unit_models', ['job_id', 'unit_kind'], { name: 'unit_models_job_kind' });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('unit_models');
}
