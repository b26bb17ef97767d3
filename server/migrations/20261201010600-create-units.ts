import { DataTypes, type QueryInterface } from 'sequelize';

/** Indoor units, known by their tag (unique within the job). capacity in W. */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('units', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    job_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'jobs', key: 'id' }, onDelete: 'CASCADE' },
    tag: { type: DataTypes.STRING(40), allowNull: false },
    kind: { type: DataTypes.STRING(40), allowNull: false },
    model_id: { type: DataTypes.UUID, allowNull: true, references: { model: 'unit_models', key: 'id' }, onDelete: 'RESTRICT' },
    capacity: { type: DataTypes.DOUBLE, allowNull: true },
    level_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'levels', key: 'id' }, onDelete: 'RESTRICT' },
    space_id: { type: DataTypes.UUID, allowNull: true, references: { model: 'spaces', key: 'id' }, onDelete: 'RESTRICT' },
    system_id: { type: DataTypes.UUID, allowNull: true, references: { model: 'systems', key: 'id' }, onDelete: 'RESTRICT' },
    version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('units', ['job_id', 'tag'], { unique: true, name: 'units_job_tag_unique' });
  await qi.addIndex('units', ['level_id', 'tag'], { name: 'units_level_tag' });
  await qi.addIndex('units', ['space_id'], { name: 'units_space_id' });
  await qi.addIndex('units', ['system_id'], { name: 'units_system_id' });
  await qi.addIndex('units', ['model_id'], { name: 'units_model_id' });
  await qi.addIndex('units', ['job_id', 'kind', 'tag'], { name: 'units_job_kind_tag' });
  await qi.sequelize.query(`ALTER TABLE units ADD CONSTRAINT units_capacity_check CHECK (capacity IS NULL OR capacity > 0)`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('units');
}
