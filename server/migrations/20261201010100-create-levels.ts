import { DataTypes, type QueryInterface } from 'sequelize';

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('levels', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    job_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'jobs', key: 'id' }, onDelete: 'CASCADE' },
    name: { type: DataTypes.STRING(80), allowNull: false },
    position: { type: DataTypes.INTEGER, allowNull: false },
    version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.sequelize.query(`CREATE UNIQUE INDEX levels_job_name_unique ON levels (job_id, lower(name))`);
  await qi.addIndex('levels', ['job_id', 'position'], { name: 'levels_job_position' });
  await qi.sequelize.query(`ALTER TABLE levels ADD CONSTRAINT levels_position_check CHECK (position >= 1)`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('levels');
}
